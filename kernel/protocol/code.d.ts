/**
 * Reading code around the cursor for complete / inspect, and is_complete. Jupyter counts cursor
 * positions in Unicode code points; JavaScript strings index UTF-16 units.
 */
export declare function codePointsToIndex(text: string, codePoints: number): number;
export declare function codePointLength(text: string): number;
/** The dotted path being typed before the cursor: `a.b.c` -> path ['a', 'b'], prefix 'c'. */
export declare function completionContext(before: string): {
    path: string[];
    prefix: string;
};
/** The dotted identifier under the cursor (extending to the end of the word). */
export declare function pathAt(code: string, index: number): string[];
export declare const KEYWORDS: string[];
export type Completeness = {
    status: 'complete' | 'invalid';
} | {
    status: 'incomplete';
    indent: string;
};
/** Whether a console front end should run the code or wait for more lines. */
export declare function isComplete(code: string): Promise<Completeness>;
