/**
 * The dense complex products the real-space invariants need, on interleaved row-major arrays:
 * a frame compressed by a diagonal operator (Psi^dagger D Psi), A B, A^dagger B and A B^dagger.
 * All run on the blocked SIMD product of kernels.ts; an adjoint operand is written out explicitly
 * first (O(n^2), against the O(n^3) product).
 */
import { adjointInto, simdProduct } from './kernels.js';

/**
 * out (m x m) = Psi^dagger D Psi, Psi an n x m frame (row i = orbital i), D = diag(dr + i di).
 */
export function compressDiagonal(n: number, m: number, psi: Float64Array, dr: Float64Array, di: Float64Array | null, out: Float64Array): Float64Array {
  const scaled = (view: Float64Array) => {
    for (let k = 0; k < n; k++) {
      const er = dr[k], ei = di === null ? 0 : di[k];
      for (let j = 2 * k * m, end = 2 * (k + 1) * m; j < end; j += 2) {
        const ar = psi[j], ai = psi[j + 1];
        view[j] = er * ar - ei * ai;
        view[j + 1] = er * ai + ei * ar;
      }
    }
  };
  return simdProduct(m, n, m, (view) => adjointInto(n, m, psi, view), scaled, out);
}

/** out (p x r) = A (p x q) B (q x r); out must not alias a or b. */
export function multiplyRect(p: number, q: number, r: number, a: Float64Array, b: Float64Array, out: Float64Array): Float64Array {
  return simdProduct(p, q, r, (view) => view.set(a.subarray(0, 2 * p * q)), (view) => view.set(b.subarray(0, 2 * q * r)), out);
}

/** out (p x r) = A^dagger B, A (q x p), B (q x r): the overlaps of two sets of columns. */
export function adjointMultiplyRect(p: number, q: number, r: number, a: Float64Array, b: Float64Array, out: Float64Array): Float64Array {
  return simdProduct(p, q, r, (view) => adjointInto(q, p, a, view), (view) => view.set(b.subarray(0, 2 * q * r)), out);
}

/** out (m x m) = A B^dagger for m x m A, B. */
export function multiplyAdjoint(m: number, a: Float64Array, b: Float64Array, out: Float64Array): Float64Array {
  return simdProduct(m, m, m, (view) => view.set(a.subarray(0, 2 * m * m)), (view) => adjointInto(m, m, b, view), out);
}
