// The sweep schedule, boundary bisection, checkpoints and the in-process executor, driven by
// injected point functions whose phase boundaries are known exactly (so the tests check the
// refinement logic itself; tests/reference/scan.test.ts checks real models against papers).
import { describe, expect, it } from 'vitest';
import { lattice } from '../../src/model/builder.js';
import { ModelError } from '../../src/model/errors.js';
import { InterruptedError } from '../../src/interrupt.js';
import { canonicalJson, digest } from '../../src/scan/checksum.js';
import { InProcessExecutor, PointError } from '../../src/scan/executor.js';
import { makeCheckpoint, phaseMapSync, runPhaseMap, type SweepCheckpoint } from '../../src/scan/run.js';
import { advanceSweep, validatePhaseMapRequest, type PhaseMapRequest, type PointFunction, type PointOutcome } from '../../src/scan/sweep.js';

// A two-parameter model; its Hamiltonian is irrelevant here, only its parameter names are used.
const model = lattice('two knobs', [[1, 0], [0, 1]])
  .parameter('x', { default: 0, range: [-10, 10] })
  .parameter('y', { default: 0 })
  .site('a', [0, 0])
  .site('b', [0, 0])
  .onsite('a', 'x')
  .onsite('b', 'y')
  .hop('a', 'b', [1, 0], 1)
  .build();

function request(extra: Partial<PhaseMapRequest>): PhaseMapRequest {
  return { kind: 'phase-map', model, quantity: 'chern', axes: [{ param: 'x', from: -3, to: 3, count: 13 }], ...extra };
}

/** A counting point function: 1D steps at the given positions, values 0, 1, 2, ... left to right. */
function steps(edges: number[]): { fn: PointFunction; calls: string[] } {
  const calls: string[] = [];
  const fn: PointFunction = ({ x, y }) => {
    calls.push(`${x},${y}`);
    return { value: edges.filter((e) => x > e).length, gap: Math.min(...edges.map((e) => Math.abs(x - e))) };
  };
  return { fn, calls };
}

describe('phase-map schedule and refinement', () => {
  it('locates 1D boundaries to the tolerance with far fewer points than a dense grid', () => {
    const edges = [-Math.SQRT2, Math.E / 3]; // irrational, so no grid or midpoint lands on them
    const { fn, calls } = steps(edges);
    const result = phaseMapSync(request({ refine: { tolerance: 1e-6 } }), () => fn);
    expect(result.values).toEqual([0, 0, 0, 0, 1, 1, 1, 1, 2, 2, 2, 2, 2]);
    expect(result.boundaries).toHaveLength(2);
    result.boundaries.forEach((b, n) => {
      expect(b.along).toBe('x');
      expect(b.upper - b.lower).toBeLessThanOrEqual(1e-6);
      expect(b.lower).toBeLessThan(edges[n]);
      expect(b.upper).toBeGreaterThanOrEqual(edges[n]);
      expect(Math.abs(b.at.x - edges[n])).toBeLessThanOrEqual(0.5e-6);
      expect(b.values).toEqual([n, n + 1]);
    });
    // 13 grid points + 2 brackets x ceil(log2(0.5 / 1e-6)) = 19 rounds; a dense grid would need 6e6.
    expect(calls.length).toBe(13 + 2 * 19);
    expect(new Set(calls).size).toBe(calls.length);
    expect(result.refinement).toEqual({ tolerance: 1e-6, rounds: 19, points: 38 });
  });

  it('keeps both halves when a third phase sits inside a bracket', () => {
    // Grid points at -3 and 3 only; the middle phase (value 2) lies in (-0.5, 0.7).
    const fn: PointFunction = ({ x }) => ({ value: x <= -0.5 ? 0 : x < 0.7 ? 2 : 1, gap: 1 });
    const result = phaseMapSync(request({ axes: [{ param: 'x', from: -3, to: 3, count: 2 }], refine: { tolerance: 1e-4 } }), () => fn);
    expect(result.boundaries.map((b) => b.values)).toEqual([[0, 2], [2, 1]]);
    expect(Math.abs(result.boundaries[0].at.x + 0.5)).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(result.boundaries[1].at.x - 0.7)).toBeLessThanOrEqual(1e-4);
  });

  it('brackets a gapless stretch from both sides instead of giving it an invariant', () => {
    // Gapless (value null) on |x - 1| < 0.05, value 0 left and 1 right of it.
    const fn: PointFunction = ({ x }) => (Math.abs(x - 1) < 0.05 ? { value: null, gap: 0 } : { value: x < 1 ? 0 : 1, gap: Math.abs(x - 1) });
    const result = phaseMapSync(request({ axes: [{ param: 'x', from: -3, to: 3, count: 61 }], refine: { tolerance: 1e-3 } }), () => fn);
    expect(result.values.filter((v) => v === null)).toHaveLength(1); // x = 1 itself
    expect(result.checks.gapless).toBe(true);
    expect(result.checks.warnings[0]).toMatch(/1 of 61 grid points are gapless/);
    expect(result.boundaries.map((b) => b.values)).toEqual([[0, null], [null, 1]]);
    expect(Math.abs(result.boundaries[0].at.x - 0.95)).toBeLessThanOrEqual(1e-3);
    expect(Math.abs(result.boundaries[1].at.x - 1.05)).toBeLessThanOrEqual(1e-3);
  });

  it('refines a 2D boundary along both axes (a disc of radius 2)', () => {
    const r = 2;
    const fn: PointFunction = ({ x, y }) => ({ value: x * x + y * y < r * r ? 1 : 0, gap: Math.abs(Math.hypot(x, y) - r) });
    const result = phaseMapSync(
      request({ axes: [{ param: 'x', from: -3, to: 3, count: 9 }, { param: 'y', from: -3, to: 3, count: 7 }], refine: { tolerance: 1e-5 } }),
      () => fn,
    );
    expect(result.values).toHaveLength(63);
    // values[j * n0 + i] is at (x_i, y_j): the middle row (y = 0) crosses the disc.
    expect(result.values.slice(3 * 9, 4 * 9)).toEqual([0, 0, 1, 1, 1, 1, 1, 0, 0]);
    expect(result.boundaries.some((b) => b.along === 'x')).toBe(true);
    expect(result.boundaries.some((b) => b.along === 'y')).toBe(true);
    for (const b of result.boundaries) {
      const { x, y } = b.at;
      expect(Math.abs(Math.hypot(x, y) - r)).toBeLessThanOrEqual(1e-5);
      expect(b.upper - b.lower).toBeLessThanOrEqual(1e-5);
    }
  });

  it('warns about points whose diagnostic flagged its own result (doubtful), keeping the values', () => {
    const fn: PointFunction = ({ x }) => (x > 2 ? { value: 0, gap: 1, doubtful: true } : { value: 0, gap: 1 });
    const result = phaseMapSync(request({}), () => fn);
    expect(result.values.every((v) => v === 0)).toBe(true);
    expect(result.checks.warnings).toEqual([expect.stringMatching(/^2 of 13 grid points were flagged by the chern diagnostic .* first at \{"x":2.5\}/)]);
  });

  it('lists pending points in a fixed order: grid row-major with x fastest, then one round at a time', () => {
    const req = request({ axes: [{ param: 'x', from: 0, to: 1, count: 3 }, { param: 'y', from: 5, to: 6, count: 2 }], refine: { tolerance: 0.1 } });
    const first = advanceSweep(req, new Map());
    expect(first).toMatchObject({ done: false, stage: 'grid', round: 0, pending: [[0, 5], [0.5, 5], [1, 5], [0, 6], [0.5, 6], [1, 6]] });
    const known = new Map<string, PointOutcome>();
    for (const [key, v] of [['0,5', 0], ['0.5,5', 0], ['1,5', 1], ['0,6', 0], ['0.5,6', 0], ['1,6', 0]] as const) known.set(key, { value: v, gap: 1 });
    expect(advanceSweep(req, known)).toMatchObject({ done: false, stage: 'refine', round: 1, pending: [[0.75, 5], [1, 5.5]] });
  });
});

describe('phase-map validation (fails before any compute, naming the field)', () => {
  const never = () => () => {
    throw new Error('must not be called');
  };
  it.each([
    [{ axes: [{ param: 'x', from: 0, to: 1, count: 0 }] }, 'axes[0].count', /grid is empty/],
    [{ axes: [] }, 'axes', /one or two/],
    [{ axes: [{ param: 'z', from: 0, to: 1, count: 3 }] }, 'axes[0].param', /no parameter "z"/],
    [{ axes: [{ param: 'x', from: 0, to: 11, count: 3 }] }, 'axes[0].to', /outside its declared range/],
    [{ quantity: 'hall' as never }, 'quantity', /"hall"/],
    [{ quantity: 'gap' as const, refine: { tolerance: 0.1 } }, 'refine', /quantised invariant/],
    [{ refine: { tolerance: 0 } }, 'refine.tolerance', /positive/],
    [{ params: { w: 1 } }, 'params.w', /no parameter "w"/],
    [{ model: { ...model, orbitals: [] } }, 'model.orbitals', /at least one orbital/],
  ])('%j -> %s', (extra, field, message) => {
    const err = (() => {
      try {
        phaseMapSync(request(extra as Partial<PhaseMapRequest>), never);
      } catch (e) {
        return e;
      }
    })();
    expect(err).toBeInstanceOf(ModelError);
    expect((err as ModelError).field).toBe(field);
    expect((err as Error).message).toMatch(message);
  });

  it('names the point when a point fails', () => {
    const fn: PointFunction = ({ x }) => {
      if (x > 1) throw new ModelError('params.x', 'boom');
      return { value: 0, gap: 1 };
    };
    expect(() => phaseMapSync(request({}), () => fn)).toThrow(PointError);
    expect(() => phaseMapSync(request({}), () => fn)).toThrow(/sweep point \{"x":1.5\}: ModelError: params.x: boom/);
  });
});

describe('stopping and resuming', () => {
  const req = request({ axes: [{ param: 'x', from: -3, to: 3, count: 31 }, { param: 'y', from: 0, to: 1, count: 5 }], refine: { tolerance: 1e-4 } });

  it('a stopped sweep resumes from its checkpoint without recomputing a finished point', async () => {
    const reference = phaseMapSync(req, () => steps([-1 / 3, Math.PI / 2]).fn);
    const { fn, calls } = steps([-1 / 3, Math.PI / 2]);
    const controller = { aborted: false };
    let saved: SweepCheckpoint | undefined;
    const progress: number[] = [];
    const stopped = runPhaseMap(req, {
      pointFunction: () => (p) => {
        const outcome = fn(p);
        if (calls.length === 100) controller.aborted = true; // stop in the middle of the grid
        return outcome;
      },
      signal: controller,
      checkpointEvery: 16,
      onCheckpoint: (c) => (saved = JSON.parse(JSON.stringify(c)) as SweepCheckpoint),
      onProgress: (p) => progress.push(p.done),
    });
    await expect(stopped).rejects.toBeInstanceOf(InterruptedError);
    expect(saved?.points).toHaveLength(100);
    expect(progress.at(-1)).toBe(100);

    const resumed = await runPhaseMap(req, { pointFunction: () => fn, checkpoint: saved });
    expect(resumed).toEqual(reference);
    // No point was computed twice, and the two runs together computed each point of the sweep once.
    expect(new Set(calls).size).toBe(calls.length);
    expect(calls.length).toBe(resumed.values.length + resumed.refinement!.points);
  });

  it('refuses a checkpoint from another sweep', async () => {
    const other = makeCheckpoint(request({}), new Map());
    await expect(runPhaseMap(req, { pointFunction: () => steps([0]).fn, checkpoint: other })).rejects.toThrow(/checkpoint.fingerprint: the checkpoint belongs to another sweep/);
  });

  it('the in-process executor yields to the host so a timer can stop it', async () => {
    const slow: PointFunction = () => {
      const until = Date.now() + 2;
      while (Date.now() < until);
      return { value: 0, gap: 1 };
    };
    const controller = new AbortController();
    setTimeout(() => controller.abort(), 100);
    const big = request({ axes: [{ param: 'x', from: -3, to: 3, count: 2000 }] });
    await expect(runPhaseMap(big, { executor: new InProcessExecutor(() => slow), signal: controller.signal })).rejects.toBeInstanceOf(InterruptedError);
  });
});

describe('checksum', () => {
  it('FNV-1a 64 matches the published test vectors', () => {
    // Test vectors of the FNV reference (Fowler, Noll, Vo; IETF draft-eastlake-fnv): "" and "a"
    // (from memory); "hello world chernel" computed with Debian's /usr/bin/python3 (bytes == UTF-16 units for ASCII).
    expect(digest('')).toBe('cbf29ce484222325');
    expect(digest('a')).toBe('af63dc4c8601ec8c');
    expect(digest('hello world chernel')).toBe('360f5e002224ac94');
  });
  it('canonical JSON ignores key order', () => {
    expect(canonicalJson({ b: 1, a: [1, { d: 2, c: null }] })).toBe(canonicalJson({ a: [1, { c: null, d: 2 }], b: 1 }));
    expect(validatePhaseMapRequest(request({}))).toBeTruthy();
  });
});
