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
import { SourceMap } from 'node:module';
/** Name of the worker's runtime object that rewritten code calls into. */
export declare const RUNTIME = "__chernel";
export interface CompiledCell {
    code: string;
    /** esbuild's source map (script line -> cell line). */
    map: SourceMap;
    /** The cell ends with an expression whose value is the cell's result. */
    hasValue: boolean;
}
/** A cell that does not parse; `line` and `column` are 1-based positions in the cell. */
export declare class CellSyntaxError extends Error {
    readonly line: number;
    readonly column: number;
    constructor(message: string, line: number, column: number);
}
export declare function compileCell(source: string, filename: string): Promise<CompiledCell>;
/** Cell line (1-based) for a script position (1-based line and column), or null. */
export declare function mapLine(map: SourceMap, line: number, column: number): number | null;
export declare function rewriteTopLevel(js: string): {
    code: string;
    hasValue: boolean;
    declared: string[];
};
