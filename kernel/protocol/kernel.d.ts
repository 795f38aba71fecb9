/**
 * The protocol layer: a dispatch table of message handlers between a Transport and a CellExecutor
 * (both interfaces: messages.ts, executor.ts), each handler bracketed by busy/idle status on iopub.
 * Shell requests run one at a time in arrival order; control requests (interrupt, shutdown,
 * kernel_info) are answered at once, even while a cell runs.
 */
import type { ExecutorFactory } from './executor.js';
import { type Transport } from './messages.js';
export declare const KERNEL_VERSION = "0.1.0";
export declare class Kernel {
    private readonly transport;
    private readonly onShutdown;
    private readonly session;
    private readonly username;
    private readonly executor;
    private readonly history;
    private executionCount;
    /** Parent of iopub output from user code: the shell request being handled (or the last one). */
    private parent;
    private current;
    private pendingInput;
    private readonly shellQueue;
    /** The latest failed cell with stop_on_error: its client's execute requests sent before it are aborted. */
    private failure;
    private shellBusy;
    private readonly shell;
    private readonly control;
    constructor(transport: Transport, createExecutor: ExecutorFactory, onShutdown: (restart: boolean) => void);
    private header;
    private publish;
    private reply;
    private receive;
    private drainShell;
    private dispatch;
    private executorEvents;
    private requestInput;
    private inputReply;
    private kernelInfo;
    private execute;
    private userExpressions;
    /**
     * Whether an execute request was sent (its header's date) by the client of the latest failed cell
     * before that cell failed: sent with it, so aborted with the queue even if it reached the socket
     * after the failure.
     */
    private sentBeforeFailure;
    /**
     * stop_on_error: the execute requests the same client (session) already queued are answered
     * `aborted`, not run. Another client's queued cells do not depend on this one: they still run.
     */
    private abortQueuedExecutions;
    private complete;
    private inspect;
    private isComplete;
    private historyRequest;
    private commInfo;
    private commFromFrontend;
    /** SIGINT from a client using signal-mode interrupts. */
    interruptFromSignal(): void;
    private interrupt;
    private shutdown;
}
