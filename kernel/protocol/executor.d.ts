/**
 * What the protocol layer asks of whatever runs cells, and what it hears back. The message
 * handlers (kernel.ts) depend on this interface only: executor/host.ts implements it for
 * TypeScript cells in a child process; the handlers' unit tests drive it with a small in-memory one.
 */
import type { Dict } from './messages.js';
/** A MIME bundle with its metadata: an execute result or a display. */
export interface DisplayOutput {
    data: Dict;
    metadata: Dict;
}
export interface CommPayload {
    commId: string;
    data: Dict;
    metadata: Dict;
    buffers: Uint8Array[];
}
export type CommEvent = ({
    type: 'comm_open';
    targetName: string;
} & CommPayload) | ({
    type: 'comm_msg' | 'comm_close';
} & CommPayload);
/** A failed cell as the front end shows it (the fields of an `error` message). */
export interface CellError {
    ename: string;
    evalue: string;
    traceback: string[];
}
export type ExecuteOutcome = {
    status: 'ok';
    result: DisplayOutput | null;
} | ({
    status: 'error';
} & CellError);
/** Where the executor's output goes (the protocol layer turns these into iopub and stdin messages). */
export interface ExecutorEvents {
    stream(name: 'stdout' | 'stderr', text: string): void;
    display(output: DisplayOutput, displayId: string | null, update: boolean): void;
    clearOutput(wait: boolean): void;
    comm(event: CommEvent): void;
    /** A cell asks for input; rejects when the front end cannot provide it. */
    input(prompt: string, password: boolean): Promise<string>;
}
export interface CellExecutor {
    /** Runs one cell; one at a time. `label` names it in tracebacks (e.g. `In [3]`). */
    execute(source: string, options: {
        silent: boolean;
        label: string;
    }): Promise<ExecuteOutcome>;
    /** Asks the running cell to stop; true if a cell was running. State is kept. */
    interrupt(): boolean;
    /** Names in scope (empty path) or members of a dotted path; null if they cannot be read now. */
    names(path: string[]): Promise<string[] | null>;
    /** Names always in scope besides the user's own (offered when completing a bare name). */
    readonly engineNames: readonly string[];
    /** The text shown for a dotted path (its documentation or a summary of its value), or null if unknown. */
    inspect(path: string[]): Promise<string | null>;
    /** A comm message from the front end; resolves once handled. */
    comm(event: CommEvent): Promise<void>;
    /** Open comms by id, with their target names (for comm_info). */
    comms(): ReadonlyMap<string, string>;
    /** Ends the executor; no call follows. */
    shutdown(): Promise<void>;
}
/** Makes the executor once the protocol layer knows where its output goes. */
export type ExecutorFactory = (events: ExecutorEvents) => CellExecutor;
