/**
 * The dense complex products the real-space invariants need, on interleaved row-major arrays:
 * a frame compressed by a diagonal operator (Psi^dagger D Psi), A B, A^dagger B and A B^dagger.
 * All run on the blocked SIMD products of kernels.ts; an adjoint operand is written out explicitly
 * first (O(n^2), against the O(n^3) product).
 */
import { adjointInto, simdGramSum, simdProduct } from './kernels.js';

/** Fewest orbitals per value of D, on average, for the grouped compression (below, the direct product). */
const MIN_GROUP = 16;

/**
 * out (m x m) = Psi^dagger D Psi, Psi an n x m frame (row i = orbital i), D = diag(dr + i di).
 * A diagonal of few distinct values (a position phase on a lattice takes one per column of cells,
 * a spin one per sign) takes the grouped Hermitian sums of simdGramSum, half the operations;
 * any other the direct product.
 */
export function compressDiagonal(n: number, m: number, psi: Float64Array, dr: Float64Array, di: Float64Array | null, out: Float64Array): Float64Array {
  const groups = groupsOf(n, dr, di);
  if (groups !== null) return simdGramSum(n, m, psi, groups.order, groups.starts, groups.re, groups.im, out);
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

/**
 * The orbitals grouped by their (exactly equal) value of D: `order` lists them group by group,
 * group g from starts[g] to starts[g + 1], its value re[g] + i im[g]; null when the groups are too
 * small on average to pay for themselves.
 */
function groupsOf(n: number, dr: Float64Array, di: Float64Array | null): { order: Int32Array; starts: number[]; re: number[]; im: number[] } | null {
  const index = new Map<string, number>();
  const group = new Int32Array(n);
  const re: number[] = [], im: number[] = [];
  for (let k = 0; k < n; k++) {
    const r = dr[k], i = di === null ? 0 : di[k];
    const key = `${r} ${i}`;
    let g = index.get(key);
    if (g === undefined) {
      if (re.length * MIN_GROUP >= n) return null;
      g = re.length;
      index.set(key, g);
      re.push(r);
      im.push(i);
    }
    group[k] = g;
  }
  const starts = new Array<number>(re.length + 1).fill(0);
  for (let k = 0; k < n; k++) starts[group[k] + 1]++;
  for (let g = 0; g < re.length; g++) starts[g + 1] += starts[g];
  const order = new Int32Array(n), next = starts.slice(0, re.length);
  for (let k = 0; k < n; k++) order[next[group[k]]++] = k;
  return { order, starts, re, im };
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
