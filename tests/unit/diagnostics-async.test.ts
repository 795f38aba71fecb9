import { describe, expect, it } from 'vitest';
import { compute, computeAsync, InterruptedError, qwz, type PhaseMapResult } from '../../src/index.js';

describe('computeAsync', () => {
  const request = {
    kind: 'phase-map' as const, model: qwz(), quantity: 'chern' as const, grid: 12,
    axes: [{ param: 'u', from: -3.1, to: 2.9, count: 7 }], refine: { tolerance: 0.05 },
  };

  it('runs a phase map point by point: rising progress, the same map as compute()', async () => {
    const seen: number[] = [];
    const map = (await computeAsync(request, { onProgress: (f) => seen.push(f) })) as PhaseMapResult;
    expect(map).toEqual(compute(request));
    // QWZ boundaries at u = -2, 0, 2 (Qi, Wu, Zhang, PRB 74, 085308 (2006)).
    expect(map.boundaries.map((b) => Math.round(b.at.u) + 0)).toEqual([-2, 0, 2]);
    expect(seen[0]).toBe(0);
    expect(seen.at(-1)).toBe(1);
    expect(seen.filter((f) => f > 0 && f < 1).length).toBeGreaterThan(3);
  });

  it('stops between points when the signal is raised', async () => {
    const signal = { aborted: false };
    let calls = 0;
    const run = computeAsync(request, { signal, onProgress: () => { if (++calls === 3) signal.aborted = true; } });
    await expect(run).rejects.toBeInstanceOf(InterruptedError);
  });
});
