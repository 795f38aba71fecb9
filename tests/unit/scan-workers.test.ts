// Worker-thread executor: identical results to the in-process run, stopping, point errors, and
// checkpoint files. Real worker threads, real engine (QWZ Chern numbers) where it matters.
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { InterruptedError } from '../../src/interrupt.js';
import { lattice } from '../../src/model/builder.js';
import { qwz } from '../../src/model/catalogue.js';
import { PointError } from '../../src/scan/executor.js';
import { NodeWorkerExecutor, runPhaseMapWithCheckpointFile } from '../../cluster/node-workers.js';
import { pointFunction } from '../../src/scan/point.js';
import { phaseMapSync, runPhaseMap } from '../../src/scan/run.js';
import type { PhaseMapRequest } from '../../src/scan/sweep.js';

const fixture = new URL('./fixtures/scan-points.ts', import.meta.url).href;
const knobs = lattice('two knobs', [[1, 0], [0, 1]])
  .parameter('x', { default: 0 }).parameter('y', { default: 0 })
  .site('a', [0, 0]).site('b', [0, 0]).onsite('a', 'x').onsite('b', 'y').hop('a', 'b', [1, 0], 1)
  .build();
// Two pools for the whole file (starting worker threads is the slow part): the engine's point
// function, and the fixture module.
const enginePool = new NodeWorkerExecutor({ workers: 2 });
const fixturePool = new NodeWorkerExecutor({ workers: 2, pointModule: fixture });
afterAll(async () => Promise.all([enginePool.close(), fixturePool.close()]));

describe('NodeWorkerExecutor', () => {
  it('gives exactly the in-process phase map (QWZ, 2 threads, with refinement)', async () => {
    const request: PhaseMapRequest = {
      kind: 'phase-map', model: qwz(), quantity: 'chern', grid: 12,
      axes: [{ param: 'u', from: -3.1, to: 3.3, count: 17 }], refine: { tolerance: 1e-3 },
    };
    const inProcess = phaseMapSync(request, pointFunction);
    const progress: number[] = [];
    const onThreads = await runPhaseMap(request, { executor: enginePool, onProgress: (p) => progress.push(p.done) });
    expect(onThreads).toEqual(inProcess);
    expect(onThreads.values).toEqual([0, 0, 0, 1, 1, 1, 1, 1, -1, -1, -1, -1, -1, 0, 0, 0, 0]);
    expect(progress.at(-1)).toBe(17 + onThreads.refinement!.points);
  });

  it('runs a 2D map through a point module, and names the point that fails', async () => {
    const request: PhaseMapRequest = {
      kind: 'phase-map', model: knobs, quantity: 'chern',
      axes: [{ param: 'x', from: -3, to: 3, count: 7 }, { param: 'y', from: -3, to: 3, count: 5 }], refine: { tolerance: 1e-3 },
    };
    const { pointFunction: local } = await import('./fixtures/scan-points.js');
    const executor = fixturePool;
    expect(await runPhaseMap(request, { executor })).toEqual(phaseMapSync(request, local));
    const failing = { ...request, axes: [{ param: 'x', from: 97, to: 99, count: 3 }] };
    await expect(runPhaseMap(failing, { executor })).rejects.toThrow(PointError);
    await expect(runPhaseMap(failing, { executor })).rejects.toThrow(/sweep point \{"x":99\}: RangeError: x = 99 is not allowed here/);
  });

  it('stops on abort, keeps a checkpoint file, and resumes from it without recomputing', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'chernel-scan-'));
    try {
      const file = join(dir, 'sweep.checkpoint.json');
      const request: PhaseMapRequest = {
        kind: 'phase-map', model: knobs, quantity: 'chern', delayMs: 5,
        axes: [{ param: 'x', from: -3, to: 3, count: 40 }, { param: 'y', from: -1, to: 1, count: 3 }],
      };
      const executor = fixturePool;
      const controller = new AbortController();
      let computedBeforeStop = 0;
      const first = runPhaseMapWithCheckpointFile(request, file, {
        executor, signal: controller.signal, checkpointEvery: 8,
        onProgress: (p) => {
          computedBeforeStop = p.computed;
          if (p.computed >= 30) controller.abort();
        },
      });
      await expect(first).rejects.toBeInstanceOf(InterruptedError);
      const saved = JSON.parse(readFileSync(file, 'utf8')) as { points: unknown[] };
      expect(saved.points.length).toBe(computedBeforeStop);
      expect(computedBeforeStop).toBeLessThan(120);

      let computedAfter = 0;
      let reused = 0;
      const result = await runPhaseMapWithCheckpointFile({ ...request }, file, {
        executor, onProgress: (p) => ((computedAfter = p.computed), (reused = p.reused)),
      });
      expect(reused).toBe(computedBeforeStop);
      expect(computedAfter).toBe(120 - computedBeforeStop);
      const { pointFunction: local } = await import('./fixtures/scan-points.js');
      expect(result).toEqual(phaseMapSync(request, local));
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
