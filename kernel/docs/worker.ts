/**
 * Builds the engine's documentation index (signature + doc comment of every export of
 * src/index) from its type declarations with the TypeScript compiler API. Runs once, in its own
 * thread, so that loading the compiler never stalls the kernel.
 */

import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { parentPort } from 'node:worker_threads';
import type * as TS from 'typescript';

function entryFile(): string | null {
  for (const candidate of ['../../src/index.d.ts', '../../../src/index.ts']) {
    const path = fileURLToPath(new URL(candidate, import.meta.url));
    if (existsSync(path)) return path;
  }
  return null;
}

async function buildIndex(): Promise<Record<string, string>> {
  const ts = ((await import('typescript')) as unknown as { default: typeof TS }).default;
  const root = entryFile();
  if (!root) return {};
  const program = ts.createProgram([root], { noEmit: true, skipLibCheck: true, types: [], target: ts.ScriptTarget.ES2022 });
  const checker = program.getTypeChecker();
  const source = program.getSourceFile(root);
  const moduleSymbol = source && checker.getSymbolAtLocation(source);
  if (!moduleSymbol) return {};
  const index: Record<string, string> = {};
  for (const exported of checker.getExportsOfModule(moduleSymbol)) {
    const symbol = exported.flags & ts.SymbolFlags.Alias ? checker.getAliasedSymbol(exported) : exported;
    if (!(symbol.flags & ts.SymbolFlags.Value)) continue; // types are not in cell scope at run time
    const name = exported.getName();
    const declaration = symbol.valueDeclaration ?? symbol.declarations?.[0] ?? source;
    const type = checker.getTypeOfSymbolAtLocation(symbol, declaration);
    const lines: string[] = [];
    if (symbol.flags & ts.SymbolFlags.Class) {
      for (const s of type.getConstructSignatures()) lines.push(`new ${name}${checker.signatureToString(s)}`);
    } else if (type.getCallSignatures().length > 0) {
      for (const s of type.getCallSignatures()) lines.push(`${name}${checker.signatureToString(s)}`);
    } else {
      lines.push(`${name}: ${checker.typeToString(type)}`);
    }
    let doc = ts.displayPartsToString(symbol.getDocumentationComment(checker));
    if (!doc) doc = type.getCallSignatures().map((s) => ts.displayPartsToString(s.getDocumentationComment(checker))).find(Boolean) ?? '';
    const tags = symbol.getJsDocTags(checker).map((t) => `@${t.name} ${ts.displayPartsToString(t.text)}`.trim());
    index[name] = [lines.join('\n'), doc, tags.join('\n')].filter(Boolean).join('\n\n');
  }
  return index;
}

buildIndex().then(
  (index) => parentPort?.postMessage({ index }),
  (error: Error) => parentPort?.postMessage({ error: error.message }),
);
