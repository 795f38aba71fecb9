/**
 * A curvature map or a Wannier-centre flow split into parts (as a widget shares one request among
 * several Web Workers) joins into exactly the unsplit result: every value bit for bit, the same
 * checks, warnings and invariant, for gapped, gapless and coarse grids, both curvature methods,
 * per-band maps and both Bloch conventions. Parts travel through structuredClone, as through
 * postMessage. Parts that do not fit together are refused with the field named.
 */
import { build } from 'esbuild';
import { describe, expect, it } from 'vitest';
import {
  BlochHamiltonian, compute, curvatureMap, haldane, joinParts, kaneMele, lattice, ModelError, partBounds, qwz, wannierFlow, twoBandWeyl,
  type CurvaturePart, type CurvatureResult, type DiagnosticPart, type DiagnosticRequest, type ModelSpec, type WannierFlowPart,
  type WannierFlowResult,
} from '../../src/index.js';

type Split = DiagnosticRequest & { kind: 'curvature' | 'wannier-flow' };

const SQRT3 = Math.sqrt(3);

/**
 * Models and parameter values, each with its source. The gapless points are phase boundaries
 * where the closing lands exactly on the grid used.
 */
const QWZ = qwz(); // Qi, Wu, Zhang, PRB 74, 085308 (2006) (catalogue)
const HALDANE = haldane(); // Haldane, PRL 61, 2015 (1988) (catalogue)
const KANE_MELE = kaneMele(); // Kane & Mele, PRL 95, 226801 (2005) (catalogue)
// QWZ with a1 and a2 swapped: a left-handed cell, where the engine flips the sign of reduced-
// coordinate integrals (common practice: the Chern number keeps its Cartesian orientation).
const QWZ_LEFT: ModelSpec = { ...QWZ, vectors: [[0, 1], [1, 0]] };

interface Case {
  name: string;
  model: ModelSpec;
  params?: Record<string, number>;
  /** What the unsplit result must show, so that the case tests what it claims to. */
  gapless: boolean;
}

const CASES: Case[] = [
  // C = +1 for -2 < u < 0 (shared/references.md, QWZ row).
  { name: 'QWZ u = -1', model: QWZ, params: { u: -1 }, gapless: false },
  // Gap closes at k = (pi, pi) for u = 2 (shared/references.md: C changes between u = 1.5 and 3).
  { name: 'QWZ u = 2 (closing at (pi, pi))', model: QWZ, params: { u: 2 }, gapless: true },
  // At u = 0 the gap closes at (0, pi) and (pi, 0) at once (shared/references.md: C = +1 at
  // u = -0.5, -1 at 0.5): two gaps at rounding level, only the smaller one reported.
  { name: 'QWZ u = 0 (two closings)', model: QWZ, params: { u: 0 }, gapless: true },
  { name: 'QWZ u = -1, left-handed cell', model: QWZ_LEFT, params: { u: -1 }, gapless: false },
  // C(lower) = -sign(sin phi) inside |M| < 3 sqrt3 t2 |sin phi| (shared/references.md, Haldane row;
  // the catalogue defaults t2 = 0.1, phi = pi/2, M = 0.2 lie inside).
  { name: 'Haldane defaults', model: HALDANE, gapless: false },
  // On the boundary M = 3 sqrt3 t2 sin phi the gap closes at K (shared/references.md).
  { name: 'Haldane M = 3 sqrt3 t2', model: HALDANE, params: { M: 3 * SQRT3 * 0.1 }, gapless: true },
  // Catalogue defaults (lambda_SO = 0.06, lambda_R = 0.05, lambda_v = 0.1): the Z2 = 1 phase,
  // gapped for the lower two bands (Kane & Mele, PRL 95, 226801 (2005)).
  { name: 'Kane–Mele defaults', model: KANE_MELE, gapless: false },
  // lambda_R = 0, lambda_v = 3 sqrt3 lambda_SO: the Z2 boundary, gap closes at K (shared/references.md).
  { name: 'Kane–Mele boundary', model: KANE_MELE, params: { lambda_R: 0, lambda_v: 3 * SQRT3 * 0.06 }, gapless: true },
];

/** Every split the brief asks for: 1, 2, 3, 5 and one row per part. */
function counts(rows: number): number[] {
  return [...new Set([1, 2, 3, 5, rows])].filter((c) => c <= rows);
}

/** The parts of a request, cloned as postMessage would, handed over in reverse order. */
function parts(request: Split, count: number): DiagnosticPart[] {
  const out = Array.from({ length: count }, (_, index) => structuredClone(compute({ ...request, part: { index, count } }) as DiagnosticPart));
  return out.reverse();
}

function bytes(a: Float64Array): Uint8Array {
  return new Uint8Array(a.buffer, a.byteOffset, a.byteLength);
}

/** Deep equality with every typed array compared byte for byte (so -0 and NaN payloads count too). */
function expectIdentical(joined: object, whole: object): void {
  expect(Object.keys(joined).sort()).toEqual(Object.keys(whole).sort());
  for (const [key, value] of Object.entries(whole)) {
    const other = (joined as Record<string, unknown>)[key];
    if (value instanceof Float64Array) {
      expect(other, key).toBeInstanceOf(Float64Array);
      expect(bytes(other as Float64Array), key).toEqual(bytes(value));
    } else {
      expect(other, key).toEqual(value);
    }
  }
}

/** The unsplit result is what the case claims: gapless (invariant withheld), or gapped and whether coarse. */
function premise(result: CurvatureResult | WannierFlowResult, gapless: boolean, coarse?: boolean): void {
  const invariant = result.kind === 'curvature' ? result.total : result.winding;
  expect(result.checks.gapless === true).toBe(gapless);
  expect(invariant === null).toBe(gapless);
  if (coarse !== undefined) expect(result.checks.coarse === true).toBe(coarse);
}

// An atomic insulator (common practice): two orbitals at +-1, no hopping, flat bands with gap 2 at
// every k. Every k ties for the smallest gap, so the place reported must be the first k sampled.
const ATOMIC: ModelSpec = lattice('atomic insulator', [[1, 0], [0, 1]]).site('a', [0, 0]).site('b', [0.5, 0.5]).onsite('a', 1).onsite('b', -1).build();

describe('curvature map in parts', () => {
  const grid: [number, number] = [12, 6]; // unequal, so rows and columns cannot be confused; K and K' on the grid
  for (const c of CASES) {
    for (const method of ['lattice', 'kubo'] as const) {
      it(`${c.name}, ${method}`, () => {
        const request: Split = { kind: 'curvature', model: c.model, params: c.params, method, grid };
        const whole = compute(request) as CurvatureResult;
        premise(whole, c.gapless);
        for (const count of counts(grid[1])) expectIdentical(joinParts(parts(request, count)), whole);
      });
    }
  }

  it('per band, both methods, with touching bands inside the group (Kane–Mele: Kramers pairs at the TRIM)', () => {
    for (const method of ['lattice', 'kubo'] as const) {
      const request: Split = { kind: 'curvature', model: KANE_MELE, method, grid: [6, 8], perBand: true };
      const whole = compute(request) as CurvatureResult;
      expect(whole.perBand).toHaveLength(2 * 6 * 8);
      // The bands of the group touch at the time-reversal-invariant momenta (Kramers' theorem,
      // common practice), on the grid here: per-band warnings the join must repeat.
      expect(whole.checks.warnings.length).toBeGreaterThan(0);
      for (const count of counts(8)) expectIdentical(joinParts(parts(request, count)), whole);
    }
  });

  it('per band on a gapless QWZ grid and on a coarse one', () => {
    for (const [params, n] of [[{ u: 2 }, 4], [{ u: -0.05 }, 5]] as const) {
      for (const method of ['lattice', 'kubo'] as const) {
        const request: Split = { kind: 'curvature', model: QWZ, params, method, grid: n, perBand: true };
        const whole = compute(request) as CurvatureResult;
        for (const count of counts(n)) expectIdentical(joinParts(parts(request, count)), whole);
      }
    }
  });

  it('a coarse grid is flagged alike (QWZ u = -0.05 on 5 x 5: curvature crowded near the closing at u = 0, common practice)', () => {
    const request: Split = { kind: 'curvature', model: QWZ, params: { u: -0.05 }, grid: 5 };
    const whole = compute(request) as CurvatureResult;
    premise(whole, false, true);
    expect(whole.checks.warnings.some((w) => w.includes('coarse'))).toBe(true);
    for (const count of counts(5)) expectIdentical(joinParts(parts(request, count)), whole);
  });

  it('equal smallest gaps: the first k sampled is reported, however the rows are split', () => {
    for (const method of ['lattice', 'kubo'] as const) {
      const request: Split = { kind: 'curvature', model: ATOMIC, method, grid: [4, 6], gapTolerance: 3 };
      const whole = compute(request) as CurvatureResult;
      expect(whole.checks.minGapAt).toEqual([-0.5, -0.5]);
      // A tolerance above the flat gap makes it gapless, so the warning names that k too.
      premise(whole, true);
      for (const count of counts(6)) expectIdentical(joinParts(parts(request, count)), whole);
    }
  });

  it('the orbital convention and a plane of a 3D model (two-band Weyl model, catalogue, kz = 0 slice)', () => {
    for (const request of [
      { kind: 'curvature', model: HALDANE, convention: 'orbital', method: 'kubo', grid: 6 },
      { kind: 'curvature', model: twoBandWeyl(), plane: { normal: 2, at: 0 }, grid: [5, 7] },
    ] as Split[]) {
      const whole = compute(request) as CurvatureResult;
      for (const count of counts(request.grid instanceof Array ? request.grid[1] : 6)) expectIdentical(joinParts(parts(request, count)), whole);
    }
  });

  it('a compiled model takes `part` directly, as the widget worker calls it', () => {
    const h = new BlochHamiltonian(HALDANE, {});
    const whole = curvatureMap(h, { grid: 6 });
    const split = [0, 1, 2].map((index) => curvatureMap(h, { grid: 6, part: { index, count: 3 } }));
    expect(split.map((p) => p.rows)).toEqual([[0, 2], [2, 4], [4, 6]]);
    // A part alone carries no invariant: only the join decides, from every part's gap.
    for (const p of split) expect('total' in p || 'checks' in p).toBe(false);
    expectIdentical(joinParts(split), whole);
  });
});

describe('Wannier-centre flow in parts', () => {
  const grid: [number, number] = [18, 18]; // [along, across]: 19 across-points, K and K' on the grid
  for (const c of CASES) {
    for (const convention of ['lattice', 'orbital'] as const) {
      it(`${c.name}, ${convention} convention`, () => {
        const request: Split = { kind: 'wannier-flow', model: c.model, params: c.params, convention, grid };
        const whole = compute(request) as WannierFlowResult;
        premise(whole, c.gapless);
        for (const count of counts(grid[1] + 1)) expectIdentical(joinParts(parts(request, count)), whole);
      });
    }
  }

  it('coarse and sound flows stay so: Kane–Mele on 18 x 18 is coarse, QWZ u = -1 is not (common practice)', () => {
    const coarse = compute({ kind: 'wannier-flow', model: KANE_MELE, grid }) as WannierFlowResult;
    premise(coarse, false, true);
    const sound = joinParts(parts({ kind: 'wannier-flow', model: QWZ, params: { u: -1 }, grid }, 4)) as WannierFlowResult;
    premise(sound, false, false);
  });

  it('the winding survives the split: QWZ u = -1 winds once, its mirror image (left-handed cell) the other way', () => {
    // C(lower) = +1 for -2 < u < 0 (shared/references.md); a mirror reverses the Chern number
    // (common practice) while H as a function of reduced momenta is unchanged.
    const right = joinParts(parts({ kind: 'wannier-flow', model: QWZ, params: { u: -1 }, grid: 16 }, 4)) as WannierFlowResult;
    const left = joinParts(parts({ kind: 'wannier-flow', model: QWZ_LEFT, params: { u: -1 }, grid: 16 }, 4)) as WannierFlowResult;
    expect(right.winding).toBe(1);
    expect(left.winding).toBe(-1);
    expect(Math.round(left.sum[16] - left.sum[0])).toBe(Math.round(right.sum[16] - right.sum[0]));
  });

  it('equal smallest gaps: the first k sampled is reported, however the columns are split', () => {
    const request: Split = { kind: 'wannier-flow', model: ATOMIC, grid: [4, 6], gapTolerance: 3 };
    const whole = compute(request) as WannierFlowResult;
    expect(whole.checks.minGapAt).toEqual([-0.5, -0.5]);
    premise(whole, true);
    for (const count of counts(7)) expectIdentical(joinParts(parts(request, count)), whole);
  });

  it('a compiled model takes `part` directly', () => {
    const h = new BlochHamiltonian(KANE_MELE, {}, { convention: 'orbital' });
    const whole = wannierFlow(h, { grid: [8, 6] });
    const split = [1, 0].map((index) => wannierFlow(h, { grid: [8, 6], part: { index, count: 2 } }));
    expect(split.map((p) => p.columns)).toEqual([[3, 7], [0, 3]]);
    expectIdentical(joinParts(split), whole);
  });
});

describe('the join on a main thread', () => {
  it('imports no model compilation, mathjs or linear algebra', async () => {
    const out = await build({ entryPoints: ['src/topology/parts.ts'], bundle: true, format: 'esm', platform: 'browser', write: false, metafile: true, logLevel: 'silent' });
    expect(Object.keys(out.metafile.inputs).sort()).toEqual(['src/model/errors.ts', 'src/topology/checks.ts', 'src/topology/parts.ts']);
  });
});

describe('splits that do not fit', () => {
  const request: Split = { kind: 'curvature', model: QWZ, grid: [6, 5] };
  const three = (): CurvaturePart[] => [0, 1, 2].map((index) => compute({ ...request, part: { index, count: 3 } }) as CurvaturePart);

  function refuses(run: () => unknown, field: string, text: RegExp): void {
    let error: unknown;
    try {
      run();
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(ModelError);
    expect((error as ModelError).field).toBe(field);
    expect((error as ModelError).message).toMatch(text);
  }

  it('a request names a bad part and its value', () => {
    refuses(() => compute({ ...request, part: { index: 3, count: 3 } }), 'part.index', /from 0 to 2\. Value: 3/);
    refuses(() => compute({ ...request, part: { index: 0.5, count: 3 } }), 'part.index', /Value: 0\.5/);
    refuses(() => compute({ ...request, part: { index: -1, count: 3 } }), 'part.index', /Value: -1/);
    // 5 plaquette rows along the second axis: at most 5 parts.
    refuses(() => compute({ ...request, part: { index: 0, count: 6 } }), 'part.count', /from 1 to 5.*Value: 6/);
    refuses(() => compute({ ...request, part: { index: 0, count: 0 } }), 'part.count', /Value: 0/);
    refuses(() => compute({ ...request, part: 2 as unknown as { index: number; count: number } }), 'part', /Value: 2/);
    // A flow of 5 steps has 6 across-points.
    expect(() => compute({ kind: 'wannier-flow', model: QWZ, grid: 5, part: { index: 5, count: 6 } })).not.toThrow();
    refuses(() => compute({ kind: 'wannier-flow', model: QWZ, grid: 5, part: { index: 0, count: 7 } }), 'part.count', /from 1 to 6.*Value: 7/);
    refuses(() => compute({ ...request, gapTolerance: -1, part: { index: 0, count: 2 } }), 'gapTolerance', /Value: -1/);
  });

  it('the join refuses missing, repeated and foreign parts', () => {
    const p = three();
    refuses(() => joinParts([]), 'parts', /nonempty/);
    refuses(() => joinParts([p[0], p[2]]), 'parts', /expected 3 parts.*got 2/);
    refuses(() => joinParts([p[0], p[1], p[1]]), 'parts[2].part.index', /part 1 of 3 appears twice/);
    const two = [0, 1].map((index) => compute({ ...request, part: { index, count: 2 } }) as CurvaturePart);
    refuses(() => joinParts([p[0], p[1], two[1]]), 'parts[2].part.count', /differs.*Value: 2/);
    const finer = compute({ ...request, grid: [6, 6], part: { index: 2, count: 3 } }) as CurvaturePart;
    refuses(() => joinParts([p[0], p[1], finer]), 'parts[2].grid', /differs from parts\[0\]\.grid = \[6,5\].*Value: \[6,6\]/);
    const kubo = compute({ ...request, method: 'kubo', part: { index: 1, count: 3 } }) as CurvaturePart;
    refuses(() => joinParts([p[0], kubo, p[2]]), 'parts[1].method', /"lattice".*Value: "kubo"/);
    const upper = compute({ ...request, bands: [1], part: { index: 1, count: 3 } }) as CurvaturePart;
    refuses(() => joinParts([p[0], upper, p[2]]), 'parts[1].bands', /Value: \[1,1\]/);
    const flow = compute({ kind: 'wannier-flow', model: QWZ, grid: 5, part: { index: 1, count: 3 } }) as WannierFlowPart;
    refuses(() => joinParts([p[0], flow, p[2]] as DiagnosticPart[]), 'parts[1].kind', /expected "curvature-part". Value: "wannier-flow-part"/);
    refuses(() => joinParts([{ kind: 'chern' }] as unknown as DiagnosticPart[]), 'parts[0].kind', /Value: "chern"/);
    // A part whose rows were tampered with, or whose values were cut short.
    refuses(() => joinParts([p[0], { ...p[1], rows: [2, 4] }, p[2]]), 'parts[1]', /holds rows \[2, 4\) but part 1 of 3 is \[1, 3\)/);
    refuses(() => joinParts([p[0], { ...p[1], values: p[1].values.subarray(1) }, p[2]]), 'parts[1].values', /length 12/);
    const banded = compute({ ...request, perBand: true, part: { index: 1, count: 3 } }) as CurvaturePart;
    refuses(() => joinParts([p[0], banded, p[2]]), 'parts[1].perBand', /present although parts\[0\] has none/);
  });

  it('parts split the rows evenly and cover each once', () => {
    // Part i of c holds [floor(i n / c), floor((i + 1) n / c)) (the split the brief specifies).
    expect([0, 1, 2].map((i) => partBounds(i, 3, 10))).toEqual([[0, 3], [3, 6], [6, 10]]);
    expect([0, 1, 2, 3].map((i) => partBounds(i, 4, 4))).toEqual([[0, 1], [1, 2], [2, 3], [3, 4]]);
  });
});
