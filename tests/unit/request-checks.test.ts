import { describe, expect, it } from 'vitest';
import {
  closestName, compute, computeBudget, DIAGNOSTIC_KINDS, estimateCost, haldane, kaneMele, kitaevChain, ModelError, qwz,
  requestFields, ribbon, setComputeBudget, ssh, supercell, twoBandWeyl, type DiagnosticKind, type DiagnosticRequest,
} from '../../src/index.js';
import { coupledWires, hofstadter } from '../../src/model/catalogue.js';

function refusal(run: () => unknown): ModelError {
  try {
    run();
  } catch (error) {
    expect(error).toBeInstanceOf(ModelError);
    return error as ModelError;
  }
  throw new Error('expected a ModelError');
}

/** A small valid request of each kind (the models are the catalogue's). */
const VALID: Record<string, DiagnosticRequest> = {
  bands: { kind: 'bands', model: qwz(), pointsPerSegment: 4 },
  gap: { kind: 'gap', model: qwz(), grid: 8 },
  'gap-closings': { kind: 'gap-closings', model: qwz(), grid: 8 },
  ribbon: { kind: 'ribbon', model: qwz(), direction: 0, width: 4, nk: 9 },
  chern: { kind: 'chern', model: qwz(), grid: 8 },
  curvature: { kind: 'curvature', model: qwz(), grid: 8 },
  'wannier-flow': { kind: 'wannier-flow', model: qwz(), grid: 8 },
  'berry-phase': { kind: 'berry-phase', model: ssh(), points: 16 },
  z2: { kind: 'z2', model: kaneMele(), grid: [8, 8] },
  'spin-chern': { kind: 'spin-chern', model: kaneMele(), grid: 8, params: { lambda_R: 0 } },
  winding: { kind: 'winding', model: ssh(), points: 16 },
  majorana: { kind: 'majorana', model: kitaevChain() },
  weyl: { kind: 'weyl', model: twoBandWeyl(), grid: 6 },
  hall: { kind: 'hall', model: qwz(), grid: 8 },
  'phase-map': { kind: 'phase-map', model: qwz(), quantity: 'chern', grid: 8, axes: [{ param: 'u', from: -3, to: 3, count: 3 }] },
  bott: { kind: 'bott', model: qwz(), sizes: [4, 4] },
  'spin-bott': { kind: 'spin-bott', model: kaneMele(), sizes: [3, 3], params: { lambda_R: 0 } },
  'chain-winding': { kind: 'chain-winding', model: ssh(), sizes: [10] },
  'local-marker': { kind: 'local-marker', model: qwz(), sizes: [4, 4] },
  'local-density': { kind: 'local-density', model: qwz(), sizes: [4, 4], energy: 0.1, method: 'dense' },
  ensemble: { kind: 'ensemble', model: qwz(), of: 'bott', samples: 2, sizes: [4, 4], onsiteDisorder: 1 },
  'surface-spectrum': { kind: 'surface-spectrum', model: qwz(), cut: 0, nk: 8, energyCount: 8 },
  'surface-map': { kind: 'surface-map', model: twoBandWeyl(), cut: 2, grid: 8 },
  'slab-spectrum': { kind: 'slab-spectrum', model: twoBandWeyl(), cut: 2, width: 4, nk: 8 },
  'bulk-boundary': { kind: 'bulk-boundary', model: qwz(), cut: 0, width: 8, nk: 16 },
};

describe('strict request fields (src/request.ts)', () => {
  it('has a valid request and a field table for every kind', () => {
    expect(Object.keys(VALID).sort()).toEqual([...DIAGNOSTIC_KINDS].sort());
    for (const kind of DIAGNOSTIC_KINDS) expect(requestFields(kind)).toContain('model');
  });

  it.each(Object.keys(VALID))('"%s": a misspelt field of every valid name is refused, naming it and the valid one', (kind) => {
    const request = VALID[kind];
    const fields = requestFields(kind as DiagnosticKind, kind === 'phase-map' ? 'chern' : undefined);
    for (const field of new Set(fields)) {
      if (field === 'kind' || field === 'model') continue;
      const typo = field.length > 4 ? field.slice(0, -2) + field.at(-1) + field.at(-2) : field + 's'; // swap the last two letters
      const error = refusal(() => compute({ ...request, [typo]: 1 } as DiagnosticRequest));
      expect(error.field).toBe(typo);
      if (field.length > 4) expect(error.message).toContain(`did you mean "${field}"?`);
    }
  });

  it.each(Object.keys(VALID))('"%s": a valid request runs and echoes its parameter values with defaults', (kind) => {
    const result = compute(VALID[kind]) as unknown as { kind: string; params: Record<string, number> };
    const model = VALID[kind].model;
    const expected = { ...Object.fromEntries(Object.entries(model.parameters).map(([n, p]) => [n, p.default])), ...VALID[kind].params };
    if (kind === 'phase-map') delete expected.u;
    expect(result.params).toEqual(expected);
  });

  it('the cases of the misspelt-field report', () => {
    const model = qwz();
    expect(refusal(() => compute({ kind: 'chern', model, param: { u: 3 } } as never)).message).toContain('did you mean "params"?');
    expect(refusal(() => compute({ kind: 'chern', model, parms: { u: 99 } } as never)).message).toContain('did you mean "params"?');
    expect(refusal(() => compute({ kind: 'chern', model, gird: 64 } as never)).message).toContain('did you mean "grid"?');
    expect(refusal(() => compute({ kind: 'chern', model, plane: { normal: 2, att: 0 } } as never)).field).toBe('plane.att');
    expect(refusal(() => compute({ kind: 'phase-map', model, quantity: 'chern', axes: [{ param: 'u', from: 0, to: 1, count: 2 }], refine: { tolerence: 0.1 } } as never)).field).toBe('refine.tolerence');
    expect(refusal(() => compute({ kind: 'phase-map', model, quantity: 'chern', axes: [{ parm: 'u', from: 0, to: 1, count: 2 }] } as never)).field).toBe('axes[0].parm');
    expect(refusal(() => compute({ kind: 'chrn', model } as never)).message).toContain('did you mean "chern"?');
    expect(refusal(() => compute({ kind: 'bands', model: { ...model, term: [] } } as never)).message).toContain('did you mean "terms"?');
    const amplitudeTypo = { ...model, terms: [{ ...model.terms[0], amplitude: { re: 1, img: 0 } }, ...model.terms.slice(1)] };
    expect(refusal(() => compute({ kind: 'bands', model: amplitudeTypo } as never)).field).toBe('terms[0].amplitude.img');
  });

  it('parameter names that every object has are unknown parameters, not inherited values', () => {
    const model = qwz();
    for (const name of ['__proto__', 'toString', 'constructor', 'hasOwnProperty']) {
      const request = JSON.parse(`{"kind": "chern", "grid": 8, "params": {"${name}": 3}}`) as Record<string, unknown>;
      const error = refusal(() => compute({ ...request, model } as unknown as DiagnosticRequest));
      expect(error.field).toBe(`params.${name}`);
      expect(error.message).toContain('has no parameter');
    }
    const spec = qwz();
    spec.parameters = JSON.parse('{"constructor": {"default": 1}}');
    expect(refusal(() => compute({ kind: 'bands', model: spec })).field).toBe('parameters.constructor');
  });

  it('catalogue calls check their options', () => {
    expect(refusal(() => (qwz as (o: unknown) => unknown)({ uu: 3 })).message).toMatch(/qwz\(\) takes no options.*params: \{u: \.\.\.\}/);
    expect(refusal(() => (haldane as (o: unknown) => unknown)({ M: 1 })).field).toBe('haldane');
    expect(refusal(() => coupledWires({ wire: 3 } as never)).message).toContain('did you mean "wires"?');
    expect(refusal(() => hofstadter({ q: 4 } as never)).field).toBe('hofstadter.p');
  });

  it('suggests only plausible names', () => {
    expect(closestName('v', ['u'])).toBeNull();
    expect(closestName('gird', ['grid', 'bands'])).toBe('grid');
    expect(closestName('Grid', ['grid'])).toBe('grid');
    expect(closestName('xyzzy', ['grid', 'bands'])).toBeNull();
  });
});

describe('cost known before running (src/cost.ts)', () => {
  it.each([
    [{ kind: 'chern', model: qwz(), grid: 100000 }, 'grid'],
    [{ kind: 'chern', model: qwz(), maxGrid: 100000 }, 'maxGrid'],
    [{ kind: 'z2', model: kaneMele(), grid: 'auto', maxGrid: 1e6 }, 'maxGrid'],
    [{ kind: 'wannier-flow', model: qwz(), grid: 100000 }, 'grid'],
    [{ kind: 'z2', model: kaneMele(), grid: 100000 }, 'grid'],
    [{ kind: 'curvature', model: qwz(), grid: [100000, 100000] }, 'grid'],
    [{ kind: 'phase-map', model: qwz(), quantity: 'chern', axes: [{ param: 'u', from: -3, to: 3, count: 1e9 }] }, 'axes[0].count'],
    [{ kind: 'ribbon', model: qwz(), direction: 0, width: 100000 }, 'width'],
    [{ kind: 'bott', model: qwz(), sizes: [400, 400] }, 'sizes'],
    [{ kind: 'local-marker', model: qwz(), sizes: [3000, 3000], method: 'chebyshev' }, 'sizes'],
    [{ kind: 'bands', model: qwz(), pointsPerSegment: 100000, path: 'Γ X M Γ' }, null],
  ] as [DiagnosticRequest, string | null][])('%#: refuses what cannot fit, naming the field, the estimate and the largest value that fits', (request, field) => {
    if (field === null) {
      expect(() => compute(request)).not.toThrow(); // 3e5 path points of a two-band model fit
      return;
    }
    const error = refusal(() => compute(request));
    expect(error.field).toBe(field);
    const largest = Number(/the largest \S+ that fits is (\d+)/.exec(error.message)?.[1]);
    expect(error.message).toMatch(/needs about [\d.e+]+ [kMG]B of memory|would take about/);
    // The value named fits; one more does not (the estimate is monotonic in each size).
    const n = request.model.orbitals.length;
    const at = (v: number): DiagnosticRequest => {
      if (field === 'axes[0].count') return { ...request, axes: [{ ...(request as { axes: object[] }).axes[0], count: v }] } as DiagnosticRequest;
      const current = (request as unknown as Record<string, unknown>)[field];
      return { ...request, [field]: Array.isArray(current) ? current.map(() => v) : v } as DiagnosticRequest;
    };
    const budget = computeBudget();
    const fits = (v: number) => {
      const c = estimateCost(at(v), n, request.model.periodic);
      return c.bytes <= budget.memoryBytes && c.seconds <= budget.seconds;
    };
    expect(fits(largest)).toBe(true);
    expect(fits(largest + 1)).toBe(false);
  });

  it('limits follow the budget, not constants', () => {
    const model = qwz();
    const previous = setComputeBudget({ memoryBytes: 64 * 2 ** 20 });
    try {
      const small = Number(/fits is (\d+)/.exec(refusal(() => compute({ kind: 'chern', model, grid: 100000 })).message)?.[1]);
      setComputeBudget({ memoryBytes: 256 * 2 ** 20 });
      const large = Number(/fits is (\d+)/.exec(refusal(() => compute({ kind: 'chern', model, grid: 100000 })).message)?.[1]);
      expect(large / small).toBeGreaterThan(1.9); // memory ~ grid^2: 4x the budget, about 2x the grid
      expect(large / small).toBeLessThan(2.1);
    } finally {
      setComputeBudget(previous);
    }
  });

  it('builders refuse models whose dense Hamiltonian cannot fit', () => {
    expect(refusal(() => ribbon(qwz(), 0, 100000)).field).toBe('ribbon.width');
    expect(refusal(() => supercell(qwz(), [[1000, 0], [0, 1000]])).field).toBe('supercell.matrix');
    expect(refusal(() => hofstadter(1, 1e6)).field).toBe('flux.q');
    expect(ribbon(qwz(), 0, 40).orbitals.length).toBe(80);
  });

  it('the lattice check is relative: tiny vectors pass, nearly collinear ones do not (common practice)', () => {
    const model = qwz();
    const tiny = compute({ kind: 'chern', model: { ...model, vectors: [[1e-7, 0], [0, 1e-7]] }, grid: 12, params: { u: -1 } });
    const unit = compute({ kind: 'chern', model, grid: 12, params: { u: -1 } });
    expect((tiny as { chern: number }).chern).toBe((unit as { chern: number }).chern);
    expect(refusal(() => compute({ kind: 'bands', model: { ...model, vectors: [[1, 0], [1, 1e-11]] } })).field).toBe('vectors');
  });
});
