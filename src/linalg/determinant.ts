/**
 * Determinant of a complex square matrix by LU factorisation with partial pivoting (row swaps on
 * the largest |re| + |im| in the column), on a caller-reusable workspace.
 */
import type { CMatrix } from './cmatrix.js';

export class ComplexDeterminant {
  readonly n: number;
  private readonly a: Float64Array;

  constructor(n: number) {
    if (!Number.isInteger(n) || n < 0) throw new RangeError(`determinant size must be a nonnegative integer. Value: ${n}`);
    this.n = n;
    this.a = new Float64Array(2 * n * n);
  }

  /** det(m) into `out` as (re, im); `m` is not modified. Returns `out`. */
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
    for (let j = 0; j < 2 * n * n; j++) {
      const x = m[offset + j];
      if (!Number.isFinite(x)) {
        const e = j >> 1;
        throw new RangeError(`determinant: m[${Math.floor(e / n)}][${e % n}] is not finite. Value: ${x}`);
      }
      a[j] = x;
    }
    let dr = 1;
    let di = 0;
    for (let k = 0; k < n; k++) {
      let p = k;
      let best = -1;
      for (let i = k; i < n; i++) {
        const v = Math.abs(a[2 * (i * n + k)]) + Math.abs(a[2 * (i * n + k) + 1]);
        if (v > best) {
          best = v;
          p = i;
        }
      }
      if (best === 0) {
        out[0] = 0;
        out[1] = 0;
        return out;
      }
      if (p !== k) {
        for (let j = 2 * k; j < 2 * n; j++) {
          const t = a[2 * k * n + j];
          a[2 * k * n + j] = a[2 * p * n + j];
          a[2 * p * n + j] = t;
        }
        dr = -dr;
        di = -di;
      }
      const pr = a[2 * (k * n + k)];
      const pi = a[2 * (k * n + k) + 1];
      const nr = dr * pr - di * pi;
      di = dr * pi + di * pr;
      dr = nr;
      // 1 / pivot
      const p2 = pr * pr + pi * pi;
      const ir = pr / p2;
      const ii = -pi / p2;
      const rk = 2 * k * n;
      for (let i = k + 1; i < n; i++) {
        const ri = 2 * i * n;
        const xr = a[ri + 2 * k];
        const xi = a[ri + 2 * k + 1];
        if (xr === 0 && xi === 0) continue;
        const lr = xr * ir - xi * ii;
        const li = xr * ii + xi * ir;
        for (let j = k + 1; j < n; j++) {
          const yr = a[rk + 2 * j];
          const yi = a[rk + 2 * j + 1];
          a[ri + 2 * j] -= lr * yr - li * yi;
          a[ri + 2 * j + 1] -= lr * yi + li * yr;
        }
      }
    }
    out[0] = dr;
    out[1] = di;
    return out;
  }
}

/** Convenience: det of one n x n complex matrix as (re, im), allocating. */
export function determinant(n: number, m: CMatrix): Float64Array {
  return new ComplexDeterminant(n).compute(m, new Float64Array(2));
}
