/**
 * A view's line to its engine workers. A drag fires many input events; only the newest matters.
 * At most one request is in flight; a newer request waiting behind it replaces an older one (the
 * stale one is dropped, never sent), so the plot follows the pointer instead of a queue. A request the
 * split plan divides goes out in parts, one per worker, computed side by side and joined on return.
 */
import type { ViewRequest, ViewResult } from '../../contract/protocol.js';
import type { ComputeMessage, ComputeProgress, ComputeReply } from './worker-messages.js';

export interface Outcome {
  request: ViewRequest;
  /** Milliseconds from submit() to the reply, including time waiting behind an earlier request. */
  latency: number;
  /** Milliseconds the engine spent: the slowest part, plus the join. */
  computeMs: number;
  result?: ViewResult;
  error?: { name: string; message: string };
}

export interface WorkerLike {
  postMessage(message: ComputeMessage): void;
  terminate(): void;
  onmessage: ((event: MessageEvent<ComputeReply | ComputeProgress>) => void) | null;
  onerror: ((event: ErrorEvent) => void) | null;
}

/** How a request is shared among workers: into how many parts, the part requests, and the join. */
export interface SplitPlan {
  parts(request: ViewRequest): number;
  partRequest(request: ViewRequest, index: number, count: number): ViewRequest;
  join(request: ViewRequest, parts: ViewResult[]): ViewResult;
}

/** Every request whole, on one worker. */
export const WHOLE: SplitPlan = {
  parts: () => 1,
  partRequest: (request) => request,
  join: (_request, parts) => parts[0],
};

interface Pending {
  request: ViewRequest;
  submitted: number;
}

interface InFlight extends Pending {
  /** A warm-up: computed, never delivered. */
  silent: boolean;
  /** Message id of each part (index = part = worker). */
  ids: number[];
  replies: (ComputeReply | undefined)[];
  remaining: number;
}

export class LatestWinsClient {
  private workers: (WorkerLike | null)[] = [];
  private inFlight: InFlight | null = null;
  private waiting: Pending | null = null;
  private nextId = 1;
  /** Requests replaced before they were sent (for tests and the bench). */
  dropped = 0;

  constructor(
    private readonly spawn: () => WorkerLike,
    private readonly deliver: (outcome: Outcome) => void,
    private readonly plan: SplitPlan = WHOLE,
    /** Progress of the request in flight (a phase map), as a fraction of the points planned. */
    private readonly progress: (fraction: number, request: ViewRequest) => void = () => undefined,
  ) {}

  /**
   * Stops the request in flight and drops any waiting: its workers are ended (a computation cannot
   * be interrupted inside a worker) and started afresh for the next request. Returns the stopped request.
   */
  stop(): ViewRequest | null {
    const stopped = this.inFlight?.silent === false ? this.inFlight.request : (this.waiting?.request ?? null);
    for (const worker of this.workers) worker?.terminate();
    this.workers = [];
    this.inFlight = null;
    this.waiting = null;
    return stopped;
  }

  submit(request: ViewRequest): void {
    const pending = { request, submitted: performance.now() };
    if (this.inFlight === null) {
      this.send(pending);
    } else {
      if (this.waiting !== null) this.dropped++;
      this.waiting = pending;
    }
  }

  /**
   * Computes `request` without delivering it, when nothing else is pending: the workers start and
   * compile the model, and their JIT warms up, before the pointer starts dragging.
   */
  warm(request: ViewRequest): void {
    if (this.inFlight === null && this.waiting === null) this.send({ request, submitted: performance.now() }, true);
  }

  /** True while a request is computing or waiting. */
  get busy(): boolean {
    return this.inFlight !== null || this.waiting !== null;
  }

  dispose(): void {
    for (const worker of this.workers) worker?.terminate();
    this.workers = [];
    this.inFlight = null;
    this.waiting = null;
  }

  private send(pending: Pending, silent = false): void {
    const count = Math.max(1, this.plan.parts(pending.request));
    const ids = Array.from({ length: count }, () => this.nextId++);
    this.inFlight = { ...pending, silent, ids, replies: new Array(count).fill(undefined), remaining: count };
    ids.forEach((id, index) => {
      const request = count === 1 ? pending.request : this.plan.partRequest(pending.request, index, count);
      this.ensureWorker(index).postMessage({ id, request });
    });
  }

  private ensureWorker(index: number): WorkerLike {
    const existing = this.workers[index];
    if (existing) return existing;
    const worker = this.spawn();
    worker.onmessage = (event) => {
      const data = event.data;
      if ('progress' in data) this.progressed(data);
      else this.receive(data);
    };
    worker.onerror = (event) => this.crashed(worker, event.message || 'the engine worker failed to start');
    this.workers[index] = worker;
    return worker;
  }

  private progressed(message: ComputeProgress): void {
    const current = this.inFlight;
    if (current === null || current.silent || !current.ids.includes(message.id)) return;
    const { done, total } = message.progress;
    this.progress(total > 0 ? Math.min(1, done / total) : 0, current.request);
  }

  private receive(reply: ComputeReply): void {
    const current = this.inFlight;
    const part = current === null ? -1 : current.ids.indexOf(reply.id);
    if (current === null || part < 0 || current.replies[part] !== undefined) return;
    current.replies[part] = reply;
    if (--current.remaining > 0) return;
    this.inFlight = null;
    const outcome = current.silent ? null : this.finish(current, current.replies as ComputeReply[]);
    // Start the next computation before drawing this one: the workers compute while the page draws.
    this.sendWaiting();
    if (outcome !== null) this.deliver(outcome);
  }

  private finish(current: InFlight, replies: ComputeReply[]): Outcome {
    const latency = () => performance.now() - current.submitted;
    const failed = replies.find((r) => !r.ok);
    if (failed !== undefined && !failed.ok) return { request: current.request, latency: latency(), computeMs: 0, error: failed.error };
    const results = replies.map((r) => (r.ok ? r.result : null)) as ViewResult[];
    const slowest = Math.max(...replies.map((r) => (r.ok ? r.ms : 0)));
    const started = performance.now();
    try {
      const result = results.length === 1 ? results[0] : this.plan.join(current.request, results);
      return { request: current.request, latency: latency(), computeMs: slowest + performance.now() - started, result };
    } catch (err) {
      const error = err instanceof Error ? { name: err.name, message: err.message } : { name: 'Error', message: String(err) };
      return { request: current.request, latency: latency(), computeMs: 0, error };
    }
  }

  /** A worker that dies (bad bundle, out of memory) is replaced on the next request. */
  private crashed(worker: WorkerLike, message: string): void {
    const index = this.workers.indexOf(worker);
    if (index < 0) return;
    worker.terminate();
    this.workers[index] = null;
    const current = this.inFlight;
    this.inFlight = null;
    if (current !== null && !current.silent) {
      this.deliver({
        request: current.request,
        latency: performance.now() - current.submitted,
        computeMs: 0,
        error: { name: 'WorkerError', message },
      });
    }
    this.sendWaiting();
  }

  private sendWaiting(): void {
    const next = this.waiting;
    this.waiting = null;
    if (next !== null) this.send(next);
  }
}
