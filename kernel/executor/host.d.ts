/**
 * The kernel-side of the executor: compiles cells, runs them in a child process (cell-process.ts,
 * whose worker thread holds the notebook's state), relays what they print and display, and handles
 * interrupts and deaths:
 *
 *   - an interrupt sets the cell process's shared flag (engine loops stop at their next
 *     `checkInterrupt()`) and rejects an awaiting cell; the worker and its state stay;
 *   - a cell that still runs GRACE_MS later ignores interrupts (a plain `while (true) {}`): the
 *     cell process is killed and a fresh one started, and the cell's error says that state was reset;
 *   - a cell process that dies (out of memory, a fatal V8 error) is replaced the same way, and the
 *     error names the cause. The kernel's own process never runs user code, so it never dies of it.
 */
import type { CellExecutor, CommEvent, ExecuteOutcome, ExecutorEvents } from '../protocol/executor.js';
/** How long a cell may ignore an interrupt before its worker is replaced. */
export declare const GRACE_MS = 2000;
export declare class ExecutionHost implements CellExecutor {
    private readonly events;
    private worker;
    private ready;
    /** Why the current cell process is dying, when it said so before exiting. */
    private fatalReason;
    /** Why the cells' state was lost while no cell ran, until the next cell is told. */
    private lostBetweenCells;
    private readonly cells;
    private running;
    private killTimer;
    private nextId;
    private serial;
    private readonly answers;
    private readonly openComms;
    private streamBuffer;
    private streamTimer;
    private stopping;
    /** Names the engine exports (for completion); filled when the worker is ready. */
    engineNames: string[];
    constructor(events: ExecutorEvents);
    private spawn;
    /** Ends the current worker and starts a fresh one; a running cell fails with `reason`. */
    private replaceWorker;
    private receive;
    private bufferStream;
    private flushStream;
    private finish;
    private clearKillTimer;
    private post;
    /** Runs one cell. `label` names it in tracebacks (e.g. `In [3]`). */
    execute(source: string, options: {
        silent: boolean;
        label: string;
    }): Promise<ExecuteOutcome>;
    /** True if a cell was running and has been asked to stop. */
    interrupt(): boolean;
    private ask;
    /** Names in scope (empty path) or members of a dotted path; null if the worker is busy. */
    names(path: string[]): Promise<string[] | null>;
    /** An engine export shows its documentation (from the engine's type declarations), a user's value its summary. */
    inspect(path: string[]): Promise<string | null>;
    /** A comm message from the front end, for the worker's comm registry; resolves once handled. */
    comm(event: CommEvent): Promise<void>;
    /** Open comms by id, with their target names (for comm_info). */
    comms(): ReadonlyMap<string, string>;
    shutdown(): Promise<void>;
}
/** The cause of a cell process's death that it could not report itself (V8 aborts at once). */
export declare function deathCause(code: number | null, signal: NodeJS.Signals | null, stderr: string): string;
