// Module hooks for register-ts.js: resolve `x.js` to `x.ts` when only the TypeScript exists, and
// transpile `.ts` with esbuild (types stripped, nothing checked: `npm run typecheck` does that).
import { existsSync } from 'node:fs';
import { readFile } from 'node:fs/promises';
import { fileURLToPath } from 'node:url';
import { transform } from 'esbuild';

export async function resolve(specifier, context, next) {
  if (specifier.endsWith('.js') && (specifier.startsWith('.') || specifier.startsWith('/')) && context.parentURL?.startsWith('file:')) {
    const candidate = new URL(specifier.replace(/\.js$/, '.ts'), context.parentURL);
    const original = new URL(specifier, context.parentURL);
    if (!existsSync(fileURLToPath(original)) && existsSync(fileURLToPath(candidate))) return next(candidate.href, context);
  }
  return next(specifier, context);
}

export async function load(url, context, next) {
  if (url.startsWith('file:') && url.endsWith('.ts')) {
    const source = await readFile(fileURLToPath(url), 'utf8');
    const { code } = await transform(source, { loader: 'ts', format: 'esm', target: 'node20', sourcemap: 'inline', sourcefile: fileURLToPath(url) });
    return { format: 'module', source: code, shortCircuit: true };
  }
  return next(url, context);
}
