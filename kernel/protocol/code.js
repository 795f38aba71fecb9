/**
 * Reading code around the cursor for complete / inspect, and is_complete. Jupyter counts cursor
 * positions in Unicode code points; JavaScript strings index UTF-16 units.
 */
import { transform } from 'esbuild';
export function codePointsToIndex(text, codePoints) {
    let index = 0;
    for (let n = 0; n < codePoints && index < text.length; n++)
        index += text.codePointAt(index) > 0xffff ? 2 : 1;
    return index;
}
export function codePointLength(text) {
    return Array.from(text).length;
}
/** The dotted path being typed before the cursor: `a.b.c` -> path ['a', 'b'], prefix 'c'. */
export function completionContext(before) {
    const m = /((?:[A-Za-z_$][\w$]*\s*\??\.\s*)*)([A-Za-z_$][\w$]*)?$/.exec(before);
    const chain = m?.[1] ?? '';
    const path = chain.split('.').map((p) => p.replace(/[\s?]/g, '')).filter(Boolean);
    return { path, prefix: m?.[2] ?? '' };
}
/** The dotted identifier under the cursor (extending to the end of the word). */
export function pathAt(code, index) {
    let end = index;
    while (end < code.length && /[\w$]/.test(code[end]))
        end++;
    const m = /((?:[A-Za-z_$][\w$]*\s*\??\.\s*)*[A-Za-z_$][\w$]*)$/.exec(code.slice(0, end));
    if (!m) {
        // The cursor may sit just after a call's '(' : inspect the function being called.
        const call = /([A-Za-z_$][\w$.]*)\s*\(\s*$/.exec(code.slice(0, index));
        return call ? call[1].split('.').filter(Boolean) : [];
    }
    return m[1].split('.').map((p) => p.replace(/[\s?]/g, '')).filter(Boolean);
}
export const KEYWORDS = [
    'abstract', 'as', 'async', 'await', 'break', 'case', 'catch', 'class', 'const', 'continue', 'debugger', 'declare', 'default',
    'delete', 'do', 'else', 'enum', 'export', 'extends', 'false', 'finally', 'for', 'from', 'function', 'if', 'implements',
    'import', 'in', 'instanceof', 'interface', 'keyof', 'let', 'new', 'null', 'of', 'readonly', 'return', 'satisfies', 'static',
    'super', 'switch', 'this', 'throw', 'true', 'try', 'type', 'typeof', 'undefined', 'var', 'void', 'while', 'yield',
];
/** Whether a console front end should run the code or wait for more lines. */
export async function isComplete(code) {
    if (code.trim() === '')
        return { status: 'complete' };
    try {
        await transform(code, { loader: 'ts', logLevel: 'silent' });
        return { status: 'complete' };
    }
    catch (error) {
        const first = error.errors?.[0];
        if (!first)
            throw error;
        const lines = code.split('\n');
        const line = first.location?.line ?? 0;
        const column = first.location?.column ?? 0;
        const atEnd = line === lines.length && column >= lines[lines.length - 1].length;
        // esbuild reports an open template literal as an unterminated string: an odd backtick count.
        const opensTemplate = first.text === 'Unterminated string literal' && (code.match(/`/g)?.length ?? 0) % 2 === 1;
        const unfinished = /end of file|to terminate multi-line comment|Unterminated template/.test(first.text) || opensTemplate;
        if (unfinished || (atEnd && !/Unterminated string literal/.test(first.text))) {
            const depth = [...code].reduce((d, c) => d + ('([{'.includes(c) ? 1 : ')]}'.includes(c) ? -1 : 0), 0);
            return { status: 'incomplete', indent: '  '.repeat(Math.max(0, depth)) };
        }
        return { status: 'invalid' };
    }
}
//# sourceMappingURL=code.js.map