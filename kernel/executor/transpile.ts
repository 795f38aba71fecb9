/**
 * A cell's TypeScript becomes a script that the worker runs with `vm.runInThisContext`:
 *
 *   1. esbuild strips the types (keeping every value import: a name imported in one cell is used
 *      in the next) and gives a source map back to the cell's lines;
 *   2. the top-level statements are rewritten so that what a cell declares outlives it:
 *      `const a = 1` -> `a = 1` on the worker's global object (declared first), functions are
 *      copied there, `class C {}` -> `C = class C {}`, `import` -> an `await` of a loader that
 *      resolves packages from the kernel's working directory. Declaring a name again simply
 *      assigns it, which is what notebook users expect;
 *   3. the whole cell is wrapped in an async arrow (top-level await); the last expression
 *      statement, if any, is returned as the cell's value.
 *
 * Edits never add or remove a line break, so line numbers of the script equal those of esbuild's
 * output and the source map still applies.
 */

import * as acorn from 'acorn';
import { transform, type TransformFailure } from 'esbuild';
import { SourceMap } from 'node:module';

/** Name of the worker's runtime object that rewritten code calls into. */
export const RUNTIME = '__chernel';

export interface CompiledCell {
  code: string;
  /** esbuild's source map (script line -> cell line). */
  map: SourceMap;
  /** The cell ends with an expression whose value is the cell's result. */
  hasValue: boolean;
}

/** A cell that does not parse; `line` and `column` are 1-based positions in the cell. */
export class CellSyntaxError extends Error {
  constructor(
    message: string,
    readonly line: number,
    readonly column: number,
  ) {
    super(message);
    this.name = 'SyntaxError';
  }
}

export async function compileCell(source: string, filename: string): Promise<CompiledCell> {
  let js: string;
  let rawMap: string;
  try {
    const out = await transform(source, {
      loader: 'ts',
      target: 'es2022',
      sourcemap: 'external',
      sourcefile: filename,
      tsconfigRaw: { compilerOptions: { verbatimModuleSyntax: true, useDefineForClassFields: true } },
      logLevel: 'silent',
    });
    js = out.code;
    rawMap = out.map;
  } catch (error) {
    const first = (error as TransformFailure).errors?.[0];
    if (!first) throw error;
    throw new CellSyntaxError(first.text, first.location?.line ?? 1, (first.location?.column ?? 0) + 1);
  }
  const map = new SourceMap(JSON.parse(rawMap));
  const tail = await droppedConstantTail(source, js, map);
  if (tail !== null) js = `${js};\n${tail};\n`;
  try {
    const { code, hasValue } = rewriteTopLevel(js);
    return { code, map, hasValue };
  } catch (error) {
    if (!(error instanceof SyntaxError)) throw error;
    const loc = (error as SyntaxError & { loc?: { line: number; column: number } }).loc;
    const line = loc ? mapLine(map, loc.line, loc.column + 1) ?? loc.line : 1;
    throw new CellSyntaxError(error.message.replace(/ \(\d+:\d+\)$/, ''), line, 1);
  }
}

function lastStatement(code: string): acorn.Statement | acorn.ModuleDeclaration | null {
  try {
    const program = acorn.parse(code, { ecmaVersion: 'latest', sourceType: 'module', allowAwaitOutsideFunction: true });
    return program.body.at(-1) ?? null;
  } catch {
    return null;
  }
}

/**
 * esbuild drops expression statements it folds to a constant (`-1`, `!0`, `'a' + 'b'`), so a
 * cell ending with one would show no value. Find such a final statement in the source (the whole
 * cell, or its last lines after the last statement esbuild kept, when they parse as JavaScript)
 * and return its text; it has no side effects and cannot throw, so it is simply re-appended.
 */
async function droppedConstantTail(source: string, js: string, map: SourceMap): Promise<string | null> {
  const kept = lastStatement(js);
  const keptLine = kept ? (mapLine(map, js.slice(0, kept.start).split('\n').length, 1) ?? 0) : 0;
  const lines = source.split('\n');
  const starts = [0, ...Array.from({ length: lines.length - 1 }, (_, i) => i + 1).filter((i) => i >= keptLine)];
  for (const start of starts) {
    const suffix = lines.slice(start).join('\n');
    const last = lastStatement(suffix);
    if (last?.type !== 'ExpressionStatement') continue;
    const text = suffix.slice(last.expression.start, last.expression.end);
    const alone = await transform(text, { loader: 'ts', logLevel: 'silent' }).catch(() => null);
    return alone && alone.code.trim() === '' ? text : null;
  }
  return null;
}

/** Cell line (1-based) for a script position (1-based line and column), or null. */
export function mapLine(map: SourceMap, line: number, column: number): number | null {
  let entry = map.findEntry(line - 1, Math.max(0, column - 1)) as Partial<{ generatedLine: number; originalLine: number }>;
  if (entry.generatedLine !== line - 1) entry = map.findEntry(line - 1, 1 << 30) as typeof entry;
  if (entry.generatedLine !== line - 1 || entry.originalLine === undefined) return null;
  return entry.originalLine + 1;
}

interface Edit {
  at: number;
  end: number;
  text: string;
}

type AnyNode = acorn.Node & Record<string, unknown>;

/** Names bound by a declaration pattern (`a`, `{b, c: [d]}`, `...rest`, defaults). */
function boundNames(pattern: acorn.Pattern, into: string[]): void {
  switch (pattern.type) {
    case 'Identifier':
      into.push(pattern.name);
      break;
    case 'ObjectPattern':
      for (const prop of pattern.properties) boundNames(prop.type === 'RestElement' ? prop.argument : prop.value, into);
      break;
    case 'ArrayPattern':
      for (const element of pattern.elements) if (element) boundNames(element, into);
      break;
    case 'AssignmentPattern':
      boundNames(pattern.left, into);
      break;
    case 'RestElement':
      boundNames(pattern.argument, into);
      break;
    default:
      break;
  }
}

/** Every `import(...)` expression, however deep, goes through the runtime's loader. */
function rewriteDynamicImports(node: unknown, edits: Edit[]): void {
  if (Array.isArray(node)) {
    for (const child of node) rewriteDynamicImports(child, edits);
    return;
  }
  if (typeof node !== 'object' || node === null || typeof (node as AnyNode).type !== 'string') return;
  const n = node as AnyNode;
  if (n.type === 'ImportExpression') edits.push({ at: n.start, end: n.start + 'import'.length, text: `${RUNTIME}.import` });
  for (const key of Object.keys(n)) {
    if (key !== 'type' && key !== 'start' && key !== 'end') rewriteDynamicImports(n[key], edits);
  }
}

export function rewriteTopLevel(js: string): { code: string; hasValue: boolean; declared: string[] } {
  const program = acorn.parse(js, { ecmaVersion: 'latest', sourceType: 'module', allowAwaitOutsideFunction: true });
  const edits: Edit[] = [];
  const declared: string[] = [];
  const functions: string[] = [];

  const declareVariables = (decl: acorn.VariableDeclaration): void => {
    edits.push({ at: decl.start, end: decl.start + decl.kind.length, text: '' });
    decl.declarations.forEach((d, i) => {
      boundNames(d.id, declared);
      if (d.id.type === 'Identifier') {
        if (!d.init) edits.push({ at: d.id.end, end: d.id.end, text: ' = undefined' });
      } else if (d.init) {
        edits.push({ at: d.id.start, end: d.id.start, text: '(' }, { at: d.init.end, end: d.init.end, text: ')' });
      }
      const next = decl.declarations[i + 1];
      if (next) {
        const comma = js.indexOf(',', d.end);
        if (comma >= 0 && comma < next.start) edits.push({ at: comma, end: comma + 1, text: ';' });
      }
    });
  };

  const declareStatement = (node: acorn.Statement | acorn.Declaration | acorn.Expression): boolean => {
    switch (node.type) {
      case 'VariableDeclaration':
        declareVariables(node);
        return true;
      case 'FunctionDeclaration':
        if (node.id) functions.push(node.id.name);
        return true;
      case 'ClassDeclaration':
        if (node.id) {
          declared.push(node.id.name);
          edits.push({ at: node.start, end: node.start, text: `${node.id.name} = ` }, { at: node.end, end: node.end, text: ';' });
        }
        return true;
      default:
        return false;
    }
  };

  for (const statement of program.body) {
    rewriteDynamicImports(statement, edits);
    switch (statement.type) {
      case 'ImportDeclaration': {
        const source = JSON.stringify(statement.source.value);
        const load = `await ${RUNTIME}.import(${source})`;
        const namespace = statement.specifiers.find((s) => s.type === 'ImportNamespaceSpecifier');
        const named: string[] = [];
        for (const s of statement.specifiers) {
          declared.push(s.local.name);
          if (s.type === 'ImportDefaultSpecifier') named.push(`default: ${s.local.name}`);
          if (s.type === 'ImportSpecifier') {
            const imported = s.imported.type === 'Identifier' ? s.imported.name : String(s.imported.value);
            named.push(`${JSON.stringify(imported)}: ${s.local.name}`);
          }
        }
        let text: string;
        if (namespace) text = `${namespace.local.name} = ${load};` + (named.length ? ` ({${named.join(', ')}} = ${namespace.local.name});` : '');
        else if (named.length) text = `({${named.join(', ')}} = ${load});`;
        else text = `${load};`;
        edits.push({ at: statement.start, end: statement.end, text });
        break;
      }
      case 'ExportNamedDeclaration':
        if (statement.declaration) {
          edits.push({ at: statement.start, end: statement.declaration.start, text: '' });
          declareStatement(statement.declaration);
        } else {
          edits.push({ at: statement.start, end: statement.end, text: '' });
        }
        break;
      case 'ExportDefaultDeclaration': {
        const declaration = statement.declaration;
        const named = (declaration.type === 'FunctionDeclaration' || declaration.type === 'ClassDeclaration') && declaration.id;
        if (named) {
          edits.push({ at: statement.start, end: declaration.start, text: '' });
          declareStatement(declaration);
        } else {
          edits.push({ at: statement.start, end: declaration.start, text: ';(' }, { at: declaration.end, end: declaration.end, text: ')' });
        }
        break;
      }
      case 'ExportAllDeclaration':
        edits.push({ at: statement.start, end: statement.end, text: '' });
        break;
      default:
        declareStatement(statement);
    }
  }

  const last = program.body.at(-1);
  const hasValue = last?.type === 'ExpressionStatement';
  if (last?.type === 'ExpressionStatement') {
    // From the statement's start: a parenthesised expression starts after its '('.
    edits.push({ at: last.start, end: last.start, text: 'return (' }, { at: last.expression.end, end: last.expression.end, text: ')' });
  }

  // Apply from the end so earlier offsets stay valid. At one offset, replace first, then insert in
  // reverse order of creation, so that insertions end up in creation order before the replacement.
  const ordered = edits
    .map((e, i) => ({ ...e, i }))
    .sort((a, b) => b.at - a.at || Number(b.end > b.at) - Number(a.end > a.at) || b.i - a.i);
  let body = js;
  for (const e of ordered) body = body.slice(0, e.at) + e.text + body.slice(e.end);

  const unique = [...new Set(declared)];
  const prefix =
    `(async () => { "use strict"; ` +
    (unique.length ? `${RUNTIME}.declare(${JSON.stringify(unique)}); ` : '') +
    (functions.length ? `${RUNTIME}.hoist({${functions.join(', ')}}); ` : '');
  return { code: `${prefix}${body}\n})()`, hasValue, declared: [...unique, ...functions] };
}
