/**
 * A view's line to its engine workers. A drag fires many input events; only the newest matters.
 * At most one request is in flight; a newer request waiting behind it replaces an older one (the
 * stale one is dropped, never sent), so the plot follows the hand instead of a queue. A request the
 * split plan divides goes out in parts, one per worker, computed side by side and joined on return.
 */
import type { DiagnosticRequest, DiagnosticResult } from '../../contract/protocol.js';
import type { ComputeMessage, ComputeProgress, ComputeReply } from './worker-messages.js';
export interface Outcome {
    request: DiagnosticRequest;
    /** Milliseconds from submit() to the reply, including time waiting behind an earlier request. */
    latency: number;
    /** Milliseconds the engine spent: the slowest part, plus the join. */
    computeMs: number;
    result?: DiagnosticResult;
    error?: {
        name: string;
        message: string;
    };
}
export interface WorkerLike {
    postMessage(message: ComputeMessage): void;
    terminate(): void;
    onmessage: ((event: MessageEvent<ComputeReply | ComputeProgress>) => void) | null;
    onerror: ((event: ErrorEvent) => void) | null;
}
/** How a request is shared among workers: into how many parts, the part requests, and the join. */
export interface SplitPlan {
    parts(request: DiagnosticRequest): number;
    partRequest(request: DiagnosticRequest, index: number, count: number): DiagnosticRequest;
    join(request: DiagnosticRequest, parts: DiagnosticResult[]): DiagnosticResult;
}
/** Every request whole, on one worker. */
export declare const WHOLE: SplitPlan;
export declare class LatestWinsClient {
    private readonly spawn;
    private readonly deliver;
    private readonly plan;
    /** Progress of the request in flight (a phase map), as a fraction of the points planned. */
    private readonly progress;
    private workers;
    private inFlight;
    private waiting;
    private nextId;
    /** Requests replaced before they were sent (for tests and the bench). */
    dropped: number;
    constructor(spawn: () => WorkerLike, deliver: (outcome: Outcome) => void, plan?: SplitPlan, 
    /** Progress of the request in flight (a phase map), as a fraction of the points planned. */
    progress?: (fraction: number, request: DiagnosticRequest) => void);
    /**
     * Stops the request in flight and drops any waiting: its workers are ended (a computation cannot
     * be interrupted inside a worker) and started afresh for the next request. Returns the stopped request.
     */
    stop(): DiagnosticRequest | null;
    submit(request: DiagnosticRequest): void;
    /**
     * Computes `request` without delivering it, when nothing else is pending: the workers start and
     * compile the model, and their JIT warms up, before the hand starts dragging.
     */
    warm(request: DiagnosticRequest): void;
    /** True while a request is computing or waiting. */
    get busy(): boolean;
    dispose(): void;
    private send;
    private ensureWorker;
    private progressed;
    private receive;
    private finish;
    /** A worker that dies (bad bundle, out of memory) is replaced on the next request. */
    private crashed;
    private sendWaiting;
}
