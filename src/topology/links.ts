/**
 * Overlaps of band frames and the small m x m complex algebra on them (determinant, products,
 * eigenphases of a Wilson loop). Frames are stored as in FrameSampler: m vectors of n complex
 * entries, one after another. All outputs and scratch belong to the caller.
 */
import { ComplexDeterminant } from '../linalg/determinant.js';
import { UnitaryEigenphases } from '../linalg/eigphases.js';

/**
 * out (m x m) = A^dagger E B, the overlap matrix <u_i(k)| E |u_j(k')>; E is the diagonal embedding
 * (cos, sin per orbital) or null for the identity.
 */
export function overlapMatrix(
  n: number, m: number,
  a: Float64Array, aOff: number,
  b: Float64Array, bOff: number,
  embed: Float64Array | null,
  out: Float64Array,
): Float64Array {
  for (let i = 0; i < m; i++) {
    const ai = aOff + 2 * n * i;
    for (let j = 0; j < m; j++) {
      const bj = bOff + 2 * n * j;
      let re = 0;
      let im = 0;
      if (embed === null) {
        for (let s = 0; s < 2 * n; s += 2) {
          const xr = a[ai + s], xi = a[ai + s + 1], yr = b[bj + s], yi = b[bj + s + 1];
          re += xr * yr + xi * yi;
          im += xr * yi - xi * yr;
        }
      } else {
        for (let s = 0; s < 2 * n; s += 2) {
          const er = embed[s], ei = embed[s + 1];
          const yr0 = b[bj + s], yi0 = b[bj + s + 1];
          const yr = er * yr0 - ei * yi0, yi = er * yi0 + ei * yr0;
          const xr = a[ai + s], xi = a[ai + s + 1];
          re += xr * yr + xi * yi;
          im += xr * yi - xi * yr;
        }
      }
      out[2 * (i * m + j)] = re;
      out[2 * (i * m + j) + 1] = im;
    }
  }
  return out;
}

const luBySize = new Map<number, ComplexDeterminant>();

/**
 * Determinant of an m x m complex matrix, (re, im) into out[0], out[1]; returns out. Closed forms
 * for the sizes that dominate (one or two bands), LU with partial pivoting (src/linalg) beyond.
 */
export function determinantInPlace(m: number, a: Float64Array, out: Float64Array): Float64Array {
  if (m === 1) {
    out[0] = a[0];
    out[1] = a[1];
    return out;
  }
  if (m === 2) {
    out[0] = a[0] * a[6] - a[1] * a[7] - (a[2] * a[4] - a[3] * a[5]);
    out[1] = a[0] * a[7] + a[1] * a[6] - (a[2] * a[5] + a[3] * a[4]);
    return out;
  }
  let lu = luBySize.get(m);
  if (lu === undefined) luBySize.set(m, (lu = new ComplexDeterminant(m)));
  return lu.compute(a, out);
}

/**
 * Eigenphases (radians, in (-pi, pi]) of an m x m Wilson loop, unitary up to discretisation error:
 * the linalg Schur solver, plus the smallest |eigenvalue| as a check of how unitary it was.
 */
export class UnitaryPhases {
  readonly m: number;
  private readonly solver: UnitaryEigenphases;

  constructor(m: number) {
    this.m = m;
    this.solver = new UnitaryEigenphases(m);
  }

  /** Phases of `w` into `out`; returns the smallest |eigenvalue|. */
  solve(w: Float64Array, out: Float64Array): number {
    if (this.m === 1) {
      out[0] = Math.atan2(w[1], w[0]);
      return Math.hypot(w[0], w[1]);
    }
    this.solver.solve(w, out);
    const ev = this.solver.eigenvalues;
    let worst = Infinity;
    for (let i = 0; i < this.m; i++) worst = Math.min(worst, Math.hypot(ev[2 * i], ev[2 * i + 1]));
    return worst;
  }
}

/** Principal value of an angle, in (-pi, pi]. */
export function wrapAngle(x: number): number {
  const y = x - 2 * Math.PI * Math.round(x / (2 * Math.PI));
  return y <= -Math.PI ? y + 2 * Math.PI : y;
}

/** x mod 1 in [0, 1) (a tiny negative x gives 0, not 1). */
export function fraction(x: number): number {
  const y = x - Math.floor(x);
  return y >= 1 ? 0 : y;
}
