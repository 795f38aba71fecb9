/**
 * An averaged map whose plan splits each point's ensemble into blocks of members: shards compute
 * blocks, a stopped shard resumes past its finished blocks (mid-ensemble), and the merge gives each
 * point the mean and standard error of the unsplit ensemble of the same seeds, checked against the
 * `ensemble` kind computed directly (its standard error, the sample standard deviation over
 * sqrt(count), is checked against its definition in realspace.test.ts). The physics: QWZ with
 * u = -1 has C = +1 (Qi, Wu & Zhang, PRB 74, 085308 (2006)), so clean samples give Bott index 1;
 * strong onsite disorder closes the gap at E = 0 in some samples, which the 0.05 gap tolerance
 * turns into members with no value (nulls), and spreads the others (common practice).
 */
import { describe, expect, it } from 'vitest';
import { NodeWorkerExecutor } from '../../cluster/node-workers.js';
import { compute } from '../../src/compute.js';
import { InterruptedError } from '../../src/interrupt.js';
import { qwz } from '../../src/model/catalogue.js';
import type { EnsembleResult } from '../../src/realspace/ensemble.js';
import { canonicalJson, digest } from '../../src/scan/checksum.js';
import { InProcessExecutor } from '../../src/scan/executor.js';
import { makeShardOutput, mergeShards, planTasks, runShard, shardTasks, sweepPlan, validatePlan, type ShardOutput, type SweepPlan } from '../../src/scan/plan.js';
import { pointFunction } from '../../src/scan/point.js';
import type { BlockRecord } from '../../src/scan/record.js';
import { phaseMapSync } from '../../src/scan/run.js';
import { pointKey, type PhaseMapRequest, type PointTarget } from '../../src/scan/sweep.js';

const sample = { of: 'bott', samples: 10, sizes: [6, 6], seed: 5, gapTolerance: 0.05 } as const;
const request: PhaseMapRequest = {
  kind: 'phase-map', model: qwz(), params: { u: -1 }, quantity: 'ensemble', ...sample,
  axes: [{ param: 'onsiteDisorder', from: 0, to: 6, count: 4 }],
};
const json = <T>(x: T): T => JSON.parse(JSON.stringify(x));
const plan = json(sweepPlan(request, new Map(), { membersPerTask: 3 })!);
const engine = () => new InProcessExecutor(pointFunction);

/** The engine's point function, counting the members it computes and stopping after `stopAfter` tasks. */
function counting(stopAfter = Infinity) {
  const controller = new AbortController();
  const tasks: { first: number; samples: number }[] = [];
  const factory = (target: PointTarget) => {
    const fn = pointFunction(target);
    return (p: Record<string, number>) => {
      const outcome = fn(p);
      tasks.push({ first: p.first, samples: p.samples });
      if (tasks.length >= stopAfter) controller.abort();
      return outcome;
    };
  };
  return { executor: new InProcessExecutor(factory), signal: controller.signal, tasks, members: () => tasks.reduce((n, t) => n + t.samples, 0) };
}

describe('a plan that splits averaged points into blocks of members', () => {
  it('has a task per block, blocks of at most membersPerTask members in member order, strided over shards', () => {
    expect(plan.membersPerTask).toBe(3);
    const tasks = planTasks(plan);
    expect(tasks).toHaveLength(4 * 4);
    expect(tasks.slice(0, 4).map((t) => [t.block!.first, t.block!.samples])).toEqual([[0, 3], [3, 3], [6, 3], [9, 1]]);
    expect(shardTasks(plan, 0, 2).map((t) => t.block!.first)).toEqual([0, 6, 0, 6, 0, 6, 0, 6]);
    // A plan of whole points is written as before: no such field, one task per point.
    const whole = sweepPlan(request)!;
    expect('membersPerTask' in whole).toBe(false);
    expect(planTasks(whole)).toEqual(whole.points.map((coords) => ({ coords })));
    expect('blocks' in makeShardOutput(whole, 0, 1, [], [])).toBe(false);
  });

  it('stops a shard mid-ensemble, resumes it past its saved blocks, and merges to the unsplit ensembles exactly', async () => {
    // Shard 0 of 2 is stopped after 3 of its 8 blocks: point 0's two blocks and the first of point 1's.
    const first = counting(3);
    let saved: ShardOutput | null = null;
    await expect(runShard(plan, 0, 2, { executor: first.executor, signal: first.signal, saveEvery: 1, onSave: (o) => (saved = json(o)) })).rejects.toBeInstanceOf(InterruptedError);
    expect(saved!.complete).toBe(false);
    expect(saved!.blocks!.map((b) => [b[0][0], b[1], b[2].length])).toEqual([[0, 0, 3], [0, 6, 3], [2, 0, 3]]);

    // The rerun computes only the 5 unfinished blocks: 15 of the shard's 24 members, none of the 9 saved.
    const again = counting();
    const resumed = await runShard(plan, 0, 2, { executor: again.executor, previous: saved!, onSave: () => {} });
    expect([resumed.reused, resumed.computed]).toEqual([3, 5]);
    expect(again.members()).toBe(15);
    expect(again.tasks).toEqual([{ first: 6, samples: 3 }, { first: 0, samples: 3 }, { first: 6, samples: 3 }, { first: 0, samples: 3 }, { first: 6, samples: 3 }]);
    const uninterrupted = await runShard(plan, 0, 2, { executor: engine(), onSave: () => {} });
    expect(json(resumed.output)).toEqual(json(uninterrupted.output));

    // Shard 1 on two worker threads: the members travel back in the pool's messages.
    const pool = new NodeWorkerExecutor({ workers: 2 });
    let other: ShardOutput;
    try {
      other = json((await runShard(plan, 1, 2, { executor: pool, onSave: () => {} })).output);
    } finally {
      await pool.close();
    }
    expect(other).toEqual(json((await runShard(plan, 1, 2, { executor: engine(), onSave: () => {} })).output));
    const report = mergeShards(plan, [json(resumed.output), other]);
    expect(report.complete).toBe(true);

    // Each merged point is the ensemble kind's answer for the same ten seeds, exactly (so within 1e-12),
    // with the null members counted as it counts them.
    let nulls = 0;
    for (const coords of plan.points) {
      const direct = compute({ kind: 'ensemble', model: qwz(), params: { u: -1 }, ...sample, onsiteDisorder: coords[0] }) as unknown as EnsembleResult;
      const merged = report.known.get(pointKey(coords))!;
      expect(merged.value, `W = ${coords[0]}`).toBe(direct.mean);
      expect(merged.standardError, `W = ${coords[0]}`).toBe(direct.standardError);
      expect(merged.members!.values).toEqual(Array.from(direct.values, (v) => (Number.isNaN(v) ? null : v)));
      expect(merged.members!.values.filter((v) => v === null).length).toBe(direct.checks.nulls);
      expect(merged.members!.values.length - direct.checks.nulls).toBe(direct.count);
      nulls += direct.checks.nulls;
    }
    expect(nulls).toBeGreaterThan(0);
    expect(report.known.get('4')!.standardError).toBeGreaterThan(0);

    // And the merged map is the map computed unsplit in one process.
    const unsplit = phaseMapSync(request, pointFunction);
    expect(report.result!.values).toEqual(unsplit.values);
    expect(report.result!.standardErrors).toEqual(unsplit.standardErrors);
    expect(report.result!.crossings).toEqual(unsplit.crossings);
  });
});

describe('a point function that returns no members', () => {
  it('fails each block it computes, by point and first member, and the merge reports them', async () => {
    const bare = new InProcessExecutor((target) => {
      const fn = pointFunction(target);
      return (p) => {
        const { members: _, ...outcome } = fn(p);
        return outcome;
      };
    });
    const out = json((await runShard(plan, 1, 2, { executor: bare, onSave: () => {} })).output);
    expect(out.failures).toHaveLength(8);
    const report = mergeShards(plan, [undefined, out]);
    expect(report.complete).toBe(false);
    expect(report.failed[0]).toEqual({ shard: 1, coords: [0], first: 3, error: 'the point function returned no members for members 3..5' });
  });
});

describe('block records and plans that are refused', () => {
  // Shard 1's blocks, re-signed after an edit so that only the edit is wrong.
  const signed = (blocks: unknown[]) => makeShardOutput(plan, 1, 2, [], [], blocks as BlockRecord[]);
  const problem = (blocks: unknown[]) => mergeShards(plan, [undefined, signed(blocks)]).rejected.find((r) => r.shard === 1)?.problem;

  it('names the malformed field of a block record', () => {
    expect(problem([[[0], 'x', [1, 1, 1]]])).toMatch(/^blocks\[0\]\.first: expected a member index >= 0\. Value: "x"/);
    expect(problem([[[0], 3, [1, '1', 1]]])).toMatch(/^blocks\[0\]\.values: expected a non-empty array/);
    expect(problem([[[0, 1], 3, [1, 1, 1]]])).toMatch(/^blocks\[0\]\.coords: expected 1 finite coordinates/);
    expect(problem([[[0], 3]])).toMatch(/^blocks\[0\]: expected a block record/);
  });

  it('refuses a block outside the point\'s members, not one of its blocks, of another shard, or twice', () => {
    expect(problem([[[0], 9, [1, 1]]])).toMatch(/^blocks\[0\]: members 9\.\.10 of point \(0\) are not one of its blocks \(0\.\.2, 3\.\.5, 6\.\.8, 9\.\.9\)/);
    expect(problem([[[0], 4, [1, 1, 1]]])).toMatch(/members 4\.\.6 of point \(0\) are not one of its blocks/);
    expect(problem([[[0], 0, [1, 1, 1]]])).toMatch(/members 0\.\.2 of point \(0\) are not assigned to this shard/);
    expect(problem([[[0], 3, [1, 1, 1]], [[0], 3, [1, 1, 1]]])).toMatch(/^blocks\[1\]: members 3\.\.5 of point \(0\) appear twice/);
    expect(problem([[[7], 3, [1, 1, 1]]])).toMatch(/^blocks\[0\]: \(7\) is not a point of this round/);
    // Whole-point records in a shard of a split plan, and blocks in a shard of a whole-point plan.
    const whole = sweepPlan(request)!;
    const { checksum: _, ...body } = { ...makeShardOutput(whole, 0, 1, [], []), blocks: [] };
    expect(mergeShards(whole, [{ ...body, checksum: digest(canonicalJson(body)) }]).rejected[0].problem).toBe('holds blocks of members, but its plan computes whole points');
  });

  it('refuses membersPerTask where there are no members to split, naming the field', () => {
    expect(() => sweepPlan(request, new Map(), { membersPerTask: 0 })).toThrow(/^membersPerTask: expected a whole number >= 1/);
    expect(() => sweepPlan({ kind: 'phase-map', model: qwz(), quantity: 'chern', grid: 8, axes: [{ param: 'u', from: -3, to: -1, count: 2 }] }, new Map(), { membersPerTask: 2 })).toThrow(/^membersPerTask: only an averaged map/);
    expect(() => sweepPlan({ ...request, axes: [{ param: 'samples', from: 4, to: 8, count: 2 }] }, new Map(), { membersPerTask: 2 })).toThrow(/^axes\[0\]\.param: a map split into blocks of members cannot sweep "samples"/);
    const edited: SweepPlan = { ...plan, membersPerTask: 2.5 };
    expect(() => validatePlan(edited)).toThrow(/^membersPerTask: expected a whole number >= 1\. Value: 2\.5/);
  });
});
