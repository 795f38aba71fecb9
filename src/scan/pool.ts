/**
 * A pool of workers computing sweep points, written once for both hosts: Node worker threads and
 * browser Web Workers differ only in how a worker is started and messaged (`WorkerPort`), which the
 * adapters `cluster/node-workers.ts` and `widgets/src/web-workers.ts` supply. The worker side is
 * `serveSweepWorker`.
 *
 * Points go out in small chunks to whichever worker is free, so fast and slow regions of a phase
 * diagram balance themselves. Stopping raises a shared interrupt flag that every worker's engine
 * loops check (`checkInterrupt`); without SharedArrayBuffer (a browser page that is not
 * cross-origin isolated) the workers are terminated and started afresh instead.
 */
import { InterruptedError, installInterruptFlag } from '../interrupt.js';
import type { ParameterValues } from '../model/spec.js';
import { PointError, checkStopped, type EvaluateHooks, type PointFunctionFactory, type SweepExecutor } from './executor.js';
import type { PointFunction, PointOutcome, PointTarget } from './sweep.js';

/** Messages to a worker. */
export type ToSweepWorker =
  | { type: 'init'; flag: Int32Array | null; pointModule: string | null }
  | { type: 'chunk'; run: number; target: PointTarget | null; indices: number[]; params: ParameterValues[] };

/**
 * Messages from a worker: one per chunk, the points done (their whole outcomes: value, gap, flag,
 * standard error; structured cloning keeps NaN) and, if it stopped early, why.
 */
export interface FromSweepWorker {
  type: 'chunk-done';
  run: number;
  indices: number[];
  outcomes: PointOutcome[];
  failure: { index: number; name: string; message: string } | null;
}

/** One worker as the pool sees it. */
export interface WorkerPort {
  post(message: ToSweepWorker): void;
  /** Set (replacing any earlier) the handlers; `onCrash` is for a worker that died, not a failed point. */
  listen(onMessage: (message: FromSweepWorker) => void, onCrash: (error: Error) => void): void;
  terminate(): Promise<void>;
  /** Keep the host alive while a batch runs (Node); idle workers must not hold a process open. */
  hold?(busy: boolean): void;
}

export interface WorkerPoolOptions {
  /** Number of workers (default: the host's core count, as the adapter reports it). */
  workers: number;
  /** Starts one worker. */
  start: () => WorkerPort;
  /**
   * URL of an ES module exporting `pointFunction(target): PointFunction` to use in the workers
   * instead of the engine's diagnostics (custom quantities, tests).
   */
  pointModule?: string;
}

interface Slot {
  port: WorkerPort;
  /** The run whose target this worker holds. */
  run: number;
  busy: boolean;
}

const SAB = (globalThis as { SharedArrayBuffer?: SharedArrayBufferConstructor }).SharedArrayBuffer;

export class WorkerPoolExecutor implements SweepExecutor {
  readonly concurrency: number;
  private readonly options: WorkerPoolOptions;
  private readonly flag: Int32Array | null;
  private slots: Slot[] = [];
  private runs = 0;
  private active = false;

  constructor(options: WorkerPoolOptions) {
    if (!Number.isInteger(options.workers) || options.workers < 1) throw new RangeError(`workers: expected a whole number >= 1. Value: ${options.workers}`);
    this.options = options;
    this.concurrency = options.workers;
    this.flag = SAB !== undefined ? new Int32Array(new SAB(4)) : null;
  }

  private startSlots(): void {
    while (this.slots.length < this.concurrency) {
      const port = this.options.start();
      port.post({ type: 'init', flag: this.flag, pointModule: this.options.pointModule ?? null });
      this.slots.push({ port, run: -1, busy: false });
    }
  }

  evaluate(target: PointTarget, batch: readonly ParameterValues[], hooks: EvaluateHooks): Promise<void> {
    if (this.active) return Promise.reject(new Error('this executor is already running a batch'));
    checkStopped(hooks.signal);
    if (batch.length === 0) return Promise.resolve();
    this.startSlots();
    this.active = true;
    this.slots.forEach((s) => s.port.hold?.(true));
    const run = ++this.runs;
    const size = Math.max(1, Math.min(32, Math.ceil(batch.length / (this.concurrency * 8))));
    const chunks: number[][] = [];
    for (let s = 0; s < batch.length; s += size) chunks.push(Array.from({ length: Math.min(size, batch.length - s) }, (_, n) => s + n));

    return new Promise<void>((resolve, reject) => {
      let inFlight = 0;
      let failure: Error | null = null;
      let finished = false;
      const slots = this.slots;
      const stop = (why: Error) => {
        if (failure === null) failure = why;
        if (this.flag !== null) Atomics.store(this.flag, 0, 1);
      };
      const onAbort = () => stop(new InterruptedError());
      hooks.signal?.addEventListener?.('abort', onAbort);
      const finish = async () => {
        if (finished) return;
        finished = true;
        hooks.signal?.removeEventListener?.('abort', onAbort);
        if (this.flag !== null) Atomics.store(this.flag, 0, 0);
        this.active = false;
        this.slots.forEach((s) => s.port.hold?.(false));
        if (failure === null) return resolve();
        if (this.flag === null && failure instanceof InterruptedError) await this.restart();
        reject(failure);
      };
      const dispatch = (slot: Slot) => {
        const next = failure === null ? chunks.shift() : undefined;
        if (next === undefined) {
          if (inFlight === 0) void finish();
          return;
        }
        slot.busy = true;
        inFlight++;
        slot.port.post({ type: 'chunk', run, target: slot.run === run ? null : target, indices: next, params: next.map((i) => batch[i]) });
        slot.run = run;
      };
      slots.forEach((slot) => {
        slot.port.listen(
          (message) => {
            if (message.run !== run) return;
            slot.busy = false;
            inFlight--;
            try {
              message.indices.forEach((index, n) => hooks.onResult(index, message.outcomes[n]));
            } catch (err) {
              stop(err as Error);
            }
            if (message.failure !== null) {
              const f = message.failure;
              stop(f.name === 'InterruptedError' ? new InterruptedError() : new PointError(batch[f.index], Object.assign(new Error(f.message), { name: f.name })));
            }
            try {
              checkStopped(hooks.signal);
            } catch (err) {
              stop(err as Error);
            }
            dispatch(slot);
          },
          (error) => {
            // A crashed worker is replaced before the next batch; this batch fails.
            this.slots = this.slots.filter((s) => s !== slot);
            if (slot.busy) inFlight--;
            stop(new Error(`sweep worker crashed: ${error.message}`));
            if (inFlight === 0) void finish();
          },
        );
      });
      // The flag may still be raised by the host's own interrupt of an earlier batch.
      if (this.flag !== null) Atomics.store(this.flag, 0, 0);
      slots.forEach(dispatch);
    });
  }

  /** Replace every worker (the way to stop them when no shared flag is available). */
  private async restart(): Promise<void> {
    const old = this.slots;
    this.slots = [];
    await Promise.all(old.map((s) => s.port.terminate()));
  }

  async close(): Promise<void> {
    await this.restart();
  }
}

/**
 * The worker side: handle the pool's messages with `post` for replies. `loadPointModule` imports
 * a module given as `pointModule` (hosts import differently); `engine` is the default factory.
 */
export function serveSweepWorker(
  post: (message: FromSweepWorker) => void,
  engine: () => Promise<PointFunctionFactory>,
  loadPointModule: (url: string) => Promise<{ pointFunction?: PointFunctionFactory }>,
): (message: ToSweepWorker) => Promise<void> {
  let factory: Promise<PointFunctionFactory> | null = null;
  let current: { run: number; fn: PointFunction } | null = null;
  return async (message) => {
    if (message.type === 'init') {
      installInterruptFlag(message.flag);
      const url = message.pointModule;
      factory =
        url === null
          ? engine()
          : loadPointModule(url).then((m) => {
              if (typeof m.pointFunction !== 'function') throw new Error(`${url} does not export pointFunction(target)`);
              return m.pointFunction;
            });
      return;
    }
    const outcomes: PointOutcome[] = [];
    let failure: FromSweepWorker['failure'] = null;
    try {
      if (factory === null) throw new Error('sweep worker used before init');
      if (message.target !== null || current?.run !== message.run) {
        if (message.target === null) throw new Error(`sweep worker has no target for run ${message.run}`);
        current = { run: message.run, fn: (await factory)(message.target) };
      }
    } catch (err) {
      const e = err as Error;
      post({ type: 'chunk-done', run: message.run, indices: [], outcomes, failure: { index: message.indices[0], name: e.name, message: e.message } });
      return;
    }
    for (let n = 0; n < message.indices.length; n++) {
      try {
        checkStopped(undefined);
        // Only the outcome's own fields travel (a point module may return more, not all of it cloneable).
        const { value, gap, doubtful, standardError, members } = current.fn(message.params[n]);
        outcomes.push({
          value, gap, ...(doubtful === true ? { doubtful } : {}), ...(standardError !== undefined ? { standardError } : {}),
          ...(members !== undefined ? { members: { first: members.first, values: [...members.values] } } : {}),
        });
      } catch (err) {
        const e = err as Error;
        failure = { index: message.indices[n], name: e?.name ?? 'Error', message: e?.message ?? String(err) };
        break;
      }
    }
    post({ type: 'chunk-done', run: message.run, indices: message.indices.slice(0, outcomes.length), outcomes, failure });
  };
}
