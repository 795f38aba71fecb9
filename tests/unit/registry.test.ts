// The registry of diagnostic kinds (src/diagnostics/registry.ts): every edge reads the same
// declaration of a kind, so a request's fields, a phase map's point and a split all agree with it.
import { describe, expect, it } from 'vitest';
import { blochHamiltonian, compute, curvatureMap, DIAGNOSTIC_KINDS, DIAGNOSTICS, KIND_NAMES, kitaevChain, ModelError, pointFunction, qwz, requestFields, ssh, SWEEP_QUANTITIES, type ModelSpec } from '../../src/index.js';
import { SPLIT_ROWS } from '../../src/topology/parts.js';
import { widgetRequest } from '../../contract/option-sliders.js';

describe('the registry of diagnostic kinds', () => {
  it('gives every kind a module whose options are its own (kind, model, params and convention are every request\'s)', () => {
    expect([...DIAGNOSTIC_KINDS].sort()).toEqual([...KIND_NAMES, 'phase-map'].sort());
    for (const kind of KIND_NAMES) {
      const options = DIAGNOSTICS[kind].options;
      for (const common of ['kind', 'model', 'params', 'convention']) expect(options).not.toContain(common);
      expect(requestFields(kind)).toEqual(['kind', 'model', 'params', 'convention', ...options]);
    }
  });

  it('splits exactly the kinds the light split module names, with the same row count', () => {
    const split = KIND_NAMES.filter((k) => DIAGNOSTICS[k].splitRows !== undefined);
    expect(split.sort()).toEqual(Object.keys(SPLIT_ROWS).sort());
    for (const kind of split) expect(DIAGNOSTICS[kind].splitRows!({ grid: [40, 24] })).toBe(SPLIT_ROWS[kind as keyof typeof SPLIT_ROWS]({ grid: [40, 24] }));
  });

  // Values: QWZ C = +1 at u = -1 (Qi, Wu & Zhang, PRB 74, 085308 (2006); references.md sign
  // convention); SSH winding 1 for w > v (Su, Schrieffer & Heeger 1979, common practice for the
  // sign); Kitaev chain topological (M = -1) for |mu| < 2t (Kitaev 2001).
  const points: [string, ModelSpec, Record<string, number>][] = [
    ['chern', qwz(), { u: -1 }],
    ['gap', qwz(), { u: -1 }],
    ['winding', ssh(), { v: 0.5, w: 1 }],
    ['majorana', kitaevChain(), { mu: 0.5 }],
  ];
  it.each(points)('a phase-map point of "%s" reads the same scalar as compute() of the kind', (kind, model, params) => {
    expect(SWEEP_QUANTITIES).toContain(kind);
    const point = pointFunction({ kind: kind as (typeof SWEEP_QUANTITIES)[number], model })(params);
    const whole = compute({ kind, model, params } as Parameters<typeof compute>[0]) as unknown as Record<string, unknown> & { checks: { minGap: number } };
    const headline = DIAGNOSTICS[kind as keyof typeof DIAGNOSTICS].headline[0];
    expect(point.value).toBe(whole[headline]);
    expect(point.gap).toBe(whole.checks.minGap);
    if (kind === 'chern') expect(point.value).toBe(1);
  });

  it('refuses to sweep a kind with no scalar per point, naming the field', () => {
    expect(() => pointFunction({ kind: 'bands' as never, model: qwz() })).toThrow(ModelError);
    expect(() => compute({ kind: 'phase-map', model: qwz(), quantity: 'bands' as never, axes: [{ param: 'u', from: -1, to: 1, count: 3 }] })).toThrow(/^quantity: /);
  });

  it('names a phase map\'s swept kind "quantity", and says so to a request that still calls it "invariant"', () => {
    const axes = [{ param: 'u', from: -1, to: 1, count: 3 }];
    expect(() => compute({ kind: 'phase-map', model: qwz(), invariant: 'chern', axes } as never)).toThrow(/^invariant: a phase map names what it sweeps in "quantity"/);
    // A widget saved before the rename still reads as its request (contract/option-sliders.ts).
    expect(widgetRequest('phase-map', qwz(), { invariant: 'chern', axes }, { u: 0 })).toMatchObject({ kind: 'phase-map', quantity: 'chern', axes });
    expect('invariant' in widgetRequest('phase-map', qwz(), { invariant: 'chern', axes }, { u: 0 })).toBe(false);
  });

  it('refuses a convention that differs from the compiled model\'s instead of ignoring it', () => {
    const h = blochHamiltonian(qwz());
    expect(() => curvatureMap(h, { convention: 'orbital', grid: 8 })).toThrow(/^convention: the model was compiled in the "lattice" convention/);
    expect(curvatureMap(h, { convention: 'lattice', grid: 8 }).kind).toBe('curvature');
  });
});
