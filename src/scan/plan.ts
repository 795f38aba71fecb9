/**
 * Sweeps as files, for clusters: a plan is one round of a phase map (the grid, or one bisection
 * round) written as plain, versioned JSON; shard i of N computes every N-th task of the round (a
 * point, or with `membersPerTask` a block of an averaged point's members, blocks.ts) and writes its
 * own output; merging checks every shard output (format, plan, count, checksum) and
 * either finishes the phase map or writes the plan of the next round. All pure: the file I/O and
 * the Slurm side live in cluster/.
 */
import { ModelError, valueText } from '../model/errors.js';
import { canonicalJson, digest } from './checksum.js';
import { PointError, type SweepExecutor } from './executor.js';
import { blockParams, blockValues, checkMembersPerTask, joinBlocks, memberBlocks, type MemberBlock } from './blocks.js';
import { pointsToRecords, readBlockRecord, recordsToPoints, type BlockRecord, type PointRecord } from './record.js';
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
  /**
   * Set on an averaged map: each point's ensemble is split into blocks of this many members, each
   * block a task of its own. Absent: a task is a whole point.
   */
  membersPerTask?: number;
}

/** One task of a round: a point, or a block of its members (a plan with `membersPerTask`). */
export interface SweepTask {
  coords: number[];
  block?: MemberBlock;
}

/** A task that failed in a shard, with the error message (`first`: the failed block's first member). */
export interface ShardFailure {
  coords: number[];
  first?: number;
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
  /** Tasks assigned to this shard. */
  assigned: number;
  complete: boolean;
  /** Finished and failed tasks, written separately so truncation is caught even if JSON parses. */
  count: number;
  records: PointRecord[];
  /** Finished blocks of members (present only when the plan splits points into blocks). */
  blocks?: BlockRecord[];
  failures: ShardFailure[];
  /** digest of the canonical JSON of every other field. */
  checksum: string;
}

/** Identity of a plan file's content (a round of a sweep). */
export function planId(plan: SweepPlan): string {
  return digest(canonicalJson(plan));
}

export interface SweepPlanOptions {
  /** Split each point of an averaged map into blocks of this many members (a task each). */
  membersPerTask?: number;
}

/** The plan of the next round for `request` given the points known so far, or null when the sweep is finished. */
export function sweepPlan(request: PhaseMapRequest, known: ReadonlyMap<string, PointOutcome> = new Map(), options: SweepPlanOptions = {}): SweepPlan | null {
  validatePhaseMapRequest(request);
  const membersPerTask = options.membersPerTask === undefined ? undefined : checkMembersPerTask(request, options.membersPerTask);
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
    ...(membersPerTask !== undefined ? { membersPerTask } : {}),
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
  if (p.membersPerTask !== undefined) checkMembersPerTask(request, p.membersPerTask);
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

/** The tasks of a round: its points, or each point's blocks of members in member order. */
export function planTasks(plan: SweepPlan): SweepTask[] {
  if (plan.membersPerTask === undefined) return plan.points.map((coords) => ({ coords }));
  const blocks = memberBlocks(plan.request, plan.membersPerTask);
  return plan.points.flatMap((coords) => blocks.map((block) => ({ coords, block })));
}

/** The tasks of one shard: every `shards`-th task from `shard` (strided, so costly regions spread out). */
export function shardTasks(plan: SweepPlan, shard: number, shards: number): SweepTask[] {
  checkShard(shard, shards);
  return planTasks(plan).filter((_, n) => n % shards === shard);
}

function taskKey(coords: readonly number[], first: number | undefined): string {
  return first === undefined ? pointKey(coords) : `${pointKey(coords)}@${first}`;
}

const keyOf = (t: SweepTask) => taskKey(t.coords, t.block?.first);

function checksumOf(output: Omit<ShardOutput, 'checksum'>): string {
  return digest(canonicalJson(output));
}

/** A shard's output; `blocks` is written exactly when the plan splits points into blocks. */
export function makeShardOutput(plan: SweepPlan, shard: number, shards: number, records: PointRecord[], failures: ShardFailure[], blocks: BlockRecord[] = []): ShardOutput {
  const assigned = shardTasks(plan, shard, shards).length;
  const count = records.length + blocks.length + failures.length;
  const body: Omit<ShardOutput, 'checksum'> = {
    format: SHARD_FORMAT,
    version: SWEEP_FILE_VERSION,
    plan: planId(plan),
    round: plan.round,
    shard,
    shards,
    assigned,
    complete: count === assigned,
    count,
    records,
    ...(plan.membersPerTask !== undefined ? { blocks } : {}),
    failures,
  };
  return { ...body, checksum: checksumOf(body) };
}

/** What a shard output holds, once read and checked against its plan. */
export interface ShardContent {
  /** Finished points (plans of whole points). */
  known: Map<string, PointOutcome>;
  /** Finished blocks' member values, by task (plans split into blocks). */
  blocks: Map<string, (number | null)[]>;
  failures: ShardFailure[];
  complete: boolean;
}

/** The blocks of a shard output, checked against the plan's tasks; a string names the problem. */
function readBlocks(blocks: unknown, plan: SweepPlan, assigned: ReadonlySet<string>): Map<string, (number | null)[]> | string {
  if (plan.membersPerTask === undefined) return blocks === undefined ? new Map() : 'holds blocks of members, but its plan computes whole points';
  if (!Array.isArray(blocks)) return `blocks: expected an array of block records. Value: ${valueText(blocks)}`;
  const points = new Set(plan.points.map(pointKey));
  const lengths = new Map(memberBlocks(plan.request, plan.membersPerTask).map((b) => [b.first, b.samples]));
  const read = new Map<string, (number | null)[]>();
  for (const [n, rec] of blocks.entries()) {
    let block: ReturnType<typeof readBlockRecord>;
    try {
      block = readBlockRecord(rec, plan.request.axes.length, `blocks[${n}]`);
    } catch (err) {
      return (err as Error).message;
    }
    const key = taskKey(block.coords, block.first);
    const span = `members ${block.first}..${block.first + block.values.length - 1} of point (${pointKey(block.coords)})`;
    if (!points.has(pointKey(block.coords))) return `blocks[${n}]: (${pointKey(block.coords)}) is not a point of this round`;
    if (lengths.get(block.first) !== block.values.length) return `blocks[${n}]: ${span} are not one of its blocks (${[...lengths].map(([f, c]) => `${f}..${f + c - 1}`).join(', ')})`;
    if (!assigned.has(key)) return `blocks[${n}]: ${span} are not assigned to this shard`;
    if (read.has(key)) return `blocks[${n}]: ${span} appear twice`;
    read.set(key, block.values);
  }
  return read;
}

/**
 * Read a shard output for a plan: returns its points, blocks and failures, or a list of problems
 * (never a partial trust: a shard output with any problem contributes nothing).
 */
export function readShardOutput(output: unknown, plan: SweepPlan, shard: number, shards: number): ({ ok: true } & ShardContent) | { ok: false; problem: string } {
  if (output === null || typeof output !== 'object') return { ok: false, problem: `not a shard output object` };
  const o = output as Partial<ShardOutput>;
  if (o.format !== SHARD_FORMAT || o.version !== SWEEP_FILE_VERSION) return { ok: false, problem: `format/version ${valueText(o.format)}/${valueText(o.version)}, expected "${SHARD_FORMAT}"/${SWEEP_FILE_VERSION}` };
  if (o.plan !== planId(plan)) return { ok: false, problem: `computed for another plan (${valueText(o.plan)}, this plan is ${planId(plan)})` };
  if (o.shard !== shard || o.shards !== shards) return { ok: false, problem: `is shard ${valueText(o.shard)} of ${valueText(o.shards)}, expected ${shard} of ${shards}` };
  if (!Array.isArray(o.records) || !Array.isArray(o.failures)) return { ok: false, problem: 'records or failures missing' };
  const present = o.records.length + (Array.isArray(o.blocks) ? o.blocks.length : 0) + o.failures.length;
  if (o.count !== present) return { ok: false, problem: `record count ${valueText(o.count)} but ${present} records present (truncated or edited)` };
  const { checksum, ...body } = o as ShardOutput;
  if (checksum !== checksumOf(body)) return { ok: false, problem: `checksum mismatch (file ${valueText(checksum)}, content ${checksumOf(body)}): corrupt or edited` };
  let known: Map<string, PointOutcome>;
  try {
    known = recordsToPoints(o.records, plan.request.axes.length, 'records');
  } catch (err) {
    return { ok: false, problem: (err as Error).message };
  }
  const assigned = new Set(shardTasks(plan, shard, shards).map(keyOf));
  for (const key of known.keys()) if (!assigned.has(key)) return { ok: false, problem: `holds point (${key}), which is not assigned to this shard` };
  const blocks = readBlocks(o.blocks, plan, assigned);
  if (typeof blocks === 'string') return { ok: false, problem: blocks };
  for (const f of o.failures) {
    if (!assigned.has(taskKey(f.coords, f.first))) return { ok: false, problem: `reports a failure at (${valueText(f.coords)})${f.first === undefined ? '' : ` member ${f.first}`}, which is not assigned to this shard` };
  }
  return { ok: true, known, blocks, failures: o.failures, complete: o.complete === true && known.size + blocks.size + o.failures.length === assigned.size };
}

/** A task of a merged round: its point, and its block's first member when the plan splits points. */
export interface MergeTask {
  shard: number;
  coords: number[];
  first?: number;
}

export interface MergeReport {
  /** True when every task of the round is present (no missing, failed or corrupt shard). */
  complete: boolean;
  /** Earlier rounds' points and every good shard's points (a split point once all its blocks are in). */
  known: Map<string, PointOutcome>;
  /** Tasks with no result, by shard (a corrupt or absent shard lists all its tasks). */
  missing: MergeTask[];
  failed: (MergeTask & { error: string })[];
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
 * any missing, failed or rejected task leaves `complete` false and neither `result` nor `next`.
 */
export function mergeShards(plan: SweepPlan, outputs: readonly unknown[]): MergeReport {
  const shards = outputs.length;
  checkShard(0, shards);
  const known = recordsToPoints(plan.known, plan.request.axes.length, 'known');
  const report: MergeReport = { complete: false, known, missing: [], failed: [], rejected: [], result: null, next: null };
  const blocks = new Map<string, (number | null)[]>();
  const taskOf = (shard: number, t: SweepTask): MergeTask => ({ shard, coords: t.coords, ...(t.block !== undefined ? { first: t.block.first } : {}) });
  outputs.forEach((output, shard) => {
    const assigned = shardTasks(plan, shard, shards);
    const read =
      output === undefined
        ? { ok: false as const, problem: 'no output file' }
        : output instanceof Error
          ? { ok: false as const, problem: output.message }
          : readShardOutput(output, plan, shard, shards);
    if (!read.ok) {
      report.rejected.push({ shard, problem: read.problem });
      assigned.forEach((t) => report.missing.push(taskOf(shard, t)));
      return;
    }
    const failedKeys = new Set(read.failures.map((f) => taskKey(f.coords, f.first)));
    read.failures.forEach((f) => report.failed.push({ shard, ...f }));
    for (const t of assigned) {
      const key = keyOf(t);
      const outcome = read.known.get(key);
      const values = read.blocks.get(key);
      if (outcome !== undefined) known.set(key, outcome);
      else if (values !== undefined) blocks.set(key, values);
      else if (!failedKeys.has(key)) report.missing.push(taskOf(shard, t));
    }
  });
  report.complete = report.missing.length === 0 && report.failed.length === 0 && report.rejected.length === 0;
  if (report.complete) {
    if (plan.membersPerTask !== undefined) {
      const pointBlocks = memberBlocks(plan.request, plan.membersPerTask);
      for (const coords of plan.points) known.set(pointKey(coords), joinBlocks(plan.request, coords, pointBlocks.map((b) => blocks.get(taskKey(coords, b.first))!)));
    }
    const step = advanceSweep(plan.request, known);
    if (step.done) report.result = step.result;
    else report.next = sweepPlan(plan.request, known, { membersPerTask: plan.membersPerTask });
  }
  return report;
}

export interface RunShardOptions {
  executor: SweepExecutor;
  /** This shard's earlier output (a checkpoint): its tasks are not computed again. */
  previous?: unknown;
  /**
   * Receives the output to save: every `saveEvery` tasks, and at the end. Called synchronously
   * from the loop, so a synchronous write is on disk before the next task starts.
   */
  onSave: (output: ShardOutput) => void;
  saveEvery?: number;
  signal?: { readonly aborted: boolean };
}

/**
 * Compute one shard of a plan (validate the plan and shard first: nothing is computed on bad
 * input). A usable previous output is resumed; a corrupt one is ignored (reported in `restartedBecause`).
 * `computed` and `reused` count tasks (points, or blocks of members).
 */
export async function runShard(
  plan: SweepPlan,
  shard: number,
  shards: number,
  options: RunShardOptions,
): Promise<{ output: ShardOutput; computed: number; reused: number; restartedBecause: string | null }> {
  checkShard(shard, shards);
  const tasks = shardTasks(plan, shard, shards);
  const records = new Map<string, PointOutcome>();
  const blocks = new Map<string, (number | null)[]>();
  const failures: ShardFailure[] = [];
  let restartedBecause: string | null = null;
  if (options.previous !== undefined) {
    const read = options.previous instanceof Error ? { ok: false as const, problem: options.previous.message } : readShardOutput(options.previous, plan, shard, shards);
    if (read.ok) {
      read.known.forEach((o, k) => records.set(k, o));
      read.blocks.forEach((v, k) => blocks.set(k, v));
    } else restartedBecause = read.problem;
  }
  const done = (t: SweepTask) => records.has(keyOf(t)) || blocks.has(keyOf(t));
  const reused = records.size + blocks.size;
  const every = Math.max(1, options.saveEvery ?? 16);
  let computed = 0;
  let unsaved = 0;
  // Blocks in task order, so a resumed shard writes the same file as an uninterrupted one.
  const blockRecords = (): BlockRecord[] => tasks.filter((t) => blocks.has(keyOf(t))).map((t) => [t.coords, t.block!.first, blocks.get(keyOf(t))!]);
  const output = () => makeShardOutput(plan, shard, shards, pointsToRecords(records), failures, blockRecords());
  const save = () => {
    unsaved = 0;
    options.onSave(output());
  };
  const target = pointTarget(plan.request);
  const paramsOf = (t: SweepTask) => (t.block === undefined ? sweptParams(plan.request.axes, t.coords) : blockParams(sweptParams(plan.request.axes, t.coords), t.block));
  // A failing task is recorded and the shard goes on; the merge reports it by point (and block).
  let batch = tasks.filter((t) => !done(t));
  while (batch.length > 0) {
    const params = batch.map(paramsOf);
    try {
      await options.executor.evaluate(target, params, {
        signal: options.signal,
        onResult: (index, outcome) => {
          const t = batch[index];
          const values = t.block === undefined ? null : blockValues(outcome, t.block);
          if (values === null) records.set(keyOf(t), outcome);
          else if (typeof values === 'string') failures.push({ coords: t.coords, first: t.block!.first, error: values });
          else blocks.set(keyOf(t), values);
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
      const failedAt = params.findIndex((p) => canonicalJson(p) === canonicalJson(err.params));
      if (failedAt < 0) throw err;
      const cause = err.cause instanceof Error ? `${err.cause.name}: ${err.cause.message}` : err.message;
      const t = batch[failedAt];
      failures.push({ coords: t.coords, ...(t.block !== undefined ? { first: t.block.first } : {}), error: cause });
      batch = batch.filter((u, n) => n !== failedAt && !done(u));
    }
  }
  save();
  return { output: output(), computed, reused, restartedBecause };
}
