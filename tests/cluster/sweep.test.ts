// Sweeps on a real Slurm cluster (started by tests/cluster/run.sh; SLURM_CONF points at it):
// job arrays of shards, merged rounds of boundary refinement, a shard killed with SIGKILL, and an
// averaged map split into blocks of members whose killed shard resumes mid-ensemble.
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { sweepPaths } from '../../cluster/sweep-cli.js';
import { haldane, qwz } from '../../src/model/catalogue.js';
import { InProcessExecutor } from '../../src/scan/executor.js';
import { runShard, validatePlan, type ShardOutput } from '../../src/scan/plan.js';
import { pointFunction } from '../../src/scan/point.js';
import { phaseMapSync } from '../../src/scan/run.js';
import type { PhaseMapRequest } from '../../src/scan/sweep.js';

const ROOT = resolve(import.meta.dirname, '../..');
const CLI = [process.execPath, '--import', join(ROOT, 'scripts/register-ts.js'), join(ROOT, 'cluster/sweep-cli.ts')];
const work = mkdtempSync(join(tmpdir(), 'chernel-cluster-'));
afterAll(() => rmSync(work, { recursive: true, force: true }));

function start(args: string[], env: Record<string, string> = {}): { child: ChildProcess; done: Promise<{ code: number | null; signal: NodeJS.Signals | null; stdout: string; stderr: string }> } {
  const child = spawn(CLI[0], [...CLI.slice(1), ...args], { cwd: work, env: { ...process.env, ...env }, stdio: ['ignore', 'pipe', 'pipe'] });
  let stdout = '';
  let stderr = '';
  child.stdout!.on('data', (d) => (stdout += d));
  child.stderr!.on('data', (d) => (stderr += d));
  const done = new Promise<{ code: number | null; signal: NodeJS.Signals | null; stdout: string; stderr: string }>((res) =>
    child.on('close', (code, signal) => res({ code, signal, stdout, stderr })),
  );
  return { child, done };
}
const cli = (...args: string[]) => start(args).done;

describe('phase diagram on Slurm', () => {
  it('4-task job arrays, rounds merged, equal to the same sweep in one process at every point', async () => {
    expect(process.env.SLURM_CONF, 'run through tests/cluster/run.sh').toBeTruthy();
    // Haldane (PRL 61, 2015 (1988)): one grid round and one bisection round along phi.
    const request = {
      kind: 'phase-map', model: 'haldane', quantity: 'chern', grid: 12, params: { t2: 0.1 },
      axes: [{ param: 'phi', from: -3, to: 3, count: 8 }, { param: 'M', from: -0.7, to: 0.7, count: 6 }],
      refine: { tolerance: 0.45 },
    };
    writeFileSync(join(work, 'haldane.request.json'), JSON.stringify(request));
    const planned = await cli('plan', 'haldane.request.json');
    expect(planned.code, planned.stderr).toBe(0);
    const planPath = planned.stdout.trim();

    const submitted = await cli('submit', planPath, '--shards', '4', '--time', '00:05:00', '--cpus-per-task', '1', '--mem', '400M', '--wait');
    expect(submitted.code, submitted.stderr).toBe(0);
    expect(submitted.stderr).toMatch(/round 0, 48 points, 4 array tasks/);
    expect(submitted.stderr).toMatch(/round 1, \d+ points, 4 array tasks/);
    const resultPath = submitted.stdout.trim();
    expect(resultPath).toBe(sweepPaths(planPath).result);

    // Every array task of both rounds ran under Slurm and left its log and its shard output.
    for (const plan of [planPath, sweepPaths(planPath).nextPlan(1)]) {
      const files = readdirSync(sweepPaths(plan).shardDir);
      expect(files.filter((f) => /^shard-\d-of-4\.json$/.test(f))).toHaveLength(4);
      expect(files.filter((f) => /^slurm-\d+_\d\.log$/.test(f)).sort().map((f) => f.slice(-6))).toEqual(['_0.log', '_1.log', '_2.log', '_3.log']);
    }

    const merged = JSON.parse(readFileSync(resultPath, 'utf8'));
    const oneProcess = phaseMapSync({ ...request, model: haldane() } as PhaseMapRequest, pointFunction);
    expect(merged.values).toEqual(oneProcess.values);
    expect(merged.boundaries).toEqual(oneProcess.boundaries);
    expect(merged).toEqual(JSON.parse(JSON.stringify(oneProcess)));
    expect(merged.refinement.rounds).toBe(1);
    expect(merged.values.filter((v: number | null) => v !== 0).length).toBeGreaterThan(0);
  });
});

describe('a shard killed with SIGKILL', () => {
  it('reruns to the same output without recomputing its saved points', async () => {
    const request = {
      kind: 'phase-map', model: 'haldane', quantity: 'chern', grid: 12, params: { t2: 0.1 },
      axes: [{ param: 'phi', from: -3, to: 3, count: 6 }, { param: 'M', from: -0.7, to: 0.7, count: 5 }],
    };
    writeFileSync(join(work, 'kill.request.json'), JSON.stringify(request));
    const planned = await cli('plan', 'kill.request.json');
    expect(planned.code, planned.stderr).toBe(0);
    const planPath = planned.stdout.trim();
    const file = sweepPaths(planPath).shardFile(1, 2);
    const module = join(ROOT, 'tests/cluster/fixtures/counting-points.ts');
    const args = ['run', planPath, '--shard', '1', '--shards', '2', '--save-every', '1', '--point-module', module];

    // The first run computes 6 points, then hangs inside the 7th until it is killed.
    const first = start(args, { CHERNEL_COUNT_FILE: join(work, 'count-1.txt'), CHERNEL_HANG_AFTER: '6' });
    const counted = () => (existsSync(join(work, 'count-1.txt')) ? readFileSync(join(work, 'count-1.txt'), 'utf8').trim().split('\n').length : 0);
    while (!existsSync(join(work, 'count-1.txt.hanging'))) await new Promise((r) => setTimeout(r, 100));
    expect(counted()).toBe(6);
    first.child.kill('SIGKILL');
    const killed = await first.done;
    expect(killed.signal).toBe('SIGKILL');
    const saved = JSON.parse(readFileSync(file, 'utf8')) as ShardOutput; // the last complete write before the kill
    expect(saved.complete).toBe(false);
    const savedKeys = new Set(saved.records.map((r) => JSON.stringify(r[0])));
    expect(savedKeys.size).toBe(6); // saved after every point (--save-every 1), before the next starts

    const second = await start(args, { CHERNEL_COUNT_FILE: join(work, 'count-2.txt') }).done;
    expect(second.code, second.stderr).toBe(0);
    expect(second.stderr).toMatch(new RegExp(`15 points, ${savedKeys.size} reused from its checkpoint, ${15 - savedKeys.size} computed, 0 failed`));
    // Counted independently of the shard's own report: the rerun computed exactly the unsaved points.
    const recomputed = readFileSync(join(work, 'count-2.txt'), 'utf8').trim().split('\n').map((l) => JSON.parse(l) as { phi: number; M: number });
    expect(recomputed).toHaveLength(15 - savedKeys.size);
    for (const p of recomputed) expect(savedKeys.has(JSON.stringify([p.phi, p.M]))).toBe(false);

    // Same output as the shard computed without interruption.
    const plan = validatePlan(JSON.parse(readFileSync(planPath, 'utf8')));
    const uninterrupted = await runShard(plan, 1, 2, { executor: new InProcessExecutor(pointFunction), onSave: () => {} });
    expect(JSON.parse(readFileSync(file, 'utf8'))).toEqual(JSON.parse(JSON.stringify(uninterrupted.output)));
  });
});

describe('an averaged map split into blocks of members, a shard killed mid-ensemble', () => {
  it('resumes past its saved blocks and merges to the map computed unsplit in one process', async () => {
    // QWZ with u = -1 (C = +1; Qi, Wu & Zhang, PRB 74, 085308 (2006)) under onsite disorder: 10 seeded
    // samples per point, in blocks of 3 members (0-2, 3-5, 6-8, 9), 16 tasks over 2 shards.
    const request = {
      kind: 'phase-map', model: 'qwz', params: { u: -1 }, quantity: 'ensemble', of: 'bott', samples: 10, sizes: [6, 6], seed: 5, gapTolerance: 0.05,
      axes: [{ param: 'onsiteDisorder', from: 0, to: 6, count: 4 }],
    };
    writeFileSync(join(work, 'avg.request.json'), JSON.stringify(request));
    const planned = await cli('plan', 'avg.request.json', '--members-per-task', '3');
    expect(planned.code, planned.stderr).toBe(0);
    expect(planned.stderr).toMatch(/4 grid points \(onsiteDisorder x 4\), 16 tasks of at most 3 members/);
    const planPath = planned.stdout.trim();
    const file = sweepPaths(planPath).shardFile(0, 2);
    const module = join(ROOT, 'tests/cluster/fixtures/counting-points.ts');
    const args = ['run', planPath, '--shard', '0', '--shards', '2', '--save-every', '1', '--point-module', module];
    // The swept values of each block the point module computed: onsiteDisorder, first, samples.
    const countOf = (name: string) => (existsSync(join(work, name)) ? readFileSync(join(work, name), 'utf8').trim().split('\n').map((l) => JSON.parse(l) as Record<string, number>) : []);

    // Shard 0 computes 3 of its 8 blocks (point 0's members 0-2 and 6-8, point 2's members 0-2), then hangs until killed.
    const first = start(args, { CHERNEL_COUNT_FILE: join(work, 'avg-1.txt'), CHERNEL_HANG_AFTER: '3' });
    while (!existsSync(join(work, 'avg-1.txt.hanging'))) await new Promise((r) => setTimeout(r, 100));
    expect(countOf('avg-1.txt')).toHaveLength(3);
    first.child.kill('SIGKILL');
    expect((await first.done).signal).toBe('SIGKILL');
    const saved = JSON.parse(readFileSync(file, 'utf8')) as ShardOutput;
    expect(saved.complete).toBe(false);
    expect(saved.blocks!.map((b) => [b[0][0], b[1], b[2].length])).toEqual([[0, 0, 3], [0, 6, 3], [2, 0, 3]]);

    // Before the shards are done, merge refuses and names the missing blocks.
    const early = await cli('merge', planPath, '--shards', '2');
    expect(early.code).toBe(1);
    expect(early.stderr).toMatch(/3 of 16 blocks of members done in 2 shards/);
    expect(early.stderr).toMatch(/shard 0: 5 missing: onsiteDisorder=2 from member 6; onsiteDisorder=4 from member 0/);
    expect(early.stderr).toMatch(/shard 1: rejected: no output file/);

    // Shard 0 rerun beside shard 1.
    const [second, other] = await Promise.all([start(args, { CHERNEL_COUNT_FILE: join(work, 'avg-2.txt') }).done, cli('run', planPath, '--shard', '1', '--shards', '2')]);
    expect(second.code, second.stderr).toBe(0);
    expect(other.code, other.stderr).toBe(0);
    expect(second.stderr).toMatch(/8 blocks of members, 3 reused from its checkpoint, 5 computed, 0 failed/);
    // Counted by the point module itself: 5 blocks, 15 of the shard's 24 members, none of the saved ones.
    const recomputed = countOf('avg-2.txt');
    expect(recomputed.map((t) => [t.onsiteDisorder, t.first, t.samples])).toEqual([[2, 6, 3], [4, 0, 3], [4, 6, 3], [6, 0, 3], [6, 6, 3]]);
    expect(recomputed.reduce((n, t) => n + t.samples, 0)).toBe(15);

    const merged = await cli('merge', planPath);
    expect(merged.code, merged.stderr).toBe(0);
    const result = JSON.parse(readFileSync(merged.stdout.trim(), 'utf8'));
    const unsplit = phaseMapSync({ ...request, model: qwz() } as PhaseMapRequest, pointFunction);
    expect(result.values).toEqual(unsplit.values);
    expect(result.standardErrors).toEqual(unsplit.standardErrors);
    expect(result.crossings).toEqual(JSON.parse(JSON.stringify(unsplit.crossings)));
    expect(result.standardErrors.some((e: number | null) => e !== null && e > 0)).toBe(true);
  });
});
