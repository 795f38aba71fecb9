/**
 * The linalg kernels against numpy (Debian's /usr/bin/python3 with python3-numpy, LAPACK-backed):
 * eigvalsh, det, eigvals. Tolerances are relative to machine epsilon and ||H||.
 */
import { describe, expect, it } from 'vitest';
import { determinant } from '../../src/linalg/determinant.js';
import { UnitaryEigenphases } from '../../src/linalg/eigphases.js';
import { HermitianEigensolver } from '../../src/linalg/eigh.js';
import { pfaffian } from '../../src/linalg/pfaffian.js';
import {
  EPS,
  kramersHermitian,
  numpy,
  orthonormalityError,
  randomHermitian,
  randomUnitary,
  residual,
  randomSkew,
  uniform,
  withSpectrum,
} from '../unit/linalg-fixtures.js';

interface Case {
  name: string;
  n: number;
  h: Float64Array;
}

function maxAbs(x: Float64Array): number {
  let m = 0;
  for (const v of x) m = Math.max(m, Math.abs(v));
  return m;
}

/** Our eigenvalues and eigenvectors for each case beside numpy's eigvalsh of the same matrix. */
function compareWithEigvalsh(cases: Case[]): void {
  const inputs: Record<string, { data: Float64Array; shape: number[]; complex: boolean }> = {};
  cases.forEach((c, i) => (inputs[`m${i}`] = { data: c.h, shape: [c.n, c.n], complex: true }));
  const theirs = numpy<number[][]>(
    `out = [np.linalg.eigvalsh(inp[f"m{i}"], UPLO="U").tolist() for i in range(${cases.length})]`,
    inputs,
  );
  cases.forEach((c, i) => {
    const { n, h } = c;
    const w = new Float64Array(n);
    const v = new Float64Array(2 * n * n);
    new HermitianEigensolver(n).solve(h, w, v);
    const tol = 64 * n * EPS * maxAbs(h);
    for (let k = 0; k < n; k++) {
      const gap = Math.abs(w[k] - theirs[i][k]);
      if (!(gap <= tol)) throw new Error(`${c.name}: eigenvalue ${k} differs from numpy by ${gap} (tolerance ${tol})`);
    }
    // the eigenvalues-only path (a different tridiagonal iteration) against numpy too
    const values = new HermitianEigensolver(n).solve(h, new Float64Array(n));
    for (let k = 0; k < n; k++) {
      const gap = Math.abs(values[k] - theirs[i][k]);
      if (!(gap <= tol)) throw new Error(`${c.name} (values only): eigenvalue ${k} differs from numpy by ${gap} (tolerance ${tol})`);
    }
    expect(residual(n, h, w, v), c.name).toBeLessThan(64 * n * EPS);
    expect(orthonormalityError(n, v), c.name).toBeLessThan(64 * n * EPS);
  });
}

describe('HermitianEigensolver against numpy.linalg.eigvalsh', () => {
  it('random Hermitian n = 1..64 and 256', () => {
    const next = uniform(101);
    const sizes = [...Array.from({ length: 24 }, (_, i) => i + 1), 31, 32, 33, 48, 64, 256];
    compareWithEigvalsh(sizes.map((n) => ({ name: `random n=${n}`, n, h: randomHermitian(n, next) })));
  });

  it('nearly degenerate (clusters within 1e-10), exactly degenerate (Kramers pairs, flat bands), scaled', () => {
    const next = uniform(102);
    const cases: Case[] = [];
    for (const n of [4, 9, 24, 64]) {
      const d = Array.from({ length: n }, (_, i) => Math.floor(i / 4) * 0.5 + 1e-10 * next());
      cases.push({ name: `clustered n=${n}`, n, h: withSpectrum(randomUnitary(n, next), n, d) });
    }
    for (const half of [2, 5, 16, 32]) cases.push({ name: `Kramers n=${2 * half}`, n: 2 * half, h: kramersHermitian(half, next) });
    for (const n of [6, 20]) {
      const d = Array.from({ length: n }, (_, i) => (i % 3) - 1);
      cases.push({ name: `flat bands n=${n}`, n, h: withSpectrum(randomUnitary(n, next), n, d) });
    }
    for (const scale of [1e-150, 1e150]) {
      cases.push({ name: `scaled ${scale}`, n: 10, h: randomHermitian(10, next).map((x) => x * scale) });
    }
    compareWithEigvalsh(cases);
  });
});

describe('determinant, Pfaffian and eigenphases against numpy', () => {
  it('LU determinant equals numpy.linalg.det', () => {
    const next = uniform(103);
    const sizes = [1, 2, 3, 7, 16, 40];
    const mats = sizes.map((n) => new Float64Array(2 * n * n).map(() => next()));
    const inputs = Object.fromEntries(mats.map((m, i) => [`m${i}`, { data: m, shape: [sizes[i], sizes[i]], complex: true }]));
    const theirs = numpy<[number, number][]>(
      `out = [[complex(np.linalg.det(inp[f"m{i}"])).real, complex(np.linalg.det(inp[f"m{i}"])).imag] for i in range(${sizes.length})]`,
      inputs,
    );
    mats.forEach((m, i) => {
      const d = determinant(sizes[i], m);
      const [re, im] = theirs[i];
      expect(Math.hypot(d[0] - re, d[1] - im)).toBeLessThan(1e-12 * sizes[i] * Math.max(1, Math.hypot(re, im)));
    });
  });

  it('Pfaffian: Pf^2 = numpy det, and the 4x4 closed form a01 a23 - a02 a13 + a03 a12 evaluated in numpy', () => {
    const next = uniform(104);
    const sizes = [2, 4, 4, 6, 12, 30];
    const mats = sizes.map((n) => randomSkew(n, next));
    const inputs = Object.fromEntries(mats.map((m, i) => [`m${i}`, { data: m, shape: [sizes[i], sizes[i]], complex: true }]));
    const theirs = numpy<{ det: [number, number][]; pf4: [number, number][] }>(
      [
        `ms = [inp[f"m{i}"] for i in range(${sizes.length})]`,
        'dets = [complex(np.linalg.det(a)) for a in ms]',
        'pf4 = [complex(a[0,1]*a[2,3] - a[0,2]*a[1,3] + a[0,3]*a[1,2]) if a.shape[0] == 4 else 0j for a in ms]',
        'out = {"det": [[d.real, d.imag] for d in dets], "pf4": [[p.real, p.imag] for p in pf4]}',
      ].join('\n'),
      inputs,
    );
    mats.forEach((m, i) => {
      const n = sizes[i];
      const pf = pfaffian(n, m);
      const [dr, di] = theirs.det[i];
      const sq = [pf[0] * pf[0] - pf[1] * pf[1], 2 * pf[0] * pf[1]];
      expect(Math.hypot(sq[0] - dr, sq[1] - di)).toBeLessThan(1e-12 * n * Math.max(1, Math.hypot(dr, di)));
      if (n === 4) {
        const [pr, pi] = theirs.pf4[i];
        expect(Math.hypot(pf[0] - pr, pf[1] - pi)).toBeLessThan(1e-14);
      }
    });
  });

  it('unitary eigenphases equal the sorted angles of numpy.linalg.eigvals (random and with degenerate pairs)', () => {
    const next = uniform(105);
    const sizes = [1, 2, 3, 4, 6, 8, 16, 40];
    const mats = sizes.map((m, idx) => {
      const phi = Array.from({ length: m }, () => Math.PI * next());
      if (idx % 2 === 1) for (let k = 1; k < m; k += 2) phi[k] = phi[k - 1]; // Kramers pairs
      return withSpectrum(randomUnitary(m, next), m, phi.map(Math.cos), phi.map(Math.sin));
    });
    const inputs = Object.fromEntries(mats.map((w, i) => [`m${i}`, { data: w, shape: [sizes[i], sizes[i]], complex: true }]));
    const theirs = numpy<number[][]>(`out = [np.sort(np.angle(np.linalg.eigvals(inp[f"m{i}"]))).tolist() for i in range(${sizes.length})]`, inputs);
    mats.forEach((w, i) => {
      const m = sizes[i];
      const phases = new UnitaryEigenphases(m).solve(w, new Float64Array(m));
      // Compare as sets on the circle: for each of ours, the nearest of numpy's.
      for (let k = 0; k < m; k++) {
        const dist = Math.min(...theirs[i].map((t) => Math.abs(Math.atan2(Math.sin(phases[k] - t), Math.cos(phases[k] - t)))));
        expect(dist).toBeLessThan(256 * m * EPS);
      }
      expect(phases.length).toBe(theirs[i].length);
    });
  });
});
