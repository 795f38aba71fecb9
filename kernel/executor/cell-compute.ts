/**
 * The `compute` and `computeAsync` a cell sees: the engine's, plus two things a notebook needs.
 *   - A computation that runs longer than a second shows a progress bar by itself, with the time
 *     left: a phase map counts its points; `computeAsync` reports its fraction; any other
 *     computation, whose share done is unknown, shows how long it has run (the engine's loops
 *     call back at every interrupt check). The bar stays, at 100%, saying how long it took.
 *   - The result remembers its request (under REQUEST_OF, not enumerable), so its figure knows the
 *     model's units, zone and parameter values.
 */
import { randomUUID } from 'node:crypto';
import type { ComputeAsyncOptions, ComputeOptions, DiagnosticRequest, DiagnosticResult } from '../../src/index.js';
import { onInterruptCheck } from '../../src/interrupt.js';
import { REQUEST_OF } from '../display/index.js';
import { progressBundle, type ProgressState } from '../display/progress.js';
import type { WorkerToHost } from './channel.js';

/** How long a computation runs before its bar shows, and how often the bar is redrawn. */
export const SHOW_AFTER_MS = 1000;
const REDRAW_MS = 250;

export interface Engine {
  compute(request: DiagnosticRequest, options?: ComputeOptions): DiagnosticResult;
  computeAsync(request: DiagnosticRequest, options?: ComputeAsyncOptions): Promise<DiagnosticResult>;
}

export function seconds(ms: number): string {
  const s = Math.round(ms / 1000);
  return s < 60 ? `${s} s` : `${Math.floor(s / 60)} min ${String(s % 60).padStart(2, '0')} s`;
}

/** A bar that appears only once the work has run SHOW_AFTER_MS, and estimates the time left. */
export class SilentProgress {
  private readonly started = Date.now();
  private readonly displayId = randomUUID();
  private shown = false;
  private lastDrawn = 0;
  private readonly state: ProgressState;

  constructor(
    private readonly post: (message: WorkerToHost) => void,
    label: string,
    private readonly now: () => number = Date.now,
  ) {
    this.state = { label, done: 0, total: 1, finished: false };
  }

  /** Still running, share done unknown: shows the time so far (and an empty bar). */
  alive(): void {
    const elapsed = this.now() - this.started;
    if (elapsed < SHOW_AFTER_MS || this.now() - this.lastDrawn < REDRAW_MS) return;
    this.state.total = null;
    this.state.note = `${seconds(elapsed)} so far`;
    this.draw();
  }

  /** `done` of `total` (a fraction when total is 1). */
  report(done: number, total = 1): void {
    const elapsed = this.now() - this.started;
    this.state.done = done;
    this.state.total = total;
    if (elapsed < SHOW_AFTER_MS || this.now() - this.lastDrawn < REDRAW_MS) return;
    const fraction = total > 0 ? done / total : 0;
    this.state.note = fraction > 0.01 && fraction < 1 ? `about ${seconds((elapsed * (1 - fraction)) / fraction)} left` : `${seconds(elapsed)} so far`;
    this.draw();
  }

  /** The work is over: a bar that showed says so, and how long it took. */
  finish(): void {
    if (!this.shown) return;
    this.state.finished = true;
    this.state.total ??= 1;
    this.state.done = this.state.total;
    this.state.note = `in ${seconds(this.now() - this.started)}`;
    this.draw();
  }

  private draw(): void {
    this.lastDrawn = this.now();
    this.post({ type: 'display', output: progressBundle(this.state), displayId: this.displayId, update: this.shown });
    this.shown = true;
  }
}

function remember<T extends DiagnosticResult>(result: T, request: DiagnosticRequest): T {
  if (result !== null && typeof result === 'object') Object.defineProperty(result, REQUEST_OF, { value: request, enumerable: false, configurable: true });
  return result;
}

/** Scope entries replacing the engine's `compute` and `computeAsync` in cells. */
export function cellCompute(engine: Engine, post: (message: WorkerToHost) => void): Pick<Engine, 'compute' | 'computeAsync'> {
  function compute(request: DiagnosticRequest): DiagnosticResult {
    if (request === null || typeof request !== 'object' || request.kind !== 'phase-map') {
      const bar = new SilentProgress(post, String(request?.kind ?? 'computation'));
      onInterruptCheck(() => bar.alive());
      try {
        return remember(engine.compute(request), request);
      } finally {
        onInterruptCheck(null);
        bar.finish();
      }
    }
    // A phase map point by point, each point counted against the grid (boundary refinement adds a few more).
    const bar = new SilentProgress(post, `phase map of ${String(request.quantity ?? 'quantity')}`);
    try {
      const result = engine.compute(request, { onPoint: (done, planned) => bar.report(done, Math.max(planned, done + 1)) });
      return remember(result, request);
    } finally {
      bar.finish();
    }
  }

  async function computeAsync(request: DiagnosticRequest, options: ComputeAsyncOptions = {}): Promise<DiagnosticResult> {
    if (options.onProgress !== undefined) return remember(await engine.computeAsync(request, options), request);
    const bar = new SilentProgress(post, String(request?.kind ?? 'computation'));
    // A phase map reports its fraction; anything else only that it is still running.
    const sweep = request?.kind === 'phase-map';
    if (!sweep) onInterruptCheck(() => bar.alive());
    try {
      return remember(await engine.computeAsync(request, sweep ? { ...options, onProgress: (fraction) => bar.report(fraction) } : options), request);
    } finally {
      if (!sweep) onInterruptCheck(null);
      bar.finish();
    }
  }

  return { compute, computeAsync };
}
