// Sweep plans, shards and merges (pure), and the sweep command line's handling of bad input.
// The real Slurm run is tests/cluster/.
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync, existsSync } from 'node:fs';
import { hostname, tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { runSweepCli, sweepPaths } from '../../cluster/sweep-cli.js';
import { sbatchScript } from '../../cluster/slurm.js';
import { haldane, qwz } from '../../src/model/catalogue.js';
import { ModelError } from '../../src/model/errors.js';
import { InProcessExecutor } from '../../src/scan/executor.js';
import { mergeShards, runShard, sweepPlan, validatePlan, type ShardOutput, type SweepPlan } from '../../src/scan/plan.js';
import { pointFunction } from '../../src/scan/point.js';
import { phaseMapSync } from '../../src/scan/run.js';
import type { PhaseMapRequest, PointFunction } from '../../src/scan/sweep.js';

const request: PhaseMapRequest = {
  kind: 'phase-map', model: haldane(), quantity: 'chern', grid: 12, params: { t2: 0.1 },
  axes: [{ param: 'phi', from: -3, to: 3, count: 7 }, { param: 'M', from: -0.7, to: 0.7, count: 5 }],
  refine: { tolerance: 0.1 },
};

async function shardOutputs(plan: SweepPlan, shards: number, fn: PointFunction = () => ({ value: 0, gap: 1 }), real = true): Promise<ShardOutput[]> {
  const outputs: ShardOutput[] = [];
  for (let s = 0; s < shards; s++) {
    const r = await runShard(plan, s, shards, { executor: new InProcessExecutor(real ? pointFunction : () => fn), onSave: () => {} });
    outputs.push(r.output);
  }
  return outputs;
}

describe('plans, shards and merges', () => {
  it('rounds of 3 shards merge into exactly the one-process phase map', async () => {
    let plan = sweepPlan(request);
    let rounds = 0;
    for (;;) {
      expect(plan).not.toBeNull();
      const p = validatePlan(JSON.parse(JSON.stringify(plan))); // what a shard reads back from its file
      expect(p.round).toBe(rounds);
      const report = mergeShards(p, JSON.parse(JSON.stringify(await shardOutputs(p, 3))));
      expect(report.complete).toBe(true);
      rounds++;
      if (report.result !== null) {
        expect(report.result).toEqual(phaseMapSync(request, pointFunction));
        break;
      }
      plan = report.next;
    }
    expect(rounds).toBeGreaterThan(2);
  });

  it('reports missing, failed and corrupt shard outputs by point and merges nothing', async () => {
    const plan = sweepPlan(request)!;
    const outputs: unknown[] = JSON.parse(JSON.stringify(await shardOutputs(plan, 4)));
    const good = mergeShards(plan, outputs);
    expect(good.complete && good.next !== null).toBe(true);

    const absent = mergeShards(plan, [outputs[0], undefined, outputs[2], outputs[3]]);
    expect(absent.complete).toBe(false);
    expect(absent.next).toBeNull();
    expect(absent.rejected).toEqual([{ shard: 1, problem: 'no output file' }]);
    expect(absent.missing.map((m) => m.coords)).toEqual(plan.points.filter((_, n) => n % 4 === 1));

    const edited = JSON.parse(JSON.stringify(outputs)) as ShardOutput[];
    edited[2].records[3][1] = 7; // a value changed after writing
    expect(mergeShards(plan, edited).rejected[0]).toMatchObject({ shard: 2, problem: expect.stringMatching(/checksum mismatch/) });

    const truncated = JSON.parse(JSON.stringify(outputs)) as ShardOutput[];
    truncated[0].records.pop(); // a record lost, count unchanged
    expect(mergeShards(plan, truncated).rejected[0]).toMatchObject({ shard: 0, problem: expect.stringMatching(/record count 9 but 8/) });

    const swapped = [outputs[1], outputs[0], outputs[2], outputs[3]];
    expect(mergeShards(plan, swapped).rejected.map((r) => r.problem)).toEqual(['is shard 1 of 4, expected 0 of 4', 'is shard 0 of 4, expected 1 of 4']);

    const otherPlan = sweepPlan({ ...request, grid: 16 })!;
    expect(mergeShards(otherPlan, outputs).rejected[0].problem).toMatch(/computed for another plan/);

    const failing: PointFunction = ({ phi, M }) => {
      if (phi === -2 && M === 0) throw new ModelError('params.M', 'refused');
      return { value: 0, gap: 1 };
    };
    const withFailure = await shardOutputs(plan, 2, failing, false);
    const report = mergeShards(plan, withFailure);
    expect(report.complete).toBe(false);
    expect(report.failed).toEqual([{ shard: 1, coords: [-2, 0], error: 'ModelError: params.M: refused' }]);
    expect(report.missing).toEqual([]);
  });

  it('a shard resumes from its earlier output without recomputing finished points', async () => {
    const plan = sweepPlan(request)!;
    const calls: string[] = [];
    const counting = () => (p: Record<string, number>) => {
      calls.push(JSON.stringify(p));
      return pointFunction({ ...plan.request, kind: 'chern', params: { t2: 0.1 } } as never)(p);
    };
    let saved: ShardOutput | undefined;
    const controller = { aborted: false };
    await expect(
      runShard(plan, 1, 2, {
        executor: new InProcessExecutor(() => (p) => {
          const o = counting()(p);
          if (calls.length === 7) controller.aborted = true;
          return o;
        }),
        signal: controller,
        saveEvery: 3,
        onSave: (o) => void (saved = JSON.parse(JSON.stringify(o))),
      }),
    ).rejects.toThrow(/interrupted/);
    expect(saved!.records).toHaveLength(7);
    expect(saved!.complete).toBe(false);
    const before = calls.length;
    const resumed = await runShard(plan, 1, 2, { executor: new InProcessExecutor(counting), previous: saved, onSave: () => {} });
    expect(resumed.reused).toBe(7);
    expect(resumed.computed).toBe(17 - 7);
    expect(calls.length - before).toBe(10);
    expect(new Set(calls).size).toBe(calls.length);
    const fresh = await runShard(plan, 1, 2, { executor: new InProcessExecutor(pointFunction), onSave: () => {} });
    expect(resumed.output).toEqual(fresh.output);
  });

  it('validates plans before any compute, naming the field', () => {
    const plan = JSON.parse(JSON.stringify(sweepPlan(request)));
    const bad = (edit: (p: Record<string, any>) => void) => {
      const p = JSON.parse(JSON.stringify(plan));
      edit(p);
      return () => validatePlan(p);
    };
    expect(bad((p) => (p.request.model.terms[0].to = 'C'))).toThrow(/^request\.model\.terms\[0\]\.to: unknown orbital "C"/);
    expect(bad((p) => (p.request.axes[1].count = 0))).toThrow(/^request\.axes\[1\]\.count: the grid is empty/);
    expect(bad((p) => (p.version = 2))).toThrow(/^version: this engine reads version 1/);
    expect(bad((p) => p.points.pop())).toThrow(/^points: expected the 35 points of grid round 0/);
    expect(bad((p) => (p.request.grid = 16))).toThrow(/^fingerprint: does not match the request/);
  });

  it('writes an sbatch array script with the options, refusing malformed ones', () => {
    const script = sbatchScript({ shards: 4, name: 'chernel-x-r0', logDir: '/data/x.shards', workdir: '/data', command: ['/usr/bin/node', '/opt/chernel/bin/chernel.js', 'sweep', 'run', '/data/x plan.json', '--shards', '4'], partition: 'short', time: '00:30:00', cpusPerTask: 2, mem: '2G' });
    expect(script).toContain('#SBATCH --array=0-3\n');
    expect(script).toContain('#SBATCH --partition=short\n#SBATCH --time=00:30:00\n#SBATCH --cpus-per-task=2\n#SBATCH --mem=2G\n');
    expect(script).toContain(`exec /usr/bin/node /opt/chernel/bin/chernel.js sweep run '/data/x plan.json' --shards 4 --workers "\${SLURM_CPUS_PER_TASK:-1}"`);
    expect(() => sbatchScript({ shards: 2, name: 'n', logDir: '/l', workdir: '/w', command: ['x'], time: 'soon' })).toThrow(/^time: expected something like/);
  });
});

describe('chernel sweep: bad input fails before any compute, naming the field', () => {
  let dir: string;
  let stderr: string;
  beforeEach(() => {
    dir = mkdtempSync(join(tmpdir(), 'chernel-sweep-cli-'));
    stderr = '';
    vi.spyOn(process.stderr, 'write').mockImplementation((chunk: string | Uint8Array) => ((stderr += String(chunk)), true));
  });
  afterEach(() => {
    vi.restoreAllMocks();
    rmSync(dir, { recursive: true, force: true });
  });
  const cli = (...args: string[]) => runSweepCli(args, () => {});
  const writeRequest = (edit: (r: Record<string, any>) => void = () => {}) => {
    const r: Record<string, any> = { kind: 'phase-map', model: 'qwz', quantity: 'chern', grid: 8, axes: [{ param: 'u', from: -3, to: 3, count: 7 }] };
    edit(r);
    const path = join(dir, 'q.request.json');
    writeFileSync(path, JSON.stringify(r));
    return path;
  };

  it('a request whose model does not validate', async () => {
    const path = writeRequest((r) => (r.model = { ...qwz(), terms: [{ from: 'a', to: 'C', cell: [0, 0], amplitude: 1 }] }));
    expect(await cli('plan', path)).toBe(2);
    expect(stderr).toMatch(/ModelError: model\.terms\[0\]\.to: unknown orbital "C"/);
    expect(existsSync(join(dir, 'q.plan.json'))).toBe(false);
  });

  it('an empty grid, an unknown catalogue model', async () => {
    expect(await cli('plan', writeRequest((r) => (r.axes[0].count = 0)))).toBe(2);
    expect(stderr).toMatch(/axes\[0\]\.count: the grid is empty/);
    expect(await cli('plan', writeRequest((r) => (r.model = 'qwzz')))).toBe(2);
    expect(stderr).toMatch(/catalogue: no model "qwzz"/);
  });

  it('a shard index out of range, or a plan edited by hand, computes nothing', async () => {
    expect(await cli('plan', writeRequest())).toBe(0);
    const planPath = join(dir, 'q.plan.json');
    expect(await cli('run', planPath, '--shard', '4', '--shards', '4')).toBe(2);
    expect(stderr).toMatch(/shard: expected a shard index from 0 to 3. Value: 4/);
    expect(existsSync(sweepPaths(planPath).shardDir)).toBe(false);
    const plan = JSON.parse(readFileSync(planPath, 'utf8'));
    plan.request.model.orbitals[1].label = 'a';
    writeFileSync(planPath, JSON.stringify(plan));
    expect(await cli('run', planPath, '--shard', '0', '--shards', '2')).toBe(2);
    expect(stderr).toMatch(/request\.model\.orbitals\[1\]\.label: duplicate orbital label "a"/);
    expect(existsSync(sweepPaths(planPath).shardDir)).toBe(false);
  });

  it('a misspelt option in a request file names the closest valid one', async () => {
    expect(await cli('plan', writeRequest((r) => (r.gird = 8)))).toBe(2);
    expect(stderr).toMatch(/gird: unknown field for a phase-map request of "chern"; did you mean "grid"\?/);
    expect(await cli('plan', writeRequest((r) => (r.axes[0].cont = 3)))).toBe(2);
    expect(stderr).toMatch(/axes\[0\]\.cont: unknown field for a swept axis; did you mean "count"\?/);
    expect(existsSync(join(dir, 'q.plan.json'))).toBe(false);
  });

  it('a second runner of one shard is refused while the first holds it; a dead runner\'s lock is taken over', async () => {
    expect(await cli('plan', writeRequest())).toBe(0);
    const planPath = join(dir, 'q.plan.json');
    const file = sweepPaths(planPath).shardFile(0, 2);
    mkdirSync(sweepPaths(planPath).shardDir, { recursive: true });
    // A live runner on this host (this very process) holds the shard.
    writeFileSync(`${file}.lock`, JSON.stringify({ pid: process.pid, host: hostname(), started: 'now', job: null }));
    expect(await cli('run', planPath, '--shard', '0', '--shards', '2')).toBe(2);
    expect(stderr).toMatch(/is being written by another runner \(pid \d+ on/);
    expect(existsSync(file)).toBe(false);
    // Its process is gone: the lock is stale, the run proceeds and releases it.
    writeFileSync(`${file}.lock`, JSON.stringify({ pid: 2 ** 22 + 17, host: hostname(), started: 'then', job: null }));
    expect(await cli('run', planPath, '--shard', '0', '--shards', '2')).toBe(0);
    expect(existsSync(file)).toBe(true);
    expect(existsSync(`${file}.lock`)).toBe(false);
  });

  it('merge detects a truncated shard output and reports the missing points by point', async () => {
    expect(await cli('plan', writeRequest())).toBe(0);
    const planPath = join(dir, 'q.plan.json');
    for (const i of ['0', '1']) expect(await cli('run', planPath, '--shard', i, '--shards', '2')).toBe(0);
    const paths = sweepPaths(planPath);
    const text = readFileSync(paths.shardFile(1, 2), 'utf8');
    writeFileSync(paths.shardFile(1, 2), text.slice(0, text.length / 2));
    stderr = '';
    expect(await cli('merge', planPath)).toBe(1);
    expect(stderr).toMatch(/shard 1: rejected: shard-1-of-2.json is not valid JSON/);
    expect(stderr).toMatch(/shard 1: 3 missing: u=-2; u=0; u=2/);
    expect(existsSync(paths.result)).toBe(false);
    // Rerunning the shard replaces the corrupt output; then the merge finishes the map.
    expect(await cli('run', planPath, '--shard', '1', '--shards', '2')).toBe(0);
    expect(stderr).toMatch(/ignored its earlier output \(not valid JSON/);
    expect(await cli('merge', planPath)).toBe(0);
    const result = JSON.parse(readFileSync(paths.result, 'utf8'));
    expect(result.kind).toBe('phase-map');
    expect(result.values).toEqual([0, null, 1, null, -1, null, 0]); // u = -2, 0, 2 close the gap on the k-grid
  });
});

