// The widgets' engine entry (run in the page's worker and the kernel) must give exactly what
// compute() gives, also when it reuses the compiled model across a drag (an implementation
// shortcut checked here against the engine's own path).
import { describe, expect, it } from 'vitest';
import { compute, haldane, qwz } from '../../src/index.js';
import { computeView } from '../../src/views.js';
import type { ViewRequest, ViewResult } from '../../contract/protocol.js';

const viaCompute = (r: Record<string, unknown>) => compute(r as unknown as Parameters<typeof compute>[0]) as unknown as ViewResult;

describe('computeView (src/views.ts)', () => {
  it('equals compute() along a drag and across a change of model', () => {
    const steps: Record<string, unknown>[] = [
      { kind: 'curvature', model: haldane(), grid: 12, bands: 1, params: { M: 0.2 } },
      { kind: 'curvature', model: haldane(), grid: 12, bands: 1, params: { M: 0.7 } },
      { kind: 'wannier-flow', model: haldane(), grid: [12, 10], bands: 1, params: { M: 0.1, phi: -1 } },
      { kind: 'curvature', model: qwz(), grid: 10, bands: 1, params: { u: 1 } },
      { kind: 'bands', model: qwz(), pointsPerSegment: 5, params: { u: -1 } },
      { kind: 'curvature', model: haldane(), grid: 12, bands: 1, params: { M: 0.2 } },
    ];
    for (const step of steps) {
      const ours = computeView(step as ViewRequest);
      const theirs = viaCompute(step);
      expect(ours).toEqual(theirs);
    }
  });

  it('a refused value is the engine error, and the next good value works', () => {
    const good = { kind: 'curvature', model: qwz(), grid: 8, bands: 1, params: { u: -1 } } as ViewRequest;
    computeView(good);
    expect(() => computeView({ ...good, params: { u: 99 } })).toThrow(/u.*99/);
    expect(computeView(good)).toEqual(viaCompute(good));
  });
});
