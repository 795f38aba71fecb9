/**
 * `import 'pkg'` in a cell loads packages installed beside the notebook: resolved from the
 * kernel's working directory (where Jupyter starts it), not from where chernel is installed.
 */

import { existsSync, readFileSync } from 'node:fs';
import { createRequire, isBuiltin } from 'node:module';
import { dirname, join } from 'node:path';
import { pathToFileURL } from 'node:url';

function packageName(specifier: string): { name: string; subpath: string } {
  const parts = specifier.split('/');
  const count = specifier.startsWith('@') ? 2 : 1;
  const name = parts.slice(0, count).join('/');
  const rest = parts.slice(count).join('/');
  return { name, subpath: rest ? `./${rest}` : '.' };
}

/** The entry of an `exports` map for ESM loading (conditions node, import, default). */
function exportTarget(entry: unknown): string | null {
  if (typeof entry === 'string') return entry;
  if (Array.isArray(entry)) {
    for (const e of entry) {
      const t = exportTarget(e);
      if (t) return t;
    }
    return null;
  }
  if (entry && typeof entry === 'object') {
    for (const condition of ['node', 'import', 'default']) {
      const value = (entry as Record<string, unknown>)[condition];
      if (value !== undefined) {
        const t = exportTarget(value);
        if (t) return t;
      }
    }
  }
  return null;
}

/** For ESM-only packages, which `require.resolve` refuses. */
function resolveEsmOnly(specifier: string, from: string): string | null {
  const { name, subpath } = packageName(specifier);
  for (let dir = from; ; dir = dirname(dir)) {
    const pkgDir = join(dir, 'node_modules', name);
    const pkgJson = join(pkgDir, 'package.json');
    if (existsSync(pkgJson)) {
      const pkg = JSON.parse(readFileSync(pkgJson, 'utf8')) as { exports?: unknown; module?: string; main?: string };
      let target: string | null = null;
      if (pkg.exports !== undefined) {
        const map = pkg.exports as Record<string, unknown>;
        const isSubpathMap = typeof map === 'object' && map !== null && Object.keys(map).some((k) => k.startsWith('.'));
        target = exportTarget(isSubpathMap ? map[subpath] : subpath === '.' ? map : undefined);
      } else if (subpath === '.') {
        target = pkg.module ?? pkg.main ?? 'index.js';
      } else {
        target = subpath;
      }
      return target ? join(pkgDir, target) : null;
    }
    if (dirname(dir) === dir) return null;
  }
}

export async function importFromCwd(specifier: string): Promise<unknown> {
  if (typeof specifier !== 'string') throw new TypeError(`import: expected a module name, got ${JSON.stringify(specifier)}`);
  if (isBuiltin(specifier)) return import(specifier);
  const cwd = process.cwd();
  let resolved: string | null;
  try {
    resolved = createRequire(join(cwd, '__notebook__.js')).resolve(specifier);
  } catch (error) {
    resolved = (error as NodeJS.ErrnoException).code === 'ERR_PACKAGE_PATH_NOT_EXPORTED' || (error as NodeJS.ErrnoException).code === 'MODULE_NOT_FOUND'
      ? resolveEsmOnly(specifier, cwd)
      : null;
    if (!resolved || !existsSync(resolved)) {
      throw new Error(`import "${specifier}": not found from ${cwd} (install it beside the notebook: npm install ${packageName(specifier).name})`);
    }
  }
  return import(pathToFileURL(resolved).href);
}
