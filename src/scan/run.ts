/**
 * Running a phase map: the schedule of `advanceSweep`, its pending points sent to an executor,
 * progress reported, stoppable, and checkpointed as plain JSON so a stopped or killed sweep resumes
 * without computing any finished point again. File I/O is the host's business
 * (`cluster/node-workers.ts` writes checkpoint files); here a checkpoint is a value handed to
 * `onCheckpoint`.
 */
import { InterruptedError } from '../interrupt.js';
import { ModelError, valueText } from '../model/errors.js';
import { InProcessExecutor, checkStopped, PointError, type PointFunctionFactory, type StopSignal, type SweepExecutor } from './executor.js';
import { pointsToRecords, recordsToPoints, type PointRecord } from './record.js';
import {
  advanceSweep,
  pointKey,
  pointTarget,
  requestFingerprint,
  sweptParams,
  validatePhaseMapRequest,
  type PhaseMapRequest,
  type PhaseMapResult,
  type PointOutcome,
  type SweepStage,
} from './sweep.js';

export type { PointRecord };

export const CHECKPOINT_FORMAT = 'chernel.sweep-checkpoint';
export const CHECKPOINT_VERSION = 1;

/** Everything a sweep needs to resume: the finished points, tied to the request by its fingerprint. */
export interface SweepCheckpoint {
  format: typeof CHECKPOINT_FORMAT;
  version: typeof CHECKPOINT_VERSION;
  fingerprint: string;
  points: PointRecord[];
}

export interface SweepProgress extends SweepStage {
  /** Points known (computed now or taken from the checkpoint) out of those scheduled so far. */
  done: number;
  total: number;
  /** Points computed by this run, and points reused from the checkpoint. */
  computed: number;
  reused: number;
}

export interface RunPhaseMapOptions {
  /** Where points are computed; default: this thread, with `pointFunction`. */
  executor?: SweepExecutor;
  /** The point function for the default in-process executor. */
  pointFunction?: PointFunctionFactory;
  signal?: StopSignal;
  onProgress?: (progress: SweepProgress) => void;
  /** Resume from this checkpoint (it must belong to the same request). */
  checkpoint?: SweepCheckpoint;
  /** Receives a checkpoint every `checkpointEvery` computed points, after each batch, and when stopped. */
  onCheckpoint?: (checkpoint: SweepCheckpoint) => void;
  checkpointEvery?: number;
}

/** Read the points of a checkpoint, refusing one that belongs to another request or is malformed. */
export function checkpointPoints(checkpoint: unknown, request: PhaseMapRequest): Map<string, PointOutcome> {
  if (checkpoint === null || typeof checkpoint !== 'object') throw new ModelError('checkpoint', `expected a checkpoint object. Value: ${valueText(checkpoint)}`);
  const c = checkpoint as Partial<SweepCheckpoint>;
  if (c.format !== CHECKPOINT_FORMAT) throw new ModelError('checkpoint.format', `expected "${CHECKPOINT_FORMAT}". Value: ${valueText(c.format)}`);
  if (c.version !== CHECKPOINT_VERSION) throw new ModelError('checkpoint.version', `this engine reads version ${CHECKPOINT_VERSION}. Value: ${valueText(c.version)}`);
  const expected = requestFingerprint(request);
  if (c.fingerprint !== expected) {
    throw new ModelError('checkpoint.fingerprint', `the checkpoint belongs to another sweep (${valueText(c.fingerprint)}; this request is ${expected})`);
  }
  if (!Array.isArray(c.points)) throw new ModelError('checkpoint.points', `expected an array. Value: ${valueText(c.points)}`);
  return recordsToPoints(c.points, request.axes.length, 'checkpoint.points');
}

export function makeCheckpoint(request: PhaseMapRequest, known: ReadonlyMap<string, PointOutcome>): SweepCheckpoint {
  return { format: CHECKPOINT_FORMAT, version: CHECKPOINT_VERSION, fingerprint: requestFingerprint(request), points: pointsToRecords(known) };
}

/**
 * Compute a phase map (validated first: bad input fails before any point is computed). Resolves
 * to the finished map; rejects with InterruptedError when stopped, after a last checkpoint.
 */
export async function runPhaseMap(request: PhaseMapRequest, options: RunPhaseMapOptions = {}): Promise<PhaseMapResult> {
  validatePhaseMapRequest(request);
  const known = options.checkpoint !== undefined ? checkpointPoints(options.checkpoint, request) : new Map<string, PointOutcome>();
  let executor = options.executor;
  if (executor === undefined) {
    if (options.pointFunction === undefined) throw new ModelError('executor', 'give an executor or a pointFunction to compute the points with');
    executor = new InProcessExecutor(options.pointFunction);
  }
  const target = pointTarget(request);
  const every = Math.max(1, options.checkpointEvery ?? 64);
  const reused = known.size;
  let computed = 0;
  let sinceCheckpoint = 0;
  const checkpoint = () => {
    sinceCheckpoint = 0;
    options.onCheckpoint?.(makeCheckpoint(request, known));
  };
  try {
    for (;;) {
      checkStopped(options.signal);
      const step = advanceSweep(request, known);
      if (step.done) return step.result;
      const batch = step.pending;
      const total = known.size + batch.length;
      const report = () => options.onProgress?.({ stage: step.stage, round: step.round, done: known.size, total, computed, reused });
      report();
      await executor.evaluate(
        target,
        batch.map((coords) => sweptParams(request.axes, coords)),
        {
          signal: options.signal,
          onResult: (index, outcome) => {
            known.set(pointKey(batch[index]), outcome);
            computed++;
            report();
            if (++sinceCheckpoint >= every) checkpoint();
          },
        },
      );
      if (options.onCheckpoint !== undefined && sinceCheckpoint > 0) checkpoint();
    }
  } catch (err) {
    // Stopped, a failed point, a crashed worker: what finished is kept either way.
    if (sinceCheckpoint > 0) checkpoint();
    throw err;
  } finally {
    if (options.executor === undefined) await executor.close();
  }
}

/**
 * The same phase map, synchronously in this thread (what `compute({kind: 'phase-map'})` runs).
 * Stops through the host's interrupt flag (`checkInterrupt`).
 */
export function phaseMapSync(request: PhaseMapRequest, factory: PointFunctionFactory): PhaseMapResult {
  validatePhaseMapRequest(request);
  const fn = factory(pointTarget(request));
  const known = new Map<string, PointOutcome>();
  for (;;) {
    const step = advanceSweep(request, known);
    if (step.done) return step.result;
    for (const coords of step.pending) {
      checkStopped(undefined);
      const params = sweptParams(request.axes, coords);
      try {
        known.set(pointKey(coords), fn(params));
      } catch (err) {
        if (err instanceof InterruptedError) throw err;
        throw new PointError(params, err);
      }
    }
  }
}
