/**
 * Input history of this kernel session, for history_request: `tail`, `range` and `search`
 * (glob patterns with `*` and `?`, matched against the whole input, as Jupyter clients expect).
 */

export interface HistoryEntry {
  line: number;
  input: string;
  output: string | null;
}

/** This kernel's session number in history replies (history is kept for the current session). */
export const SESSION = 1;

type Row = [number, number, string] | [number, number, [string, string | null]];

function globToRegExp(pattern: string): RegExp {
  const body = pattern.replace(/[.+^${}()|[\]\\]/g, '\\$&').replace(/\*/g, '[\\s\\S]*').replace(/\?/g, '[\\s\\S]');
  return new RegExp(`^${body}$`);
}

export class History {
  private readonly entries: HistoryEntry[] = [];

  add(entry: HistoryEntry): void {
    this.entries.push(entry);
  }

  setOutput(line: number, output: string): void {
    for (let i = this.entries.length - 1; i >= 0; i--) {
      if (this.entries[i].line === line) {
        this.entries[i].output = output;
        return;
      }
    }
  }

  query(content: Record<string, unknown>): Row[] {
    const output = content.output === true;
    const row = (e: HistoryEntry): Row => (output ? [SESSION, e.line, [e.input, e.output]] : [SESSION, e.line, e.input]);
    const n = typeof content.n === 'number' && content.n >= 0 ? Math.floor(content.n) : null;
    switch (content.hist_access_type) {
      case 'tail':
        return (n === null ? this.entries : this.entries.slice(-n || this.entries.length)).map(row);
      case 'range': {
        const session = typeof content.session === 'number' ? content.session : 0;
        if (session !== 0 && session !== SESSION) return [];
        const start = typeof content.start === 'number' ? content.start : 1;
        const stop = typeof content.stop === 'number' ? content.stop : Infinity;
        return this.entries.filter((e) => e.line >= start && e.line < stop).map(row);
      }
      case 'search': {
        const pattern = globToRegExp(typeof content.pattern === 'string' ? content.pattern : '*');
        let found = this.entries.filter((e) => pattern.test(e.input));
        if (content.unique === true) {
          const seen = new Set<string>();
          found = found.reverse().filter((e) => !seen.has(e.input) && seen.add(e.input) !== undefined).reverse();
        }
        return (n === null || n === 0 ? found : found.slice(-n)).map(row);
      }
      default:
        throw new Error(`history_request: hist_access_type: expected "tail", "range" or "search", got ${JSON.stringify(content.hist_access_type)}`);
    }
  }
}
