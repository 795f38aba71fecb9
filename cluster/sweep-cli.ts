/**
 * `chernel sweep plan|run|merge|status|submit`: phase-map sweeps as files, run as shards, on a
 * Slurm cluster or anywhere else. The logic is in src/scan/plan.ts; this is the file and process
 * side. Standalone: `node --import ./scripts/register-ts.js cluster/sweep-cli.ts <command> ...`.
 *
 * Files, for a plan `qwz.plan.json`:
 *   qwz.plan.shards/shard-<i>-of-<N>.json   shard outputs (each also its shard's checkpoint)
 *   qwz.round<r>.plan.json                  the next round's plan, written by merge while refining
 *   qwz.result.json                         the finished phase map (kind 'phase-map'), written by merge
 *   qwz.plan.sbatch                         the job-array script written by submit
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readdirSync, readFileSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { InterruptedError } from '../src/interrupt.js';
import { catalogueModel } from '../src/model/catalogue.js';
import { ModelError, valueText } from '../src/model/errors.js';
import { InProcessExecutor, type PointFunctionFactory, type SweepExecutor } from '../src/scan/executor.js';
import { lockFile, NodeWorkerExecutor, ShardLockedError, writeFileAtomic, writeFileAtomicSync } from './node-workers.js';
import { mergeShards, planTasks, runShard, shardTasks, sweepPlan, validatePlan, checkShard, type MergeReport, type MergeTask, type SweepPlan } from '../src/scan/plan.js';
import { pointFunction } from '../src/scan/point.js';
import { checkRequestShape } from '../src/request.js';
import { pointTarget, validatePhaseMapRequest, type PhaseMapRequest } from '../src/scan/sweep.js';
import { sbatchScript, type SlurmOptions } from './slurm.js';

/** Bad input or usage: exit code 2, nothing computed. */
class UsageError extends Error {
  override name = 'UsageError';
}

const USAGE = `usage: chernel sweep <command> ...
  plan <request.json> [-o plan.json]        write the first plan of a phase-map request; with
      [--members-per-task m]                  m, each averaged point's members in tasks of m
  run <plan.json> [--shard i --shards N]    compute one shard (i, N default to Slurm's array
      [--workers n] [--point-module m.js]     variables); resumes from its own output
  merge <plan.json> [--shards N] [-o out]   check and merge the shard outputs: writes the result,
                                            or the next round's plan while boundaries are refined
  status <plan.json> [--shards N]           what is done, missing or failed, by point
  submit <plan.json> --shards N [--partition p] [--time t] [--cpus-per-task c] [--mem m]
      [--wait] [--script-only]              write the sbatch array script and submit it; with
                                            --wait, wait, merge and submit the next rounds`;

interface Parsed {
  positional: string[];
  flags: Map<string, string | true>;
}

const VALUE_FLAGS = new Set(['o', 'members-per-task', 'shard', 'shards', 'workers', 'point-module', 'save-every', 'partition', 'time', 'cpus-per-task', 'mem', 'account', 'poll']);

function parseArgs(args: string[]): Parsed {
  const positional: string[] = [];
  const flags = new Map<string, string | true>();
  for (let i = 0; i < args.length; i++) {
    const a = args[i];
    if (!a.startsWith('-') || a === '-') {
      positional.push(a);
      continue;
    }
    const [name, inline] = a.replace(/^--?/, '').split(/=(.*)/s, 2);
    if (VALUE_FLAGS.has(name)) {
      const value = inline ?? args[++i];
      if (value === undefined) throw new UsageError(`--${name}: expected a value`);
      flags.set(name, value);
    } else {
      if (inline !== undefined) throw new UsageError(`--${name} takes no value`);
      flags.set(name, true);
    }
  }
  return { positional, flags };
}

function intFlag(p: Parsed, name: string): number | undefined {
  const v = p.flags.get(name);
  if (v === undefined) return undefined;
  const n = Number(v);
  if (v === true || !Number.isInteger(n)) throw new ModelError(name, `expected a whole number. Value: ${valueText(v)}`);
  return n;
}

function readJson(path: string, what: string): unknown {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (err) {
    throw new UsageError(`cannot read ${what} ${path}: ${(err as Error).message}`);
  }
  try {
    return JSON.parse(text);
  } catch (err) {
    throw new UsageError(`${what} ${path} is not valid JSON: ${(err as Error).message}`);
  }
}

/** Paths derived from a plan path. */
export function sweepPaths(planPath: string) {
  const abs = resolve(planPath);
  const stem = abs.replace(/(\.round\d+)?\.plan\.json$|\.json$/, '');
  return {
    plan: abs,
    stem,
    shardDir: abs.replace(/\.json$/, '') + '.shards',
    shardFile: (i: number, n: number) => join(abs.replace(/\.json$/, '') + '.shards', `shard-${i}-of-${n}.json`),
    nextPlan: (round: number) => `${stem}.round${round}.plan.json`,
    result: `${stem}.result.json`,
    script: abs.replace(/\.json$/, '') + '.sbatch',
  };
}

function loadPlan(path: string): SweepPlan {
  return validatePlan(readJson(path, 'plan'));
}

/** A request file may name a catalogue model ("model": "haldane") instead of spelling it out. */
function loadRequest(path: string): PhaseMapRequest {
  const raw = readJson(path, 'request') as Record<string, unknown>;
  if (raw !== null && typeof raw === 'object' && typeof raw.model === 'string') raw.model = catalogueModel(raw.model);
  const request = validatePhaseMapRequest(raw);
  // The engine's point function runs every point: the request takes exactly its options.
  checkRequestShape(request);
  return request;
}

async function cmdPlan(p: Parsed, out: (s: string) => void): Promise<number> {
  const [requestPath] = p.positional;
  if (requestPath === undefined) throw new UsageError('plan: give the request file');
  const plan = sweepPlan(loadRequest(requestPath), new Map(), { membersPerTask: intFlag(p, 'members-per-task') });
  if (plan === null) throw new UsageError('plan: the request has nothing to compute');
  const target = (p.flags.get('o') as string | undefined) ?? requestPath.replace(/(\.request)?\.json$/, '') + '.plan.json';
  await writeFileAtomic(resolve(target), JSON.stringify(plan, null, 1) + '\n');
  out(`${resolve(target)}\n`);
  const blocks = plan.membersPerTask === undefined ? '' : `, ${planTasks(plan).length} tasks of at most ${plan.membersPerTask} members`;
  process.stderr.write(`sweep plan: ${plan.points.length} grid points (${plan.request.axes.map((a) => `${a.param} x ${a.count}`).join(', ')})${blocks}${plan.request.refine ? `, then bisection to ${plan.request.refine.tolerance}` : ''}\n`);
  return 0;
}

/** Shard index and count: arguments first, else Slurm's array-task variables. */
function shardFromArgsOrEnv(p: Parsed): { shard: number; shards: number } {
  const env = process.env;
  const fromEnv = (name: string): number | undefined => {
    const v = env[name];
    if (v === undefined || v === '') return undefined;
    const n = Number(v);
    if (!Number.isInteger(n)) throw new ModelError(name, `expected a whole number. Value: ${valueText(v)}`);
    return n;
  };
  const taskId = fromEnv('SLURM_ARRAY_TASK_ID');
  const shard = intFlag(p, 'shard') ?? (taskId === undefined ? undefined : taskId - (fromEnv('SLURM_ARRAY_TASK_MIN') ?? 0));
  const shards = intFlag(p, 'shards') ?? fromEnv('SLURM_ARRAY_TASK_COUNT');
  if (shard === undefined) throw new ModelError('shard', 'give --shard i (or run inside a Slurm job array)');
  if (shards === undefined) throw new ModelError('shards', 'give --shards N (or run inside a Slurm job array)');
  return checkShard(shard, shards);
}

async function pointFactory(module: string | undefined): Promise<PointFunctionFactory> {
  if (module === undefined) return pointFunction;
  const m = (await import(pathToFileURL(resolve(module)).href)) as { pointFunction?: PointFunctionFactory };
  if (typeof m.pointFunction !== 'function') throw new UsageError(`--point-module ${module} does not export pointFunction(target)`);
  return m.pointFunction;
}

async function cmdRun(p: Parsed, out: (s: string) => void): Promise<number> {
  const [planPath] = p.positional;
  if (planPath === undefined) throw new UsageError('run: give the plan file');
  // Everything is checked before any point is computed.
  const plan = loadPlan(planPath);
  const { shard, shards } = shardFromArgsOrEnv(p);
  const workers = intFlag(p, 'workers') ?? 1;
  if (workers < 1) throw new ModelError('workers', `expected a whole number >= 1. Value: ${workers}`);
  const module = p.flags.get('point-module') as string | undefined;
  const factory = await pointFactory(module);
  factory(pointTarget(plan.request)); // compiles the model with the fixed parameters: fails here, not per point
  const paths = sweepPaths(planPath);
  const file = paths.shardFile(shard, shards);
  mkdirSync(paths.shardDir, { recursive: true });
  // One runner per shard: a duplicate would overwrite the first one's points.
  const unlock = lockFile(file);
  try {
    return await runLockedShard(p, plan, shard, shards, workers, module, factory, file, out);
  } finally {
    unlock();
  }
}

async function runLockedShard(
  p: Parsed, plan: SweepPlan, shard: number, shards: number, workers: number, module: string | undefined,
  factory: PointFunctionFactory, file: string, out: (s: string) => void,
): Promise<number> {
  let previous: unknown;
  if (existsSync(file)) {
    try {
      previous = JSON.parse(readFileSync(file, 'utf8'));
    } catch (err) {
      previous = new Error(`not valid JSON (${(err as Error).message})`);
    }
  }
  const executor: SweepExecutor =
    workers > 1 ? new NodeWorkerExecutor({ workers, pointModule: module === undefined ? undefined : resolve(module) }) : new InProcessExecutor(factory);
  const controller = new AbortController();
  const onTerm = () => controller.abort(); // Slurm pre-emption and scancel send SIGTERM first
  process.on('SIGTERM', onTerm);
  process.on('SIGINT', onTerm);
  try {
    const started = Date.now();
    const r = await runShard(plan, shard, shards, {
      executor,
      previous,
      signal: controller.signal,
      saveEvery: intFlag(p, 'save-every') ?? 16,
      // Synchronous, so the checkpoint is on disk before the next point starts.
      onSave: (output) => writeFileAtomicSync(file, JSON.stringify(output) + '\n'),
    });
    if (r.restartedBecause !== null) process.stderr.write(`sweep run: shard ${shard}/${shards}: ignored its earlier output (${r.restartedBecause})\n`);
    const failed = r.output.failures.length;
    process.stderr.write(
      `sweep run: shard ${shard}/${shards} of round ${plan.round}: ${r.output.assigned} ${unitOf(plan)}, ${r.reused} reused from its checkpoint, ` +
        `${r.computed} computed, ${failed} failed, in ${((Date.now() - started) / 1000).toFixed(1)} s\n`,
    );
    out(`${file}\n`);
    return failed > 0 ? 1 : 0;
  } catch (err) {
    if (err instanceof InterruptedError) {
      process.stderr.write(`sweep run: shard ${shard}/${shards} stopped; its finished ${unitOf(plan)} are saved in ${file}\n`);
      return 143;
    }
    throw err;
  } finally {
    process.off('SIGTERM', onTerm);
    process.off('SIGINT', onTerm);
    await executor.close();
  }
}

/** The shard count: --shards, or what the shard files in the folder agree on. */
function shardCount(p: Parsed, planPath: string): number {
  const given = intFlag(p, 'shards');
  if (given !== undefined) return checkShard(0, given).shards;
  const dir = sweepPaths(planPath).shardDir;
  const counts = new Set<number>();
  if (existsSync(dir)) for (const f of readdirSync(dir)) {
    const m = /^shard-\d+-of-(\d+)\.json$/.exec(f);
    if (m) counts.add(Number(m[1]));
  }
  if (counts.size === 1) return [...counts][0];
  throw new ModelError('shards', counts.size === 0 ? `no shard outputs in ${dir}; give --shards N` : `shard files for different counts (${[...counts].join(', ')}) in ${dir}; give --shards N`);
}

function readShards(planPath: string, shards: number): unknown[] {
  const paths = sweepPaths(planPath);
  return Array.from({ length: shards }, (_, i) => {
    const file = paths.shardFile(i, shards);
    if (!existsSync(file)) return undefined;
    try {
      return JSON.parse(readFileSync(file, 'utf8'));
    } catch (err) {
      return new Error(`${basename(file)} is not valid JSON (${(err as Error).message}): truncated or corrupt`);
    }
  });
}

/** What a task of the plan is: a point, or a block of a point's members. */
function unitOf(plan: SweepPlan): string {
  return plan.membersPerTask === undefined ? 'points' : 'blocks of members';
}

function describe(report: MergeReport, plan: SweepPlan, shards: number, limit = 20): string {
  const lines: string[] = [];
  const total = planTasks(plan).length;
  const missing = report.missing.length + report.failed.length;
  lines.push(`round ${plan.round} (${plan.stage}): ${total - missing} of ${total} ${unitOf(plan)} done in ${shards} shards`);
  for (const r of report.rejected) lines.push(`  shard ${r.shard}: rejected: ${r.problem}`);
  const byShard = new Map<number, MergeTask[]>();
  for (const m of report.missing) byShard.set(m.shard, [...(byShard.get(m.shard) ?? []), m]);
  const names = plan.request.axes.map((a) => a.param);
  const at = (t: MergeTask) => t.coords.map((x, i) => `${names[i]}=${x}`).join(' ') + (t.first === undefined ? '' : ` from member ${t.first}`);
  for (const [shard, list] of byShard) {
    lines.push(`  shard ${shard}: ${list.length} missing: ${list.slice(0, limit).map(at).join('; ')}${list.length > limit ? '; ...' : ''}`);
  }
  for (const f of report.failed.slice(0, limit)) lines.push(`  shard ${f.shard}: failed at ${at(f)}: ${f.error}`);
  if (report.failed.length > limit) lines.push(`  ... ${report.failed.length - limit} more failed ${unitOf(plan)}`);
  return lines.join('\n') + '\n';
}

/** Merge a round; write the result or the next plan. Returns the path written, or null when incomplete. */
async function mergeRound(planPath: string, shards: number, outPath: string | undefined): Promise<{ report: MergeReport; written: string | null; plan: SweepPlan }> {
  const plan = loadPlan(planPath);
  const report = mergeShards(plan, readShards(planPath, shards));
  const paths = sweepPaths(planPath);
  let written: string | null = null;
  if (report.result !== null) {
    written = resolve(outPath ?? paths.result);
    await writeFileAtomic(written, JSON.stringify(report.result) + '\n');
  } else if (report.next !== null) {
    written = paths.nextPlan(report.next.round);
    await writeFileAtomic(written, JSON.stringify(report.next, null, 1) + '\n');
  }
  return { report, written, plan };
}

async function cmdMerge(p: Parsed, out: (s: string) => void): Promise<number> {
  const [planPath] = p.positional;
  if (planPath === undefined) throw new UsageError('merge: give the plan file');
  loadPlan(planPath);
  const shards = shardCount(p, planPath);
  const { report, written, plan } = await mergeRound(planPath, shards, p.flags.get('o') as string | undefined);
  process.stderr.write(describe(report, plan, shards));
  if (!report.complete) {
    process.stderr.write('sweep merge: incomplete round, nothing written; rerun the missing or failed shards (`chernel sweep run` resumes them)\n');
    return 1;
  }
  process.stderr.write(report.result !== null ? `sweep merge: phase map finished: ${written}\n` : `sweep merge: next round's plan (${report.next!.points.length} points): ${written}\n`);
  out(`${written}\n`);
  return 0;
}

async function cmdStatus(p: Parsed, out: (s: string) => void): Promise<number> {
  const [planPath] = p.positional;
  if (planPath === undefined) throw new UsageError('status: give the plan file');
  const plan = loadPlan(planPath);
  const shards = shardCount(p, planPath);
  const report = mergeShards(plan, readShards(planPath, shards));
  out(describe(report, plan, shards, 50));
  for (let i = 0; i < shards; i++) {
    if (report.rejected.some((r) => r.shard === i)) continue;
    const n = shardTasks(plan, i, shards).length;
    const left = report.missing.filter((m) => m.shard === i).length + report.failed.filter((f) => f.shard === i).length;
    out(`  shard ${i}: ${n - left} of ${n} done\n`);
  }
  return report.complete ? 0 : 1;
}

/** The command that reaches this CLI again (for the job script): node, its flags, the script. */
function selfCommand(): string[] {
  const execArgv: string[] = [];
  for (let i = 0; i < process.execArgv.length; i++) {
    const a = process.execArgv[i];
    execArgv.push(a);
    if ((a === '--import' || a === '--loader' || a === '--require' || a === '-r') && i + 1 < process.execArgv.length) {
      const v = process.execArgv[++i];
      execArgv.push(v.startsWith('.') ? pathToFileURL(resolve(v)).href : v);
    }
  }
  const script = resolve(process.argv[1]);
  return [process.execPath, ...execArgv, script, ...(process.argv[2] === 'sweep' ? ['sweep'] : [])];
}

function onPath(tool: string): boolean {
  return spawnSync('sh', ['-c', `command -v ${tool}`], { stdio: 'ignore' }).status === 0;
}

async function cmdSubmit(p: Parsed, out: (s: string) => void): Promise<number> {
  let [planPath] = p.positional;
  if (planPath === undefined) throw new UsageError('submit: give the plan file');
  const shards = intFlag(p, 'shards');
  if (shards === undefined) throw new ModelError('shards', 'give --shards N (the number of array tasks)');
  checkShard(0, shards);
  const slurm: SlurmOptions = {
    partition: p.flags.get('partition') as string | undefined,
    time: p.flags.get('time') as string | undefined,
    cpusPerTask: intFlag(p, 'cpus-per-task'),
    mem: p.flags.get('mem') as string | undefined,
    account: p.flags.get('account') as string | undefined,
  };
  const wait = p.flags.has('wait');
  for (;;) {
    const plan = loadPlan(planPath);
    const paths = sweepPaths(planPath);
    mkdirSync(paths.shardDir, { recursive: true });
    const script = sbatchScript({ ...slurm, shards, name: `chernel-${basename(paths.stem)}-r${plan.round}`, logDir: paths.shardDir, workdir: dirname(paths.plan), command: [...selfCommand(), 'run', paths.plan, '--shards', String(shards)] });
    await writeFileAtomic(paths.script, script);
    process.stderr.write(`sweep submit: wrote ${paths.script} (round ${plan.round}, ${plan.points.length} points, ${shards} array tasks)\n`);
    if (p.flags.has('script-only')) {
      out(`${paths.script}\n`);
      return 0;
    }
    if (!onPath('sbatch')) {
      process.stderr.write('sweep submit: sbatch is not on PATH; submit the script on the cluster with `sbatch <script>`\n');
      out(`${paths.script}\n`);
      return 0;
    }
    if (!wait) {
      const id = execFileSync('sbatch', ['--parsable', paths.script], { encoding: 'utf8' }).trim().split(';')[0];
      process.stderr.write(`sweep submit: job ${id} submitted; afterwards: chernel sweep merge ${paths.plan}\n`);
      out(`${id}\n`);
      return 0;
    }
    // --wait: sbatch returns when every array task has ended (its exit status is the worst task's).
    const r = spawnSync('sbatch', ['--wait', '--parsable', paths.script], { encoding: 'utf8', stdio: ['ignore', 'pipe', 'inherit'] });
    const id = (r.stdout ?? '').trim().split(';')[0];
    process.stderr.write(`sweep submit: job ${id} ended (sbatch exit ${r.status})\n`);
    const { report, written } = await mergeRound(paths.plan, shards, p.flags.get('o') as string | undefined);
    if (!report.complete) {
      process.stderr.write(describe(report, plan, shards));
      process.stderr.write(`sweep submit: round ${plan.round} incomplete; submit again to rerun what is missing (finished points are kept)\n`);
      return 1;
    }
    if (report.result !== null) {
      process.stderr.write(`sweep submit: phase map finished: ${written}\n`);
      out(`${written}\n`);
      return 0;
    }
    planPath = written!;
  }
}

/** Run `chernel sweep <args>`; resolves to the process exit code. Never throws for bad input. */
export async function runSweepCli(args: string[], out: (s: string) => void = (s) => process.stdout.write(s)): Promise<number> {
  const p = parseArgs(args.slice(1));
  const command = args[0];
  try {
    switch (command) {
      case 'plan':
        return await cmdPlan(p, out);
      case 'run':
        return await cmdRun(p, out);
      case 'merge':
        return await cmdMerge(p, out);
      case 'status':
        return await cmdStatus(p, out);
      case 'submit':
        return await cmdSubmit(p, out);
      case undefined:
      case 'help':
      case '--help':
      case '-h':
        out(USAGE + '\n');
        return command === undefined ? 2 : 0;
      default:
        throw new UsageError(`unknown command ${valueText(command)}`);
    }
  } catch (err) {
    if (err instanceof UsageError || err instanceof ModelError || err instanceof ShardLockedError) {
      process.stderr.write(`chernel sweep ${command}: ${err.name}: ${err.message}\n`);
      if (err instanceof UsageError && /unknown command/.test(err.message)) process.stderr.write(USAGE + '\n');
      return 2;
    }
    throw err;
  }
}

if (process.argv[1] !== undefined && import.meta.url === pathToFileURL(resolve(process.argv[1])).href) {
  const args = process.argv.slice(2);
  process.exitCode = await runSweepCli(args[0] === 'sweep' ? args.slice(1) : args);
}
