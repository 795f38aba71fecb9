/**
 * Sweeps as files, for clusters: a plan is one round of a phase map (the grid, or one bisection
 * round) written as plain, versioned JSON; shard i of N computes every N-th point of the round and
 * writes its own output; merging checks every shard output (format, plan, count, checksum) and
 * either finishes the phase map or writes the plan of the next round. All pure: the file I/O and
 * the Slurm side live in cluster/.
 */
import { ModelError, valueText } from '../model/errors.js';
import { canonicalJson, digest } from './checksum.js';
import { PointError, type SweepExecutor } from './executor.js';
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
} from './sweep.js';

export const PLAN_FORMAT = 'chernel.sweep-plan';
export const SHARD_FORMAT = 'chernel.sweep-shard';
export const SWEEP_FILE_VERSION = 1;

/** One round of a sweep, self-contained: the request, the points known from earlier rounds, this round's points. */
export interface SweepPlan {
  format: typeof PLAN_FORMAT;
  version: typeof SWEEP_FILE_VERSION;
  /** The whole sweep (a phase-map request). */
  request: PhaseMapRequest;
  /** Fingerprint of `request` (shard outputs of another sweep are refused). */
  fingerprint: string;
  /** 0: the grid; r >= 1: bisection round r. */
  round: number;
  stage: 'grid' | 'refine';
  /** This round's points (swept coordinates in axis order). */
  points: number[][];
  /** Points computed in earlier rounds. */
  known: PointRecord[];
}

/** A point that failed in a shard, with the error message. */
export interface ShardFailure {
  coords: number[];
  error: string;
}

/** What shard `shard` of `shards` wrote: its finished points so far; `complete` once all are done. */
export interface ShardOutput {
  format: typeof SHARD_FORMAT;
  version: typeof SWEEP_FILE_VERSION;
  /** `planId` of the plan it computed. */
  plan: string;
  round: number;
  shard: number;
  shards: number;
  /** Points assigned to this shard. */
  assigned: number;
  complete: boolean;
  /** records.length + failures.length, written separately so truncation is caught even if JSON parses. */
  count: number;
  records: PointRecord[];
  failures: ShardFailure[];
  /** digest of the canonical JSON of every other field. */
  checksum: string;
}

/** Identity of a plan file's content (a round of a sweep). */
export function planId(plan: SweepPlan): string {
  return digest(canonicalJson(plan));
}

/** The plan of the next round for `request` given the points known so far, or null when the sweep is finished. */
export function sweepPlan(request: PhaseMapRequest, known: ReadonlyMap<string, PointOutcome> = new Map()): SweepPlan | null {
  validatePhaseMapRequest(request);
  const step = advanceSweep(request, known);
  if (step.done) return null;
  return {
    format: PLAN_FORMAT,
    version: SWEEP_FILE_VERSION,
    request,
    fingerprint: requestFingerprint(request),
    round: step.round,
    stage: step.stage,
    points: step.pending,
    known: pointsToRecords(known),
  };
}

function prefixed<T>(prefix: string, run: () => T): T {
  try {
    return run();
  } catch (err) {
    if (err instanceof ModelError) throw new ModelError(`${prefix}.${err.field}`, err.message.slice(err.field.length + 2));
    throw err;
  }
}

/**
 * Check a plan read from a file before any compute: format, version, the request (model, axes,
 * grid), and that its points are exactly the round its known points call for. Errors name the field.
 */
export function validatePlan(plan: unknown): SweepPlan {
  if (plan === null || typeof plan !== 'object' || Array.isArray(plan)) throw new ModelError('plan', `expected a sweep plan object. Value: ${valueText(plan)}`);
  const p = plan as Partial<SweepPlan>;
  if (p.format !== PLAN_FORMAT) throw new ModelError('format', `expected "${PLAN_FORMAT}". Value: ${valueText(p.format)}`);
  if (p.version !== SWEEP_FILE_VERSION) throw new ModelError('version', `this engine reads version ${SWEEP_FILE_VERSION}. Value: ${valueText(p.version)}`);
  const request = prefixed('request', () => validatePhaseMapRequest(p.request));
  if (p.fingerprint !== requestFingerprint(request)) throw new ModelError('fingerprint', `does not match the request (the plan was edited?). Value: ${valueText(p.fingerprint)}`);
  if (!Array.isArray(p.known)) throw new ModelError('known', `expected an array of point records. Value: ${valueText(p.known)}`);
  const known = recordsToPoints(p.known, request.axes.length, 'known');
  const step = advanceSweep(request, known);
  if (step.done) throw new ModelError('points', 'the known points already finish this sweep: there is nothing to compute');
  if (p.round !== step.round || p.stage !== step.stage) {
    throw new ModelError('round', `the known points call for ${step.stage} round ${step.round}. Value: ${valueText(p.round)} (${valueText(p.stage)})`);
  }
  if (!Array.isArray(p.points) || canonicalJson(p.points) !== canonicalJson(step.pending)) {
    throw new ModelError('points', `expected the ${step.pending.length} points of ${step.stage} round ${step.round}. Value: ${valueText(p.points)}`);
  }
  return p as SweepPlan;
}

/** Check a shard index and count (from arguments or the scheduler's environment), naming the field. */
export function checkShard(shard: unknown, shards: unknown): { shard: number; shards: number } {
  if (typeof shards !== 'number' || !Number.isInteger(shards) || shards < 1) throw new ModelError('shards', `expected a whole number >= 1. Value: ${valueText(shards)}`);
  if (typeof shard !== 'number' || !Number.isInteger(shard) || shard < 0 || shard >= shards) {
    throw new ModelError('shard', `expected a shard index from 0 to ${shards - 1}. Value: ${valueText(shard)}`);
  }
  return { shard, shards };
}

/** The points of one shard: every `shards`-th point from `shard` (strided, so costly regions spread out). */
export function shardPoints(plan: SweepPlan, shard: number, shards: number): number[][] {
  checkShard(shard, shards);
  return plan.points.filter((_, n) => n % shards === shard);
}

function checksumOf(output: Omit<ShardOutput, 'checksum'>): string {
  return digest(canonicalJson(output));
}

export function makeShardOutput(plan: SweepPlan, shard: number, shards: number, records: PointRecord[], failures: ShardFailure[]): ShardOutput {
  const assigned = shardPoints(plan, shard, shards).length;
  const body: Omit<ShardOutput, 'checksum'> = {
    format: SHARD_FORMAT,
    version: SWEEP_FILE_VERSION,
    plan: planId(plan),
    round: plan.round,
    shard,
    shards,
    assigned,
    complete: records.length + failures.length === assigned,
    count: records.length + failures.length,
    records,
    failures,
  };
  return { ...body, checksum: checksumOf(body) };
}

/**
 * Read a shard output for a plan: returns its points and failures, or a list of problems (never a
 * partial trust: a shard output with any problem contributes nothing).
 */
export function readShardOutput(
  output: unknown,
  plan: SweepPlan,
  shard: number,
  shards: number,
): { ok: true; known: Map<string, PointOutcome>; failures: ShardFailure[]; complete: boolean } | { ok: false; problem: string } {
  if (output === null || typeof output !== 'object') return { ok: false, problem: `not a shard output object` };
  const o = output as Partial<ShardOutput>;
  if (o.format !== SHARD_FORMAT || o.version !== SWEEP_FILE_VERSION) return { ok: false, problem: `format/version ${valueText(o.format)}/${valueText(o.version)}, expected "${SHARD_FORMAT}"/${SWEEP_FILE_VERSION}` };
  if (o.plan !== planId(plan)) return { ok: false, problem: `computed for another plan (${valueText(o.plan)}, this plan is ${planId(plan)})` };
  if (o.shard !== shard || o.shards !== shards) return { ok: false, problem: `is shard ${valueText(o.shard)} of ${valueText(o.shards)}, expected ${shard} of ${shards}` };
  if (!Array.isArray(o.records) || !Array.isArray(o.failures)) return { ok: false, problem: 'records or failures missing' };
  if (o.count !== o.records.length + o.failures.length) return { ok: false, problem: `record count ${valueText(o.count)} but ${o.records.length + o.failures.length} records present (truncated or edited)` };
  const { checksum, ...body } = o as ShardOutput;
  if (checksum !== checksumOf(body)) return { ok: false, problem: `checksum mismatch (file ${valueText(checksum)}, content ${checksumOf(body)}): corrupt or edited` };
  let known: Map<string, PointOutcome>;
  try {
    known = recordsToPoints(o.records, plan.request.axes.length, 'records');
  } catch (err) {
    return { ok: false, problem: (err as Error).message };
  }
  const assigned = new Set(shardPoints(plan, shard, shards).map(pointKey));
  for (const key of known.keys()) if (!assigned.has(key)) return { ok: false, problem: `holds point (${key}), which is not assigned to this shard` };
  for (const f of o.failures) if (!assigned.has(pointKey(f.coords))) return { ok: false, problem: `reports a failure at (${valueText(f.coords)}), which is not assigned to this shard` };
  return { ok: true, known, failures: o.failures, complete: o.complete === true && known.size + o.failures.length === assigned.size };
}

export interface MergeReport {
  /** True when every point of the round is present (no missing, failed or corrupt shard). */
  complete: boolean;
  /** Earlier rounds' points and every good shard's points. */
  known: Map<string, PointOutcome>;
  /** Points with no result, by shard (a corrupt or absent shard lists all its points). */
  missing: { shard: number; coords: number[] }[];
  failed: { shard: number; coords: number[]; error: string }[];
  /** Shard outputs that were refused, and why. */
  rejected: { shard: number; problem: string }[];
  /** The finished phase map, when this was the last round. */
  result: PhaseMapResult | null;
  /** The next round's plan, when refinement continues. */
  next: SweepPlan | null;
}

/**
 * Merge the shard outputs of one round (`outputs[i]` is shard i's parsed file, or undefined when
 * absent, or an Error when it could not be read or parsed). Nothing doubtful is merged silently:
 * any missing, failed or rejected point leaves `complete` false and neither `result` nor `next`.
 */
export function mergeShards(plan: SweepPlan, outputs: readonly unknown[]): MergeReport {
  const shards = outputs.length;
  checkShard(0, shards);
  const known = recordsToPoints(plan.known, plan.request.axes.length, 'known');
  const report: MergeReport = { complete: false, known, missing: [], failed: [], rejected: [], result: null, next: null };
  outputs.forEach((output, shard) => {
    const assigned = shardPoints(plan, shard, shards);
    const read =
      output === undefined
        ? { ok: false as const, problem: 'no output file' }
        : output instanceof Error
          ? { ok: false as const, problem: output.message }
          : readShardOutput(output, plan, shard, shards);
    if (!read.ok) {
      report.rejected.push({ shard, problem: read.problem });
      assigned.forEach((coords) => report.missing.push({ shard, coords }));
      return;
    }
    const failedKeys = new Set(read.failures.map((f) => pointKey(f.coords)));
    read.failures.forEach((f) => report.failed.push({ shard, coords: f.coords, error: f.error }));
    for (const coords of assigned) {
      const key = pointKey(coords);
      const outcome = read.known.get(key);
      if (outcome !== undefined) known.set(key, outcome);
      else if (!failedKeys.has(key)) report.missing.push({ shard, coords });
    }
  });
  report.complete = report.missing.length === 0 && report.failed.length === 0 && report.rejected.length === 0;
  if (report.complete) {
    const step = advanceSweep(plan.request, known);
    if (step.done) report.result = step.result;
    else report.next = sweepPlan(plan.request, known);
  }
  return report;
}

export interface RunShardOptions {
  executor: SweepExecutor;
  /** This shard's earlier output (a checkpoint): its points are not computed again. */
  previous?: unknown;
  /**
   * Receives the output to save: every `saveEvery` points, and at the end. Called synchronously
   * from the loop, so a synchronous write is on disk before the next point starts.
   */
  onSave: (output: ShardOutput) => void;
  saveEvery?: number;
  signal?: { readonly aborted: boolean };
}

/**
 * Compute one shard of a plan (validate the plan and shard first: nothing is computed on bad
 * input). A usable previous output is resumed; a corrupt one is ignored (reported in `restartedBecause`).
 */
export async function runShard(
  plan: SweepPlan,
  shard: number,
  shards: number,
  options: RunShardOptions,
): Promise<{ output: ShardOutput; computed: number; reused: number; restartedBecause: string | null }> {
  checkShard(shard, shards);
  const points = shardPoints(plan, shard, shards);
  const records = new Map<string, PointOutcome>();
  const failures: ShardFailure[] = [];
  let restartedBecause: string | null = null;
  if (options.previous !== undefined) {
    const read = options.previous instanceof Error ? { ok: false as const, problem: options.previous.message } : readShardOutput(options.previous, plan, shard, shards);
    if (read.ok) read.known.forEach((o, k) => records.set(k, o));
    else restartedBecause = read.problem;
  }
  const reused = records.size;
  const todo = points.filter((c) => !records.has(pointKey(c)));
  const every = Math.max(1, options.saveEvery ?? 16);
  let computed = 0;
  let unsaved = 0;
  const output = () => makeShardOutput(plan, shard, shards, pointsToRecords(records), failures);
  const save = () => {
    unsaved = 0;
    options.onSave(output());
  };
  const target = pointTarget(plan.request);
  // A failing point is recorded and the shard goes on; the merge reports it by point.
  let batch = todo;
  while (batch.length > 0) {
    let failedAt: number;
    try {
      await options.executor.evaluate(target, batch.map((c) => sweptParams(plan.request.axes, c)), {
        signal: options.signal,
        onResult: (index, outcome) => {
          records.set(pointKey(batch[index]), outcome);
          computed++;
          if (++unsaved >= every) save();
        },
      });
      batch = [];
    } catch (err) {
      if (!(err instanceof PointError)) {
        save();
        throw err;
      }
      failedAt = batch.findIndex((c) => canonicalJson(sweptParams(plan.request.axes, c)) === canonicalJson(err.params));
      if (failedAt < 0) throw err;
      const cause = err.cause instanceof Error ? `${err.cause.name}: ${err.cause.message}` : err.message;
      failures.push({ coords: batch[failedAt], error: cause });
      batch = batch.filter((c, n) => n !== failedAt && !records.has(pointKey(c)));
    }
  }
  save();
  return { output: output(), computed, reused, restartedBecause };
}
