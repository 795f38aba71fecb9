import { add, complex, det as mathDet, eigs, multiply, subtract, type Complex } from 'mathjs';

const mul = (x: Complex, y: Complex): Complex => multiply(x, y) as Complex;
import { describe, expect, it } from 'vitest';
import { ComplexDeterminant, determinant } from '../../src/linalg/determinant.js';
import { eigenphases, UnitaryEigenphases } from '../../src/linalg/eigphases.js';
import { eigh, HermitianEigensolver } from '../../src/linalg/eigh.js';
import { ComplexPfaffian, pfaffian } from '../../src/linalg/pfaffian.js';
import { tridiagonalQL } from '../../src/linalg/tridiagonal.js';
import {
  EPS,
  kramersHermitian,
  numpy,
  orthonormalityError,
  randomHermitian,
  randomUnitary,
  randomSkew,
  residual,
  uniform,
  withSpectrum,
} from './linalg-fixtures.js';

const SENTINEL = 1234.5;

/** Solve with sentinel padding around every output; check it survived and return the outputs. */
function solvePadded(n: number, h: Float64Array, pad = 3): { w: Float64Array; v: Float64Array } {
  const hp = new Float64Array(2 * n * n + 2 * pad).fill(SENTINEL);
  hp.set(h, pad);
  const wp = new Float64Array(n + 2 * pad).fill(SENTINEL);
  const vp = new Float64Array(2 * n * n + 2 * pad).fill(SENTINEL);
  new HermitianEigensolver(n).solveAt(hp, pad, wp, pad, vp, pad);
  for (let i = 0; i < pad; i++) {
    expect([wp[i], wp[n + pad + i], vp[i], vp[2 * n * n + pad + i], hp[i], hp[2 * n * n + pad + i]]).toEqual(Array(6).fill(SENTINEL));
  }
  expect(Array.from(hp.subarray(pad, pad + 2 * n * n))).toEqual(Array.from(h));
  return { w: wp.slice(pad, pad + n), v: vp.slice(pad, pad + 2 * n * n) };
}

function expectGoodEigensystem(n: number, h: Float64Array, w: Float64Array, v: Float64Array): void {
  const tol = 64 * n * EPS;
  // The eigenvalues-only path runs a different tridiagonal iteration: it must agree.
  const values = new HermitianEigensolver(n).solve(h, new Float64Array(n));
  let norm = 0;
  for (const x of h) norm = Math.max(norm, Math.abs(x));
  for (let i = 0; i < n; i++) expect(Math.abs(values[i] - w[i])).toBeLessThanOrEqual(tol * norm);
  expect(residual(n, h, w, v)).toBeLessThan(tol);
  expect(orthonormalityError(n, v)).toBeLessThan(tol);
  for (let i = 1; i < n; i++) expect(w[i]).toBeGreaterThanOrEqual(w[i - 1]);
}

function toMathjs(n: number, h: Float64Array): Complex[][] {
  return Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => complex(h[2 * (i * n + j)], h[2 * (i * n + j) + 1])));
}

describe('HermitianEigensolver', () => {
  it('solves random Hermitian matrices n = 1..20 to eps-level residual and orthonormality', () => {
    const next = uniform(1);
    for (let n = 1; n <= 20; n++) {
      for (let trial = 0; trial < 3; trial++) {
        const h = randomHermitian(n, next);
        const { w, v } = solvePadded(n, h);
        expectGoodEigensystem(n, h, w, v);
      }
    }
  });

  it('agrees with mathjs eigs on random complex Hermitian and real symmetric matrices (mathjs 15)', () => {
    const next = uniform(2);
    for (const n of [2, 3, 4, 6, 9]) {
      for (const realOnly of [false, true]) {
        const h = randomHermitian(n, next);
        if (realOnly) for (let i = 1; i < h.length; i += 2) h[i] = 0;
        const w = new HermitianEigensolver(n).solve(h, new Float64Array(n));
        const theirs = (eigs(toMathjs(n, h)).values as unknown as (number | Complex)[])
          .map((x) => (typeof x === 'number' ? x : x.re))
          .sort((a, b) => a - b);
        for (let i = 0; i < n; i++) expect(Math.abs(w[i] - theirs[i])).toBeLessThan(1e-12);
      }
    }
  });

  it('2x2: eigenvalues -|d|, +|d| of d·sigma + d0 and eigenvectors through the Bloch sphere (common practice)', () => {
    const next = uniform(3);
    const s = new HermitianEigensolver(2);
    const w = new Float64Array(2);
    const v = new Float64Array(8);
    for (let trial = 0; trial < 200; trial++) {
      // include exact zeros in components to exercise the branches
      const pick = (): number => (trial % 5 === 0 ? 0 : next());
      const [d0, dx, dy, dz] = [pick(), pick(), pick(), trial % 7 === 0 ? 0 : next()];
      const h = Float64Array.of(d0 + dz, 0, dx, -dy, dx, dy, d0 - dz, 0);
      s.solve(h, w, v);
      const d = Math.hypot(dx, dy, dz);
      expect(Math.abs(w[0] - (d0 - d))).toBeLessThan(4 * EPS);
      expect(Math.abs(w[1] - (d0 + d))).toBeLessThan(4 * EPS);
      expectGoodEigensystem(2, h, w, v);
      if (d > 0) {
        // the upper eigenvector has <sigma_z> = dz/|d|: |v0|^2 - |v1|^2
        const sz = v[2] ** 2 + v[3] ** 2 - v[6] ** 2 - v[7] ** 2;
        expect(Math.abs(sz - dz / d)).toBeLessThan(8 * EPS);
      }
    }
  });

  it('2x2 without cancellation in the small eigenvalue (LAPACK dlaev2 property)', () => {
    // [[1e8, 1], [1, 1e-8]]: eigenvalues 1e8 + 1e-8 and det/1e8 = (1 - 1)/1e8 = 0 exactly... use b = 1e-4:
    // det = 1 - 1e-8, small eigenvalue (1 - 1e-8)/(1e8 + 1e-8 + ...) ~ 1e-8 - 2e-16; plain (sum - rt)/2 loses it.
    const h = Float64Array.of(1e8, 0, 1e-4, 0, 1e-4, 0, 1, 0);
    const w = new HermitianEigensolver(2).solve(h, new Float64Array(2));
    const big = 0.5 * (1e8 + 1 + Math.sqrt((1e8 - 1) ** 2 + 4e-8));
    const small = (1e8 * 1 - 1e-8) / big;
    expect(Math.abs(w[0] - small) / small).toBeLessThan(4 * EPS);
  });

  it('handles zero, diagonal, multiple-of-identity and tridiagonal-split matrices', () => {
    for (const n of [1, 2, 3, 5, 8]) {
      const zero = new Float64Array(2 * n * n);
      const { w, v } = solvePadded(n, zero);
      expect(Array.from(w)).toEqual(Array(n).fill(0));
      expect(orthonormalityError(n, v)).toBe(0);
      const diag = new Float64Array(2 * n * n);
      const values = Array.from({ length: n }, (_, i) => ((i * 7) % n) - n / 2);
      values.forEach((x, i) => (diag[2 * (i * n + i)] = x));
      const r = solvePadded(n, diag);
      expect(Array.from(r.w)).toEqual([...values].sort((a, b) => a - b));
      expectGoodEigensystem(n, diag, r.w, r.v);
      const ident = new Float64Array(2 * n * n);
      for (let i = 0; i < n; i++) ident[2 * (i * n + i)] = 3.25;
      const s = solvePadded(n, ident);
      expect(Array.from(s.w)).toEqual(Array(n).fill(3.25));
      expectGoodEigensystem(n, ident, s.w, s.v);
    }
    // block diagonal: two decoupled random blocks (the tridiagonal form splits)
    const next = uniform(4);
    const n = 7;
    const h = new Float64Array(2 * n * n);
    const b1 = randomHermitian(3, next);
    const b2 = randomHermitian(4, next);
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) for (let c = 0; c < 2; c++) h[2 * (i * n + j) + c] = b1[2 * (i * 3 + j) + c];
    for (let i = 0; i < 4; i++) for (let j = 0; j < 4; j++) for (let c = 0; c < 2; c++) h[2 * ((i + 3) * n + j + 3) + c] = b2[2 * (i * 4 + j) + c];
    const r = solvePadded(n, h);
    expectGoodEigensystem(n, h, r.w, r.v);
  });

  it('open chain with complex (Peierls-phase) hoppings: eigenvalues 2t cos(pi k/(n+1)) (textbook tight-binding chain)', () => {
    // Already tridiagonal: no reflector is needed; only the diagonal phase transform is exercised.
    const t = 0.7;
    for (const n of [3, 4, 7, 16, 50, 100, 256]) {
      const h = new Float64Array(2 * n * n);
      for (let i = 0; i + 1 < n; i++) {
        const theta = 0.3 + 1.1 * i; // a gauge choice: the spectrum of an open chain does not depend on it
        h[2 * (i * n + i + 1)] = t * Math.cos(theta);
        h[2 * (i * n + i + 1) + 1] = t * Math.sin(theta);
        h[2 * ((i + 1) * n + i)] = t * Math.cos(theta);
        h[2 * ((i + 1) * n + i) + 1] = -t * Math.sin(theta);
      }
      const { w, v } = solvePadded(n, h);
      expectGoodEigensystem(n, h, w, v);
      const expected = Array.from({ length: n }, (_, k) => 2 * t * Math.cos((Math.PI * (k + 1)) / (n + 1))).sort((a, b) => a - b);
      for (let k = 0; k < n; k++) expect(Math.abs(w[k] - expected[k])).toBeLessThan(16 * n * EPS);
    }
  });

  it('exactly degenerate spectra: Kramers pairs (Sakurai sec. 4.4) and projector-built flat bands', () => {
    const next = uniform(5);
    for (const half of [1, 2, 3, 4, 8, 16]) {
      const n = 2 * half;
      const h = kramersHermitian(half, next);
      const { w, v } = solvePadded(n, h);
      expectGoodEigensystem(n, h, w, v);
      for (let i = 0; i < n; i += 2) expect(Math.abs(w[i + 1] - w[i])).toBeLessThan(32 * n * EPS);
    }
    for (const n of [3, 4, 6, 12, 30]) {
      // flat bands: H = -1 P_1 + 0 P_2 + 2 P_3 with projectors of ranks ~n/3
      const d = Array.from({ length: n }, (_, i) => (i < n / 3 ? -1 : i < (2 * n) / 3 ? 0 : 2));
      const h = withSpectrum(randomUnitary(n, next), n, d);
      const { w, v } = solvePadded(n, h);
      expectGoodEigensystem(n, h, w, v);
      const sorted = [...d].sort((a, b) => a - b);
      for (let i = 0; i < n; i++) expect(Math.abs(w[i] - sorted[i])).toBeLessThan(64 * n * EPS);
    }
  });

  it('clusters within 1e-10 keep eps-level residuals and orthonormality', () => {
    const next = uniform(6);
    for (const n of [3, 4, 8, 16, 40]) {
      const d = Array.from({ length: n }, (_, i) => Math.floor(i / 3) + (i % 3) * 1e-10 * next());
      const h = withSpectrum(randomUnitary(n, next), n, d);
      const { w, v } = solvePadded(n, h);
      expectGoodEigensystem(n, h, w, v);
    }
  });

  it('scaled inputs (1e-300 .. 1e300): eigenvalues scale, residuals stay relative', () => {
    const next = uniform(7);
    for (const n of [1, 2, 3, 6, 12]) {
      const h = randomHermitian(n, next);
      const w1 = new HermitianEigensolver(n).solve(h, new Float64Array(n));
      for (const scale of [1e-300, 1e-150, 1e150, 1e300]) {
        const hs = h.map((x) => x * scale);
        const { w, v } = solvePadded(n, hs);
        expectGoodEigensystem(n, hs, w, v);
        const wmax = Math.max(...w1.map(Math.abs));
        for (let i = 0; i < n; i++) expect(Math.abs(w[i] / scale - w1[i])).toBeLessThan(64 * n * EPS * wmax);
      }
    }
  });

  it('reads only the upper triangle and ignores the imaginary part of the diagonal', () => {
    const next = uniform(8);
    for (const n of [2, 5]) {
      const h = randomHermitian(n, next);
      const junk = h.slice();
      for (let i = 0; i < n; i++) {
        junk[2 * (i * n + i) + 1] = 99;
        for (let j = 0; j < i; j++) junk[2 * (i * n + j)] = junk[2 * (i * n + j) + 1] = NaN;
      }
      const a = eigh(n, h);
      const b = eigh(n, junk);
      expect(Array.from(b.values)).toEqual(Array.from(a.values));
      expect(Array.from(b.vectors)).toEqual(Array.from(a.vectors));
    }
  });

  it('allows w or vecs to be h itself, and a reused solver gives identical results', () => {
    const next = uniform(9);
    for (const n of [1, 2, 4, 9]) {
      const h = randomHermitian(n, next);
      const ref = eigh(n, h);
      const solver = new HermitianEigensolver(n);
      const alias = h.slice();
      solver.solve(alias, new Float64Array(n), alias);
      expect(Array.from(alias)).toEqual(Array.from(ref.vectors));
      const alias2 = h.slice();
      solver.solve(alias2, alias2);
      const refValues = new HermitianEigensolver(n).solve(h, new Float64Array(n));
      expect(Array.from(alias2.subarray(0, n))).toEqual(Array.from(refValues));
      const again = solver.solve(h, new Float64Array(n), new Float64Array(2 * n * n));
      expect(Array.from(again)).toEqual(Array.from(ref.values));
    }
  });

  it('solvers share the kernels\' memory: a solver keeps working after a larger one needed a new one (common practice)', () => {
    const next = uniform(26);
    const small = new HermitianEigensolver(5);
    const h = randomHermitian(5, next);
    const before = small.solve(h, new Float64Array(5), new Float64Array(50)).slice();
    // A size never used before in this file needs more memory than the shared one holds.
    const big = new HermitianEigensolver(300);
    const hb = randomHermitian(300, next);
    const wb = big.solve(hb, new Float64Array(300));
    const v = new Float64Array(50);
    const after = small.solve(h, new Float64Array(5), v);
    expect(Array.from(after)).toEqual(Array.from(before));
    expectGoodEigensystem(5, h, after, v);
    expect(Array.from(big.solve(hb, new Float64Array(300)))).toEqual(Array.from(wb));
  });

  it('solves matrices stored at offsets in a batch', () => {
    const next = uniform(10);
    const n = 4;
    const batch = 5;
    const hs = new Float64Array(batch * 2 * n * n);
    for (let b = 0; b < batch; b++) hs.set(randomHermitian(n, next), b * 2 * n * n);
    const ws = new Float64Array(batch * n);
    const solver = new HermitianEigensolver(n);
    for (let b = 0; b < batch; b++) solver.solveAt(hs, b * 2 * n * n, ws, b * n, null);
    for (let b = 0; b < batch; b++) {
      const one = new HermitianEigensolver(n).solve(hs.slice(b * 2 * n * n, (b + 1) * 2 * n * n), new Float64Array(n));
      expect(Array.from(ws.subarray(b * n, (b + 1) * n))).toEqual(Array.from(one));
    }
  });

  it('rejects bad sizes, short arrays, bad offsets and non-finite entries, naming them', () => {
    expect(() => new HermitianEigensolver(0)).toThrow(/size must be a positive integer. Value: 0/);
    expect(() => new HermitianEigensolver(2.5)).toThrow(/Value: 2.5/);
    // Workspace beyond what 32-bit WebAssembly memory can hold (4 GB; WebAssembly spec limit).
    expect(() => new HermitianEigensolver(12000)).toThrow(/could not allocate 7692 MB of workspace.*Value: 8065536000 bytes/);
    const s = new HermitianEigensolver(3);
    expect(() => s.solve(new Float64Array(10), new Float64Array(3))).toThrow(/h must hold 18 entries from offset 0. Value: length 10/);
    expect(() => s.solve(new Float64Array(18), new Float64Array(2))).toThrow(/w must hold 3 entries/);
    expect(() => s.solve(new Float64Array(18), new Float64Array(3), new Float64Array(4))).toThrow(/vecs must hold 18 entries/);
    expect(() => s.solveAt(new Float64Array(18), -1, new Float64Array(3), 0, null)).toThrow(/h offset must be a nonnegative integer. Value: -1/);
    for (const n of [1, 2, 3]) {
      const h = new Float64Array(2 * n * n);
      h[2 * (n - 1)] = NaN;
      expect(() => new HermitianEigensolver(n).solve(h, new Float64Array(n))).toThrow(new RegExp(`h\\[0\\]\\[${n - 1}\\] is not finite`));
      h[2 * (n - 1)] = Infinity;
      expect(() => new HermitianEigensolver(n).solve(h, new Float64Array(n))).toThrow(/not finite/);
    }
  });
});

/** Block-diagonal direct sum of `copies` copies of the n x n matrix b. */
function directSum(b: Float64Array, n: number, copies: number): Float64Array {
  const size = n * copies;
  const h = new Float64Array(2 * size * size);
  for (let c = 0; c < copies; c++) {
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        const to = 2 * ((c * n + i) * size + c * n + j);
        h[to] = b[2 * (i * n + j)];
        h[to + 1] = b[2 * (i * n + j) + 1];
      }
    }
  }
  return h;
}

// From n = 25 on the tridiagonal eigenvectors come from divide and conquer (leaves of up to 24 by
// QL): these sizes cover one, two and three levels of merging, odd splits and deflation.
describe('HermitianEigensolver, divide-and-conquer sizes (n >= 25)', () => {
  it('random matrices n = 25, 31, 32, 33, 49, 64, 100, 256: eps-level residual and orthonormality (common practice)', () => {
    const next = uniform(21);
    for (const n of [25, 31, 32, 33, 49, 64, 100, 256]) {
      const h = randomHermitian(n, next);
      const { w, v } = solvePadded(n, h);
      expectGoodEigensystem(n, h, w, v);
    }
  });

  it('eigenvalues agree with numpy eigvalsh (Debian numpy) for n = 64, 100, 256', () => {
    const next = uniform(22);
    for (const n of [64, 100, 256]) {
      const h = randomHermitian(n, next);
      const w = new HermitianEigensolver(n).solve(h, new Float64Array(n), new Float64Array(2 * n * n));
      const theirs = numpy<number[]>('out = np.linalg.eigvalsh(inp["h"]).tolist()', { h: { data: h, shape: [n, n], complex: true } });
      for (let i = 0; i < n; i++) expect(Math.abs(w[i] - theirs[i])).toBeLessThan(64 * n * EPS);
    }
  });

  it('exact degeneracies: a direct sum of copies, a 50-fold eigenvalue, Kramers pairs (Sakurai sec. 4.4)', () => {
    const next = uniform(23);
    // Four copies of one 16 x 16 block (n = 64) and three of one 33 x 33 block (n = 99): every
    // eigenvalue 4- or 3-fold, and the tridiagonal form splits into decoupled pieces.
    for (const [m, copies] of [[16, 4], [33, 3]]) {
      const n = m * copies;
      const block = randomHermitian(m, next);
      const h = directSum(block, m, copies);
      const { w, v } = solvePadded(n, h);
      expectGoodEigensystem(n, h, w, v);
      const wb = new HermitianEigensolver(m).solve(block, new Float64Array(m));
      for (let i = 0; i < n; i++) expect(Math.abs(w[i] - wb[Math.floor(i / copies)])).toBeLessThan(64 * n * EPS);
    }
    // U diag(d) U^dagger with d = -1 fifty times and fifty spread values (n = 100).
    const n = 100;
    const d = Array.from({ length: n }, (_, i) => (i < 50 ? -1 : next()));
    const h = withSpectrum(randomUnitary(n, next), n, d);
    const { w, v } = solvePadded(n, h);
    expectGoodEigensystem(n, h, w, v);
    const sorted = [...d].sort((a, b) => a - b);
    for (let i = 0; i < n; i++) expect(Math.abs(w[i] - sorted[i])).toBeLessThan(64 * n * EPS);
    for (const half of [32, 50, 128]) {
      const k = kramersHermitian(half, next);
      const r = solvePadded(2 * half, k);
      expectGoodEigensystem(2 * half, k, r.w, r.v);
      for (let i = 0; i < 2 * half; i += 2) expect(Math.abs(r.w[i + 1] - r.w[i])).toBeLessThan(64 * 2 * half * EPS);
    }
  });

  it('clusters within 1e-10 and flat bands at n = 64 and 100 (common practice)', () => {
    const next = uniform(24);
    for (const n of [64, 100]) {
      const d = Array.from({ length: n }, (_, i) => Math.floor(i / 5) + (i % 5) * 1e-10 * next());
      const h = withSpectrum(randomUnitary(n, next), n, d);
      const { w, v } = solvePadded(n, h);
      expectGoodEigensystem(n, h, w, v);
      const flat = Array.from({ length: n }, (_, i) => (i < n / 3 ? -1 : i < (2 * n) / 3 ? 0 : 2));
      const hf = withSpectrum(randomUnitary(n, next), n, flat);
      const r = solvePadded(n, hf);
      expectGoodEigensystem(n, hf, r.w, r.v);
      const sorted = [...flat].sort((a, b) => a - b);
      for (let i = 0; i < n; i++) expect(Math.abs(r.w[i] - sorted[i])).toBeLessThan(64 * n * EPS);
    }
  });

  it('scaled inputs (1e-300, 1e300) at n = 64: eigenvalues scale, residuals stay relative', () => {
    const next = uniform(25);
    const n = 64;
    const h = randomHermitian(n, next);
    const w1 = new HermitianEigensolver(n).solve(h, new Float64Array(n), new Float64Array(2 * n * n));
    const wmax = Math.max(...w1.map(Math.abs));
    for (const scale of [1e-300, 1e300]) {
      const hs = h.map((x) => x * scale);
      const { w, v } = solvePadded(n, hs);
      expectGoodEigensystem(n, hs, w, v);
      for (let i = 0; i < n; i++) expect(Math.abs(w[i] / scale - w1[i])).toBeLessThan(64 * n * EPS * wmax);
    }
  });
});

describe('tridiagonalQL', () => {
  it('the same eigenpairs at the ends of its input range, norms 2^-300 and 2^300 (exact power-of-two scaling; common practice)', () => {
    const next = uniform(27);
    const n = 12;
    const d0 = Array.from({ length: n }, () => next());
    const e0 = Array.from({ length: n }, () => next());
    const solve = (scale: number): { d: Float64Array; z: Float64Array } => {
      const d = Float64Array.from(d0, (x) => x * scale);
      const e = Float64Array.from(e0, (x) => x * scale);
      const z = new Float64Array(n * n);
      for (let i = 0; i < n; i++) z[i * n + i] = 1;
      expect(tridiagonalQL(n, d, e, z, new Float64Array(n), new Float64Array(n))).toBe(true);
      return { d, z };
    };
    const ref = solve(1);
    for (const scale of [2 ** -300, 2 ** 300]) {
      const got = solve(scale);
      for (let i = 0; i < n; i++) expect(Math.abs(got.d[i] / scale - ref.d[i])).toBeLessThan(64 * n * EPS);
      for (let i = 0; i < n * n; i++) expect(Math.abs(got.z[i] - ref.z[i])).toBeLessThan(1e-12);
    }
  });
});

describe('UnitaryEigenphases', () => {
  it('cyclic permutations: phases 2 pi k / m, the m-th roots of unity (common practice)', () => {
    for (let m = 1; m <= 9; m++) {
      const p = new Float64Array(2 * m * m);
      for (let i = 0; i < m; i++) p[2 * (((i + 1) % m) * m + i)] = 1;
      const phases = new Float64Array(m);
      const v = new Float64Array(2 * m * m);
      new UnitaryEigenphases(m).solve(p, phases, v);
      const expected = Array.from({ length: m }, (_, k) => {
        const x = (2 * Math.PI * k) / m;
        return x > Math.PI + 1e-12 ? x - 2 * Math.PI : x;
      }).sort((a, b) => a - b);
      for (let k = 0; k < m; k++) expect(Math.abs(phases[k] - expected[k])).toBeLessThan(64 * EPS);
      expect(phases[m - 1]).toBeLessThanOrEqual(Math.PI);
      expect(orthonormalityError(m, v)).toBeLessThan(64 * m * EPS);
    }
  });

  it('recovers constructed phases, with exactly degenerate pairs and the branch cut at pi', () => {
    const next = uniform(11);
    for (const m of [1, 2, 3, 4, 6, 8, 12, 24]) {
      const phi = Array.from({ length: m }, () => Math.PI * next());
      if (m >= 2) phi[1] = phi[0]; // a Kramers pair
      if (m >= 4) phi[3] = phi[2] = Math.PI; // degenerate at the branch cut: reported as +pi
      const u = randomUnitary(m, next);
      const w = withSpectrum(u, m, phi.map(Math.cos), phi.map(Math.sin));
      const wp = new Float64Array(2 * m * m + 4).fill(SENTINEL);
      wp.set(w, 2);
      const phases = new Float64Array(m + 4).fill(SENTINEL);
      const vecs = new Float64Array(2 * m * m + 4).fill(SENTINEL);
      new UnitaryEigenphases(m).solveAt(wp, 2, phases, 2, vecs, 2);
      for (const x of [phases[0], phases[1], phases[m + 2], phases[m + 3], vecs[0], vecs[1], vecs.at(-1), vecs.at(-2)]) expect(x).toBe(SENTINEL);
      const got = phases.slice(2, m + 2);
      const sorted = [...phi].sort((a, b) => a - b);
      for (let k = 0; k < m; k++) {
        // distance on the circle, so that -pi + tiny and pi compare equal
        const dist = Math.abs(Math.atan2(Math.sin(got[k] - sorted[k]), Math.cos(got[k] - sorted[k])));
        expect(dist).toBeLessThan(256 * m * EPS);
        expect(got[k]).toBeGreaterThan(-Math.PI);
        expect(got[k]).toBeLessThanOrEqual(Math.PI);
      }
      const v = vecs.slice(2, 2 * m * m + 2);
      expect(orthonormalityError(m, v)).toBeLessThan(64 * m * EPS);
      // W v = e^{i phi} v: a residual with complex eigenvalues
      let worst = 0;
      for (let c = 0; c < m; c++) {
        const er = Math.cos(got[c]), ei = Math.sin(got[c]);
        for (let i = 0; i < m; i++) {
          let re = 0, im = 0;
          for (let k = 0; k < m; k++) {
            const ar = w[2 * (i * m + k)], ai = w[2 * (i * m + k) + 1], br = v[2 * (k * m + c)], bi = v[2 * (k * m + c) + 1];
            re += ar * br - ai * bi;
            im += ar * bi + ai * br;
          }
          const vr = v[2 * (i * m + c)], vi = v[2 * (i * m + c) + 1];
          worst = Math.max(worst, Math.hypot(re - (er * vr - ei * vi), im - (er * vi + ei * vr)));
        }
      }
      expect(worst).toBeLessThan(256 * m * EPS);
    }
  });

  it('identity, -identity and diagonal phases', () => {
    for (const m of [1, 3, 5]) {
      const id = new Float64Array(2 * m * m);
      for (let i = 0; i < m; i++) id[2 * (i * m + i)] = 1;
      expect(Array.from(eigenphases(m, id).phases)).toEqual(Array(m).fill(0));
      const minus = id.map((x) => -x);
      expect(Array.from(eigenphases(m, minus).phases)).toEqual(Array(m).fill(Math.PI));
    }
  });

  it('reports moduli through eigenvalues, and rejects non-finite input naming the entry', () => {
    const s = new UnitaryEigenphases(2);
    s.solve(Float64Array.of(0.5, 0, 0, 0, 0, 0, 0, 2), new Float64Array(2));
    expect(Array.from(s.eigenvalues)).toEqual([0.5, 0, 0, 2]);
    expect(() => s.solve(Float64Array.of(1, 0, 0, 0, 0, NaN, 1, 0), new Float64Array(2))).toThrow(/w\[1\]\[0\] is not finite/);
    expect(() => s.solve(new Float64Array(7), new Float64Array(2))).toThrow(/w must hold 8 entries/);
  });
});

describe('ComplexDeterminant', () => {
  it('agrees with mathjs det on random complex matrices (mathjs 15)', () => {
    const next = uniform(12);
    for (const n of [1, 2, 3, 5, 8]) {
      const m = new Float64Array(2 * n * n).map(() => next());
      const d = determinant(n, m);
      const theirs = mathDet(toMathjs(n, m)) as unknown as Complex;
      const scale = Math.hypot(theirs.re, theirs.im);
      expect(Math.hypot(d[0] - theirs.re, d[1] - theirs.im)).toBeLessThan(1e-12 * Math.max(1, scale));
    }
  });

  it('is the product of eigenvalues for U diag(l) U^dagger, zero when singular, 1 for n = 0', () => {
    const next = uniform(13);
    const n = 6;
    const l = Array.from({ length: n }, () => next() * 2);
    const m = withSpectrum(randomUnitary(n, next), n, l);
    const d = new ComplexDeterminant(n).compute(m);
    const prod = l.reduce((a, b) => a * b, 1);
    expect(Math.abs(d[0] - prod)).toBeLessThan(1e-13);
    expect(Math.abs(d[1])).toBeLessThan(1e-13);
    const sing = new Float64Array(2 * 9);
    sing.set([1, 1, 2, 0, 3, 0], 0);
    sing.set([2, 2, 4, 0, 6, 0], 6);
    expect(Array.from(determinant(3, sing))).toEqual([0, 0]);
    expect(Array.from(determinant(0, new Float64Array(0)))).toEqual([1, 0]);
  });
});

describe('ComplexPfaffian', () => {
  const at = (a: Float64Array, n: number, i: number, j: number): Complex => complex(a[2 * (i * n + j)], a[2 * (i * n + j) + 1]);

  it('2x2 and 4x4 closed forms: a01 and a01 a23 - a02 a13 + a03 a12 (Parlett & Reid 1970; textbook)', () => {
    const next = uniform(14);
    for (let trial = 0; trial < 20; trial++) {
      const a2 = randomSkew(2, next);
      expect(Array.from(pfaffian(2, a2))).toEqual([a2[2], a2[3]]);
      const a = randomSkew(4, next);
      const expected = add(
        subtract(mul(at(a, 4, 0, 1), at(a, 4, 2, 3)), mul(at(a, 4, 0, 2), at(a, 4, 1, 3))),
        mul(at(a, 4, 0, 3), at(a, 4, 1, 2)),
      ) as Complex;
      const pf = pfaffian(4, a);
      expect(Math.hypot(pf[0] - expected.re, pf[1] - expected.im)).toBeLessThan(1e-14);
    }
  });

  it('Pf^2 = det and Pf(B A B^T) = det(B) Pf(A) (textbook identities), det from mathjs', () => {
    const next = uniform(15);
    for (const n of [2, 4, 6, 10]) {
      const a = randomSkew(n, next);
      const pf = new ComplexPfaffian(n).compute(a);
      const d = mathDet(toMathjs(n, a)) as unknown as Complex;
      const sq = [pf[0] * pf[0] - pf[1] * pf[1], 2 * pf[0] * pf[1]];
      expect(Math.hypot(sq[0] - d.re, sq[1] - d.im)).toBeLessThan(1e-12 * Math.max(1, Math.hypot(d.re, d.im)));
      const b = new Float64Array(2 * n * n).map(() => next());
      // B A B^T
      const bab = new Float64Array(2 * n * n);
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) {
          let re = 0, im = 0;
          for (let k = 0; k < n; k++) {
            for (let l = 0; l < n; l++) {
              const x = mul(mul(at(b, n, i, k), at(a, n, k, l)), at(b, n, j, l));
              re += x.re;
              im += x.im;
            }
          }
          bab[2 * (i * n + j)] = re;
          bab[2 * (i * n + j) + 1] = im;
        }
      }
      const lhs = pfaffian(n, bab);
      const db = determinant(n, b);
      const rhs = [db[0] * pf[0] - db[1] * pf[1], db[0] * pf[1] + db[1] * pf[0]];
      expect(Math.hypot(lhs[0] - rhs[0], lhs[1] - rhs[1])).toBeLessThan(1e-11 * Math.max(1, Math.hypot(rhs[0], rhs[1])));
    }
  });

  it('odd n and zero pivots give 0; reads only the strict upper triangle', () => {
    const next = uniform(16);
    expect(Array.from(pfaffian(3, randomSkew(3, next)))).toEqual([0, 0]);
    expect(Array.from(pfaffian(0, new Float64Array(0)))).toEqual([1, 0]);
    const z = new Float64Array(2 * 16);
    z[2 * (2 * 4 + 3)] = 1; // only a23 set: row 0 is zero
    expect(Array.from(pfaffian(4, z))).toEqual([0, 0]);
    const a = randomSkew(6, next);
    const junk = a.slice();
    for (let i = 0; i < 6; i++) for (let j = 0; j <= i; j++) junk[2 * (i * 6 + j)] = junk[2 * (i * 6 + j) + 1] = 7;
    expect(Array.from(pfaffian(6, junk))).toEqual(Array.from(pfaffian(6, a)));
  });

  it('block-diagonal standard form: Pf of diag blocks [[0, x_k], [-x_k, 0]] is the product of x_k (textbook)', () => {
    const n = 8;
    const a = new Float64Array(2 * n * n);
    const xs = [complex(2, 1), complex(-1, 0.5), complex(0.3, -2), complex(1.5, 0)];
    xs.forEach((x, k) => {
      a[2 * (2 * k * n + 2 * k + 1)] = x.re;
      a[2 * (2 * k * n + 2 * k + 1) + 1] = x.im;
    });
    const expected = xs.reduce((p, x) => mul(p, x), complex(1, 0));
    const pf = pfaffian(n, a);
    expect(Math.hypot(pf[0] - expected.re, pf[1] - expected.im)).toBeLessThan(1e-14);
  });
});

describe('HermitianEigensolver.solveLowest', () => {
  it('gives the lowest eigenvectors of solve, bit for bit, as rows, with the count chosen from the values', () => {
    for (const n of [1, 2, 3, 30, 75]) {
      const h = randomHermitian(n, uniform(900 + n));
      const solver = new HermitianEigensolver(n);
      const w = new Float64Array(n), vecs = new Float64Array(2 * n * n);
      solver.solve(h, w, vecs);
      for (const pick of [0, Math.floor(n / 2), n]) {
        const w2 = new Float64Array(n);
        let seen: number[] = [];
        const rows = solver.solveLowest(h, w2, (values) => {
          seen = Array.from(values);
          return pick;
        });
        expect(seen).toEqual(Array.from(w));
        expect(Array.from(w2)).toEqual(Array.from(w));
        expect(rows.length).toBe(2 * pick * n);
        for (let j = 0; j < pick; j++) {
          for (let i = 0; i < n; i++) {
            expect(rows[2 * (j * n + i)]).toBe(vecs[2 * (i * n + j)]);
            expect(rows[2 * (j * n + i) + 1]).toBe(vecs[2 * (i * n + j) + 1]);
          }
        }
      }
      expect(() => solver.solveLowest(h, new Float64Array(n), () => n + 1)).toThrow(RangeError);
    }
  });
});

describe('UnitaryEigenphases on a general matrix (the Bott index passes one)', () => {
  it('gives the eigenvalues numpy.linalg.eigvals gives (LAPACK zgeev), odd and even sizes', () => {
    for (const n of [5, 40, 97]) {
      const next = uniform(4100 + n);
      const w = Float64Array.from({ length: 2 * n * n }, next);
      const solver = new UnitaryEigenphases(n);
      solver.solve(w, new Float64Array(n));
      const theirs = numpy<number[][]>('e = np.linalg.eigvals(inp["w"]); out = [[float(z.real), float(z.imag)] for z in e]', { w: { data: w, shape: [n, n], complex: true } });
      // Match each of ours to the nearest of theirs (all distinct for a random matrix).
      const left = theirs.slice();
      for (let i = 0; i < n; i++) {
        const re = solver.eigenvalues[2 * i], im = solver.eigenvalues[2 * i + 1];
        let best = 0;
        for (let j = 1; j < left.length; j++) if (Math.hypot(left[j][0] - re, left[j][1] - im) < Math.hypot(left[best][0] - re, left[best][1] - im)) best = j;
        expect(Math.hypot(left[best][0] - re, left[best][1] - im)).toBeLessThan(1e-10 * n);
        left.splice(best, 1);
      }
    }
  });
});
