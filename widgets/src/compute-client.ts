/**
 * A view's line to its engine worker. A drag fires many input events; only the newest matters.
 * At most one request is in flight; a newer request waiting behind it replaces an older one (the
 * stale one is dropped, never sent), so the plot follows the hand instead of a queue.
 */
import type { ComputeMessage, ComputeReply, DiagnosticRequest, DiagnosticResult } from './protocol.js';

export interface Outcome {
  request: DiagnosticRequest;
  /** Milliseconds from submit() to the reply, including time waiting behind an earlier request. */
  latency: number;
  /** Milliseconds the engine spent. */
  computeMs: number;
  result?: DiagnosticResult;
  error?: { name: string; message: string };
}

export interface WorkerLike {
  postMessage(message: ComputeMessage): void;
  terminate(): void;
  onmessage: ((event: MessageEvent<ComputeReply>) => void) | null;
  onerror: ((event: ErrorEvent) => void) | null;
}

interface Pending {
  id: number;
  request: DiagnosticRequest;
  submitted: number;
}

export class LatestWinsClient {
  private worker: WorkerLike | null = null;
  private inFlight: Pending | null = null;
  private waiting: Pending | null = null;
  private nextId = 1;
  /** Requests replaced before they were sent (for tests and the bench). */
  dropped = 0;

  constructor(
    private readonly spawn: () => WorkerLike,
    private readonly deliver: (outcome: Outcome) => void,
  ) {}

  submit(request: DiagnosticRequest): void {
    const pending = { id: this.nextId++, request, submitted: performance.now() };
    if (this.inFlight === null) {
      this.send(pending);
    } else {
      if (this.waiting !== null) this.dropped++;
      this.waiting = pending;
    }
  }

  /** True while a request is computing or waiting. */
  get busy(): boolean {
    return this.inFlight !== null || this.waiting !== null;
  }

  dispose(): void {
    this.worker?.terminate();
    this.worker = null;
    this.inFlight = null;
    this.waiting = null;
  }

  private send(pending: Pending): void {
    const worker = this.ensureWorker();
    this.inFlight = pending;
    worker.postMessage({ id: pending.id, request: pending.request });
  }

  private ensureWorker(): WorkerLike {
    if (this.worker === null) {
      const worker = this.spawn();
      worker.onmessage = (event) => this.receive(event.data);
      worker.onerror = (event) => this.crashed(event.message || 'the engine worker failed to start');
      this.worker = worker;
    }
    return this.worker;
  }

  private receive(reply: ComputeReply): void {
    const current = this.inFlight;
    if (current === null || reply.id !== current.id) return;
    this.inFlight = null;
    const latency = performance.now() - current.submitted;
    const outcome: Outcome = reply.ok
      ? { request: current.request, latency, computeMs: reply.ms, result: reply.result }
      : { request: current.request, latency, computeMs: 0, error: reply.error };
    // Start the next computation before drawing this one: the worker computes while the page draws.
    this.sendWaiting();
    this.deliver(outcome);
  }

  /** A worker that dies (bad bundle, out of memory) is replaced on the next request. */
  private crashed(message: string): void {
    const current = this.inFlight;
    this.worker?.terminate();
    this.worker = null;
    this.inFlight = null;
    if (current !== null) {
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
