/**
 * Averaged phase maps keep each point's standard error, wherever the points are computed and
 * stored: in this thread, on two worker threads, through a checkpoint and through a cluster plan's
 * shards and merge. Every number is checked against the `ensemble` kind computed directly for the
 * same seeded samples (its standard error, the sample standard deviation over sqrt(count), is
 * checked against its definition in realspace.test.ts). The physics: QWZ with u = -1 has C = +1
 * (Qi, Wu & Zhang, PRB 74, 085308 (2006); references.md's sign convention), so the clean Bott index
 * is 1, and strong onsite disorder localises every state and takes the average towards 0 (common
 * practice).
 */
import { afterAll, describe, expect, it } from 'vitest';
import { NodeWorkerExecutor } from '../../cluster/node-workers.js';
import { compute } from '../../src/compute.js';
import { qwz } from '../../src/model/catalogue.js';
import type { EnsembleResult } from '../../src/realspace/ensemble.js';
import { InProcessExecutor } from '../../src/scan/executor.js';
import { mergeShards, runShard, sweepPlan } from '../../src/scan/plan.js';
import { pointFunction } from '../../src/scan/point.js';
import { phaseMapSync, runPhaseMap, type SweepCheckpoint } from '../../src/scan/run.js';
import { RESOLVING_ERRORS, type PhaseMapRequest, type PhaseMapResult, type PointOutcome } from '../../src/scan/sweep.js';

const sample = { of: 'bott', samples: 4, sizes: [6, 6], seed: 5 } as const;
const request: PhaseMapRequest = {
  kind: 'phase-map', model: qwz(), params: { u: -1 }, quantity: 'ensemble', ...sample,
  axes: [{ param: 'onsiteDisorder', from: 0, to: 6, count: 5 }],
};
const direct = phaseMapSync(request, pointFunction);
const json = <T>(x: T): T => JSON.parse(JSON.stringify(x));
// Only NaN gaps differ after JSON (null there, NaN again when read back): compare the rest exactly.
const same = (a: PhaseMapResult, b: PhaseMapResult) => {
  expect(a.values).toEqual(b.values);
  expect(a.standardErrors).toEqual(b.standardErrors);
  expect(a.crossings).toEqual(b.crossings);
};

describe('the standard error of each point of an averaged map', () => {
  it('is the ensemble kind\'s standard error of the same seeded samples, point by point', () => {
    expect(direct.standardErrors).toHaveLength(5);
    direct.axes[0].values.forEach((w, i) => {
      const cell = compute({ kind: 'ensemble', model: qwz(), params: { u: -1 }, ...sample, onsiteDisorder: w }) as unknown as EnsembleResult;
      expect(direct.values[i], `W = ${w}`).toBe(cell.mean);
      expect(direct.standardErrors![i], `W = ${w}`).toBe(cell.standardError);
    });
    // Clean samples agree exactly (no error); strong disorder spreads the members.
    expect(direct.values[0]).toBe(1);
    expect(direct.standardErrors![0]).toBe(0);
    expect(direct.standardErrors!.some((e) => e !== null && e > 0)).toBe(true);
  });

  it('is absent from a map of a quantity that is not an average', () => {
    const chern = phaseMapSync({ kind: 'phase-map', model: qwz(), quantity: 'chern', grid: 8, axes: [{ param: 'u', from: -3, to: -1, count: 2 }] }, pointFunction);
    expect(chern.standardErrors).toBeUndefined();
    expect(chern.crossings).toBeUndefined();
  });

  it('survives a checkpoint (as JSON) and a resume that computes only the missing points', async () => {
    let saved: SweepCheckpoint | null = null;
    await runPhaseMap(request, { pointFunction, onCheckpoint: (c) => (saved = json(c)) });
    expect(saved!.points[0]).toHaveLength(5);
    const partial = { ...saved!, points: saved!.points.slice(0, 3) };
    let computed = 0;
    const counting = (target: Parameters<typeof pointFunction>[0]) => {
      const fn = pointFunction(target);
      return (p: Record<string, number>) => (computed++, fn(p));
    };
    same(await runPhaseMap(request, { pointFunction: counting, checkpoint: partial }), direct);
    expect(computed).toBe(2);
  });

  it('survives a plan split into 3 shards (written and read as JSON) and their merge', async () => {
    const plan = json(sweepPlan(request)!);
    const outputs = [];
    for (let s = 0; s < 3; s++) outputs.push(json((await runShard(plan, s, 3, { executor: new InProcessExecutor(pointFunction), onSave: () => {} })).output));
    const report = mergeShards(plan, outputs);
    expect(report.complete).toBe(true);
    same(report.result!, direct);
  });

  it('comes back from 2 worker threads', async () => {
    const pool = new NodeWorkerExecutor({ workers: 2 });
    try {
      same(await runPhaseMap(request, { executor: pool }), direct);
    } finally {
      await pool.close();
    }
  });

  it('resumes a checkpoint written before points kept their error: those points have none', async () => {
    // The record form of that time: [coords, value, gap] (and [.., 1] when doubtful).
    const now = json(await checkpointOf(request));
    const old: SweepCheckpoint = { ...now, points: now.points.slice(0, 2).map((r) => [r[0], r[1], r[2]]) };
    const resumed = await runPhaseMap(request, { pointFunction, checkpoint: old });
    expect(resumed.values).toEqual(direct.values);
    const olds = new Set(old.points.map((r) => r[0][0]));
    expect(resumed.standardErrors).toEqual(direct.standardErrors!.map((e, i) => (olds.has(direct.axes[0].values[i]) ? null : e)));
    expect(olds.size).toBe(2);
    // A malformed record of the new form is refused, naming it.
    const bad = { ...old, points: [[[0], 1, null, 2, 0.1]] };
    await expect(runPhaseMap(request, { pointFunction, checkpoint: bad as unknown as SweepCheckpoint })).rejects.toThrow(/^checkpoint\.points\[0\]: expected/);
  });
});

async function checkpointOf(r: PhaseMapRequest): Promise<SweepCheckpoint> {
  let saved: SweepCheckpoint | null = null;
  await runPhaseMap(r, { pointFunction, onCheckpoint: (c) => (saved = c) });
  return saved!;
}

describe('crossings of a half-integer in an averaged map (invented means and errors, to exercise the rule)', () => {
  // Each point's mean and error are read off the swept value: a table of made-up numbers.
  const table: Record<number, PointOutcome> = {
    0: { value: 0.02, gap: Number.NaN, standardError: 0.01 },
    1: { value: 0.9, gap: Number.NaN, standardError: 0.05 },
    2: { value: 0.55, gap: Number.NaN, standardError: 0.1 },
    3: { value: 0.1, gap: Number.NaN, standardError: null },
  };
  const map = phaseMapSync(
    { kind: 'phase-map', model: qwz(), quantity: 'ensemble', axes: [{ param: 'onsiteDisorder', from: 0, to: 3, count: 4 }] },
    () => (p) => table[p.onsiteDisorder],
  );

  it(`is resolved only when both ends lie more than ${RESOLVING_ERRORS} standard errors from the level`, () => {
    expect(map.standardErrors).toEqual([0.01, 0.05, 0.1, null]);
    const c = map.crossings!;
    expect(c.map((x) => [x.lower, x.upper, x.level, x.resolved])).toEqual([
      [0, 1, 0.5, true], // 0.02 is 48 errors below 1/2, 0.9 eight above
      [2, 3, 0.5, false], // 0.55 is within two errors (0.2) of 1/2; 0.1 has no error
    ]);
    // Linear between the two means: 0.02 + (0.9 - 0.02) t = 0.5.
    expect(c[0].at.onsiteDisorder).toBeCloseTo((0.5 - 0.02) / 0.88, 14);
    expect(c[1].values).toEqual([0.55, 0.1]);
    expect(c[1].standardErrors).toEqual([0.1, null]);
    expect(map.checks.warnings.join()).toMatch(/1 of 2 crossings of a half-integer are not resolved/);
  });
});
