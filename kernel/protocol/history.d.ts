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
export declare const SESSION = 1;
type Row = [number, number, string] | [number, number, [string, string | null]];
export declare class History {
    private readonly entries;
    add(entry: HistoryEntry): void;
    setOutput(line: number, output: string): void;
    query(content: Record<string, unknown>): Row[];
}
export {};
