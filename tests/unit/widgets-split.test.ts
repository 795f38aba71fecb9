// Sharing one widget request among engine workers: each part computed by the worker's own code path
// (src/views.ts), joined by the plan, must equal the request computed whole. Models:
// Qi, Wu, Zhang, PRB 74, 085308 (2006) (C = +1 for -2 < u < 0); Kane & Mele, PRL 95, 226801 (2005).
import { describe, expect, it } from 'vitest';
import { kaneMele, qwz } from '../../src/index.js';
import { computeView } from '../../src/views.js';
import type { ViewRequest } from '../../contract/protocol.js';
import { engineWorkers, splitPlan } from '../../widgets/src/split.js';

function request(kind: ViewRequest['kind'], spec: ReturnType<typeof qwz>, options: Record<string, unknown>, values: Record<string, number> = {}): ViewRequest {
  const params = { ...Object.fromEntries(Object.entries(spec.parameters).map(([k, p]) => [k, p.default])), ...values };
  return { ...options, kind, model: spec, params } as ViewRequest;
}

function viaParts(r: ViewRequest, workers: number) {
  const plan = splitPlan(workers);
  const count = plan.parts(r);
  const parts = Array.from({ length: count }, (_, i) => structuredClone(computeView(plan.partRequest(r, i, count))));
  return { count, joined: count === 1 ? parts[0] : plan.join(r, parts) };
}

describe('split plan', () => {
  it('a curvature map in parts joins into the whole map (values exactly, same Chern number)', () => {
    const r = request('curvature', qwz(), { grid: 40, bands: 1 }, { u: -1 });
    const { count, joined } = viaParts(r, 4);
    expect(count).toBe(4);
    const whole = computeView(r);
    expect(joined).toEqual(whole);
    expect(whole.total).toBeCloseTo(1, 9);
  });

  it('a Wannier-centre flow in parts joins into the whole flow, with the Z2 count the first part carries', () => {
    const r = request('wannier-flow', kaneMele(), { grid: [33, 33], bands: 2 });
    const { count, joined } = viaParts(r, 3);
    expect(count).toBe(3);
    const whole = computeView(r);
    expect(joined).toEqual(whole);
    // Kane–Mele at its defaults (lambda_v = 0.1 < 3√3 lambda_SO = 0.31): Z2 = 1 (PRL 95, 226801).
    expect(whole.z2).toBe(1);
    const asked = request('wannier-flow', kaneMele(), { grid: [33, 33], bands: 2, invariant: 'winding' });
    expect(viaParts(asked, 3).joined).toEqual(computeView(asked));
    expect('z2' in computeView(asked)).toBe(false);
  });

  it('goes whole where splitting does not pay or does not apply', () => {
    const plan = splitPlan(4);
    expect(plan.parts(request('curvature', qwz(), { grid: 12 }))).toBe(1); // 12 rows: under 8 per part for two
    expect(plan.parts(request('curvature', qwz(), { grid: 20 }))).toBe(2);
    expect(plan.parts(request('curvature', qwz(), {}))).toBe(4); // default grid 64
    expect(plan.parts(request('wannier-flow', kaneMele(), { grid: [101, 101], invariant: 'z2' }))).toBe(4);
    expect(plan.parts(request('bands', qwz(), {}))).toBe(1);
    expect(engineWorkers(1)).toBe(1);
    expect(engineWorkers(2)).toBe(2);
    expect(engineWorkers(16)).toBe(4);
  });
});
