/**
 * Pfaffian of a complex skew-symmetric matrix (A^T = -A) by the Parlett–Reid elimination with
 * pivoting (Parlett & Reid, BIT 10, 386 (1970)): congruences by unit lower-triangular Gauss
 * transforms and symmetric row/column swaps reduce A to 2x2 blocks; Pf is the product of their
 * upper entries, times -1 per swap. Pf(A)^2 = det(A).
 */
import type { CMatrix } from './cmatrix.js';

export class ComplexPfaffian {
  readonly n: number;
  private readonly a: Float64Array;

  constructor(n: number) {
    if (!Number.isInteger(n) || n < 0) throw new RangeError(`Pfaffian size must be a nonnegative integer. Value: ${n}`);
    this.n = n;
    this.a = new Float64Array(2 * n * n);
  }

  /**
   * Pf(m) into `out` as (re, im). Only the strict upper triangle of `m` is read (the matrix is
   * taken to be skew-symmetric); `m` is not modified. Odd n gives 0. Returns `out`.
   */
  compute(m: CMatrix, out: Float64Array = new Float64Array(2)): Float64Array {
    return this.computeAt(m, 0, out);
  }

  /** `compute` on the matrix at `offset` (in doubles) inside a larger array. */
  computeAt(m: CMatrix, offset: number, out: Float64Array): Float64Array {
    const n = this.n;
    if (!Number.isInteger(offset) || offset < 0) throw new RangeError(`m offset must be a nonnegative integer. Value: ${offset}`);
    if (m.length < offset + 2 * n * n) throw new RangeError(`m must hold ${2 * n * n} entries from offset ${offset}. Value: length ${m.length}`);
    if (out.length < 2) throw new RangeError(`out must hold 2 entries (re, im). Value: length ${out.length}`);
    const a = this.a;
    for (let i = 0; i < n; i++) {
      a[2 * (i * n + i)] = a[2 * (i * n + i) + 1] = 0;
      for (let j = i + 1; j < n; j++) {
        const re = m[offset + 2 * (i * n + j)];
        const im = m[offset + 2 * (i * n + j) + 1];
        if (!Number.isFinite(re) || !Number.isFinite(im)) {
          throw new RangeError(`Pfaffian: m[${i}][${j}] is not finite. Value: ${re} + ${im}i`);
        }
        a[2 * (i * n + j)] = re;
        a[2 * (i * n + j) + 1] = im;
        a[2 * (j * n + i)] = -re;
        a[2 * (j * n + i) + 1] = -im;
      }
    }
    if (n % 2 === 1) {
      out[0] = out[1] = 0;
      return out;
    }
    let pr = 1;
    let pi = 0;
    for (let k = 0; k < n - 1; k += 2) {
      // Pivot: the largest entry of column k below row k, moved to row (and column) k+1.
      let p = k + 1;
      let best = -1;
      for (let i = k + 1; i < n; i++) {
        const v = Math.abs(a[2 * (i * n + k)]) + Math.abs(a[2 * (i * n + k) + 1]);
        if (v > best) {
          best = v;
          p = i;
        }
      }
      if (best === 0) {
        out[0] = out[1] = 0;
        return out;
      }
      if (p !== k + 1) {
        swapRowsAndColumns(n, a, k + 1, p);
        pr = -pr;
        pi = -pi;
      }
      // Pf = a[k][k+1] Pf(trailing block after elimination).
      const xr = a[2 * (k * n + k + 1)];
      const xi = a[2 * (k * n + k + 1) + 1];
      const t = pr * xr - pi * xi;
      pi = pr * xi + pi * xr;
      pr = t;
      // tau_i = a[i][k] / a[k+1][k]; A[i][j] += -tau_i A[k+1][j] + tau_j A[k+1][i] for i, j >= k+2.
      const vr = a[2 * ((k + 1) * n + k)];
      const vi = a[2 * ((k + 1) * n + k) + 1];
      const v2 = vr * vr + vi * vi;
      const ivr = vr / v2;
      const ivi = -vi / v2;
      const row = 2 * (k + 1) * n;
      for (let i = k + 2; i < n; i++) {
        const ar = a[2 * (i * n + k)];
        const ai = a[2 * (i * n + k) + 1];
        // store tau_i in column k (no longer needed)
        a[2 * (i * n + k)] = ar * ivr - ai * ivi;
        a[2 * (i * n + k) + 1] = ar * ivi + ai * ivr;
      }
      for (let i = k + 2; i < n; i++) {
        const tir = a[2 * (i * n + k)];
        const tii = a[2 * (i * n + k) + 1];
        const bir = a[row + 2 * i];
        const bii = a[row + 2 * i + 1];
        const ri = 2 * i * n;
        for (let j = k + 2; j < n; j++) {
          const tjr = a[2 * (j * n + k)];
          const tji = a[2 * (j * n + k) + 1];
          const bjr = a[row + 2 * j];
          const bji = a[row + 2 * j + 1];
          a[ri + 2 * j] += -(tir * bjr - tii * bji) + (tjr * bir - tji * bii);
          a[ri + 2 * j + 1] += -(tir * bji + tii * bjr) + (tjr * bii + tji * bir);
        }
      }
    }
    out[0] = pr;
    out[1] = pi;
    return out;
  }
}

function swapRowsAndColumns(n: number, a: Float64Array, r: number, s: number): void {
  for (let j = 0; j < 2 * n; j++) {
    const t = a[2 * r * n + j];
    a[2 * r * n + j] = a[2 * s * n + j];
    a[2 * s * n + j] = t;
  }
  for (let i = 0; i < n; i++) {
    const x = 2 * (i * n + r);
    const y = 2 * (i * n + s);
    let t = a[x];
    a[x] = a[y];
    a[y] = t;
    t = a[x + 1];
    a[x + 1] = a[y + 1];
    a[y + 1] = t;
  }
}

/** Convenience: Pf of one n x n complex skew-symmetric matrix as (re, im), allocating. */
export function pfaffian(n: number, m: CMatrix): Float64Array {
  return new ComplexPfaffian(n).compute(m, new Float64Array(2));
}
