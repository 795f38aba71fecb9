/**
 * Input history of this kernel session, for history_request: `tail`, `range` and `search`
 * (glob patterns with `*` and `?`, matched against the whole input, as Jupyter clients expect).
 */
/** This kernel's session number in history replies (history is kept for the current session). */
export const SESSION = 1;
function globToRegExp(pattern) {
    const body = pattern.replace(/[.+^${}()|[\]\\]/g, '\\$&').replace(/\*/g, '[\\s\\S]*').replace(/\?/g, '[\\s\\S]');
    return new RegExp(`^${body}$`);
}
export class History {
    entries = [];
    add(entry) {
        this.entries.push(entry);
    }
    setOutput(line, output) {
        for (let i = this.entries.length - 1; i >= 0; i--) {
            if (this.entries[i].line === line) {
                this.entries[i].output = output;
                return;
            }
        }
    }
    query(content) {
        const output = content.output === true;
        const row = (e) => (output ? [SESSION, e.line, [e.input, e.output]] : [SESSION, e.line, e.input]);
        const n = typeof content.n === 'number' && content.n >= 0 ? Math.floor(content.n) : null;
        switch (content.hist_access_type) {
            case 'tail':
                return (n === null ? this.entries : this.entries.slice(-n || this.entries.length)).map(row);
            case 'range': {
                const session = typeof content.session === 'number' ? content.session : 0;
                if (session !== 0 && session !== SESSION)
                    return [];
                const start = typeof content.start === 'number' ? content.start : 1;
                const stop = typeof content.stop === 'number' ? content.stop : Infinity;
                return this.entries.filter((e) => e.line >= start && e.line < stop).map(row);
            }
            case 'search': {
                const pattern = globToRegExp(typeof content.pattern === 'string' ? content.pattern : '*');
                let found = this.entries.filter((e) => pattern.test(e.input));
                if (content.unique === true) {
                    const seen = new Set();
                    found = found.reverse().filter((e) => !seen.has(e.input) && seen.add(e.input) !== undefined).reverse();
                }
                return (n === null || n === 0 ? found : found.slice(-n)).map(row);
            }
            default:
                throw new Error(`history_request: hist_access_type: expected "tail", "range" or "search", got ${JSON.stringify(content.hist_access_type)}`);
        }
    }
}
//# sourceMappingURL=history.js.map