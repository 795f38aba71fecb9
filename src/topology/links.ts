/**
 * Overlaps of band frames and the small m x m complex algebra on them (determinant, products,
 * eigenphases of a Wilson loop). Frames are stored as in FrameSampler: m vectors of n complex
 * entries, one after another. All outputs and scratch belong to the caller.
 */
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

/**
 * Determinant of an m x m complex matrix by LU with partial pivoting; `a` is overwritten.
 * Writes (re, im) into out[0], out[1] and returns out.
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
  let dr = 1, di = 0;
  for (let c = 0; c < m; c++) {
    let p = c;
    let best = -1;
    for (let r = c; r < m; r++) {
      const mag = a[2 * (r * m + c)] ** 2 + a[2 * (r * m + c) + 1] ** 2;
      if (mag > best) {
        best = mag;
        p = r;
      }
    }
    if (best === 0) {
      out[0] = 0;
      out[1] = 0;
      return out;
    }
    if (p !== c) {
      for (let j = 0; j < 2 * m; j++) {
        const t = a[2 * c * m + j];
        a[2 * c * m + j] = a[2 * p * m + j];
        a[2 * p * m + j] = t;
      }
      dr = -dr;
      di = -di;
    }
    const pr = a[2 * (c * m + c)], pi = a[2 * (c * m + c) + 1];
    const nr = dr * pr - di * pi;
    di = dr * pi + di * pr;
    dr = nr;
    const inv = 1 / (pr * pr + pi * pi);
    for (let r = c + 1; r < m; r++) {
      const xr = a[2 * (r * m + c)], xi = a[2 * (r * m + c) + 1];
      const fr = (xr * pr + xi * pi) * inv, fi = (xi * pr - xr * pi) * inv;
      for (let j = c + 1; j < m; j++) {
        const yr = a[2 * (c * m + j)], yi = a[2 * (c * m + j) + 1];
        a[2 * (r * m + j)] -= fr * yr - fi * yi;
        a[2 * (r * m + j) + 1] -= fr * yi + fi * yr;
      }
    }
  }
  out[0] = dr;
  out[1] = di;
  return out;
}

/** out = A B for m x m complex matrices (out must not alias a or b). */
export function multiplySmall(m: number, a: Float64Array, b: Float64Array, out: Float64Array): Float64Array {
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < m; j++) {
      let re = 0;
      let im = 0;
      for (let k = 0; k < m; k++) {
        const ar = a[2 * (i * m + k)], ai = a[2 * (i * m + k) + 1];
        const br = b[2 * (k * m + j)], bi = b[2 * (k * m + j) + 1];
        re += ar * br - ai * bi;
        im += ar * bi + ai * br;
      }
      out[2 * (i * m + j)] = re;
      out[2 * (i * m + j) + 1] = im;
    }
  }
  return out;
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

/**
 * Sign of the Pfaffian of a real antisymmetric n x n matrix (row-major, overwritten), by
 * Parlett–Reid elimination with pivoting: -1, +1, or 0 when it vanishes (odd n gives 0).
 */
export function pfaffianSign(n: number, a: Float64Array): number {
  if (n % 2 === 1) return 0;
  let sign = 1;
  for (let k = 0; k < n - 1; k += 2) {
    let p = k + 1;
    for (let j = k + 2; j < n; j++) if (Math.abs(a[k * n + j]) > Math.abs(a[k * n + p])) p = j;
    if (p !== k + 1) {
      // Swap index k+1 with p in rows and columns: a congruence that flips the Pfaffian's sign.
      for (let j = 0; j < n; j++) {
        const t = a[(k + 1) * n + j]; a[(k + 1) * n + j] = a[p * n + j]; a[p * n + j] = t;
      }
      for (let i = 0; i < n; i++) {
        const t = a[i * n + k + 1]; a[i * n + k + 1] = a[i * n + p]; a[i * n + p] = t;
      }
      sign = -sign;
    }
    const pivot = a[k * n + k + 1];
    if (pivot === 0) return 0;
    if (pivot < 0) sign = -sign;
    // Eliminate row k beyond k+1: R_i -= tau_i R_{k+1}, C_i -= tau_i C_{k+1} (determinant-one congruence).
    for (let i = k + 2; i < n; i++) {
      const tau = a[k * n + i] / pivot;
      if (tau === 0) continue;
      for (let j = k + 2; j < n; j++) {
        a[i * n + j] -= tau * a[(k + 1) * n + j];
        a[j * n + i] -= tau * a[j * n + k + 1];
      }
    }
    for (let i = k + 2; i < n; i++) {
      a[k * n + i] = 0;
      a[i * n + k] = 0;
    }
  }
  return sign;
}
