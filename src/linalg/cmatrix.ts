/**
 * Complex dense matrices on Float64Array: row-major, interleaved (re, im); element (i, j) of an
 * n x n matrix sits at 2*(i*n + j). Outputs belong to the caller and are returned.
 */

export type CMatrix = Float64Array;

/** A zero n x n complex matrix. */
export function cmatrix(n: number): CMatrix {
  if (!Number.isInteger(n) || n < 0) throw new RangeError(`matrix size must be a nonnegative integer. Value: ${n}`);
  return new Float64Array(2 * n * n);
}

/** out = A^dagger B for n x n A, B (the overlap matrix of two sets of column vectors). */
export function adjointTimes(n: number, a: CMatrix, b: CMatrix, out: CMatrix): CMatrix {
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      let re = 0;
      let im = 0;
      for (let k = 0; k < n; k++) {
        const ar = a[2 * (k * n + i)], ai = a[2 * (k * n + i) + 1];
        const br = b[2 * (k * n + j)], bi = b[2 * (k * n + j) + 1];
        re += ar * br + ai * bi;
        im += ar * bi - ai * br;
      }
      out[2 * (i * n + j)] = re;
      out[2 * (i * n + j) + 1] = im;
    }
  }
  return out;
}

/** out = A B for n x n matrices; out must not alias a or b. */
export function multiply(n: number, a: CMatrix, b: CMatrix, out: CMatrix): CMatrix {
  if (out === a || out === b) throw new RangeError('multiply: out must not alias an input');
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      let re = 0;
      let im = 0;
      for (let k = 0; k < n; k++) {
        const ar = a[2 * (i * n + k)], ai = a[2 * (i * n + k) + 1];
        const br = b[2 * (k * n + j)], bi = b[2 * (k * n + j) + 1];
        re += ar * br - ai * bi;
        im += ar * bi + ai * br;
      }
      out[2 * (i * n + j)] = re;
      out[2 * (i * n + j) + 1] = im;
    }
  }
  return out;
}

/** Largest |A_ij - conj(A_ji)|: zero for a Hermitian matrix. */
export function hermiticityError(n: number, a: CMatrix): number {
  let worst = 0;
  for (let i = 0; i < n; i++) {
    for (let j = i; j < n; j++) {
      const dr = a[2 * (i * n + j)] - a[2 * (j * n + i)];
      const di = a[2 * (i * n + j) + 1] + a[2 * (j * n + i) + 1];
      worst = Math.max(worst, Math.hypot(dr, di));
    }
  }
  return worst;
}
