/**
 * Executors compute batches of sweep points. One interface, three homes: in this thread
 * (`InProcessExecutor`, here), Node worker threads (`cluster/node-workers.ts`) and browser Web
 * Workers (`widgets/src/web-workers.ts`). The sweep never knows which one it runs on, and all give
 * identical numbers because every one of them calls the same point function.
 */
import { InterruptedError, checkInterrupt } from '../interrupt.js';
import { valueText } from '../model/errors.js';
import type { ParameterValues } from '../model/spec.js';
import type { PointFunction, PointOutcome, PointTarget } from './sweep.js';

/** What stops a sweep: an AbortSignal fits, so does any `{aborted}` flag. */
export interface StopSignal {
  readonly aborted: boolean;
  addEventListener?(type: 'abort', listener: () => void): void;
  removeEventListener?(type: 'abort', listener: () => void): void;
}

export interface EvaluateHooks {
  signal?: StopSignal;
  /** Called once per point as it finishes (in any order), with its index in the batch. */
  onResult(index: number, outcome: PointOutcome): void;
}

export interface SweepExecutor {
  /** How many points it computes at once. */
  readonly concurrency: number;
  /**
   * Compute every point of the batch (swept parameter values) for the target. Resolves when all are
   * reported; rejects with InterruptedError when stopped (the points reported so far stand), or
   * with a PointError naming the point that failed.
   */
  evaluate(target: PointTarget, batch: readonly ParameterValues[], hooks: EvaluateHooks): Promise<void>;
  /** Release threads or workers; the executor is not used afterwards. */
  close(): Promise<void>;
}

/** Builds the point function for a target: by default the engine's diagnostics (`point.ts`). */
export type PointFunctionFactory = (target: PointTarget) => PointFunction;

/** A point that could not be computed: names the point, keeps the original error as `cause`. */
export class PointError extends Error {
  readonly params: ParameterValues;
  constructor(params: ParameterValues, cause: unknown) {
    const reason = cause instanceof Error ? `${cause.name}: ${cause.message}` : String(cause);
    super(`sweep point ${valueText(params)}: ${reason}`, { cause });
    this.name = 'PointError';
    this.params = params;
  }
}

/** Throw InterruptedError when the signal is set or the host's interrupt flag is raised. */
export function checkStopped(signal: StopSignal | undefined): void {
  if (signal?.aborted) throw new InterruptedError();
  checkInterrupt();
}

type TimerHost = { setTimeout?: (fn: () => void, ms: number) => unknown };

/** Let the host's event loop run (timers, messages, an abort() from a button). */
export function yieldToHost(): Promise<void> {
  const schedule = (globalThis as TimerHost).setTimeout;
  return new Promise((resolve) => (schedule ? schedule(resolve, 0) : resolve()));
}

/** Computes points one after another in the calling thread. */
export class InProcessExecutor implements SweepExecutor {
  readonly concurrency = 1;
  private readonly factory: PointFunctionFactory;
  private cached: { target: PointTarget; fn: PointFunction } | null = null;

  /** `factory` makes the point function: the engine's `pointFunction`, or your own. */
  constructor(factory: PointFunctionFactory) {
    this.factory = factory;
  }

  async evaluate(target: PointTarget, batch: readonly ParameterValues[], hooks: EvaluateHooks): Promise<void> {
    if (this.cached?.target !== target) this.cached = { target, fn: this.factory(target) };
    const fn = this.cached.fn;
    let lastYield = Date.now();
    for (let n = 0; n < batch.length; n++) {
      checkStopped(hooks.signal);
      let outcome: PointOutcome;
      try {
        outcome = fn(batch[n]);
      } catch (err) {
        if (err instanceof InterruptedError) throw err;
        throw new PointError(batch[n], err);
      }
      hooks.onResult(n, outcome);
      // Yield now and then so an abort() or a progress display gets its turn.
      if (Date.now() - lastYield > 50) {
        await yieldToHost();
        lastYield = Date.now();
      }
    }
  }

  async close(): Promise<void> {
    this.cached = null;
  }
}
