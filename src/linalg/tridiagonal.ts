/**
 * Eigenvalues (and eigenvectors) of a real symmetric tridiagonal matrix by implicit QL with
 * Wilkinson shifts (Bowdler, Martin, Reinsch & Wilkinson, Numer. Math. 11, 293 (1968), "tql2").
 * For larger n the rotations of each sweep are recorded and then applied to the eigenvector matrix
 * in one pass per row, carrying one value in a register (as LAPACK's dsteqr/dlasr split the work).
 */

const EPS = 2 ** -52;
/** Below this, 1/x overflows or loses precision (subnormal x). */
const TINY = 2 ** -1000;
/** Up to this size the rotations are applied to z as they are made (the faster way below ~40-48,
 * measured on random tridiagonals n = 4..128); above, they are recorded and applied per sweep. */
const INLINE_ROTATIONS_UP_TO = 40;

/**
 * Diagonalises the symmetric tridiagonal matrix with diagonal `d[0..n)` and off-diagonal
 * `e[0..n-1)` (e[i] couples i and i+1; e[n-1] is scratch). On return `d` holds the eigenvalues,
 * unsorted, and `e` is destroyed. With `z` (n x n, row-major), the rotations are applied to its
 * columns: starting from the identity, column j becomes the eigenvector of d[j]. `cs` and `sn`
 * (length n) are scratch for the rotations, needed only with `z`. Returns false if it failed to
 * converge.
 *
 * Deflation is normwise (|e_i| <= eps ||T||): every eigenpair has a residual of order eps ||T||.
 * Input range: ||T|| between about 2^-300 and 2^300 (HermitianEigensolver scales into it), so that
 * squares of entries down to eps ||T|| stay normal numbers.
 */
export function tridiagonalQL(
  n: number,
  d: Float64Array,
  e: Float64Array,
  z: Float64Array | null,
  cs: Float64Array,
  sn: Float64Array,
): boolean {
  if (n === 0) return true;
  e[n - 1] = 0;
  let norm = 0;
  for (let i = 0; i < n; i++) {
    const t = Math.abs(d[i]) + Math.abs(e[i]);
    if (t > norm) norm = t;
  }
  const tol = EPS * norm;
  const inline = z !== null && n <= INLINE_ROTATIONS_UP_TO;
  const nn = n * n;
  for (let l = 0; l < n; l++) {
    let iter = 0;
    for (;;) {
      let m = l;
      while (m < n - 1 && Math.abs(e[m]) > tol) m++;
      if (m === l) break;
      if (++iter > 60) return false;
      // Wilkinson shift: the eigenvalue of the leading 2x2 block closer to d[l].
      let g = (d[l + 1] - d[l]) / (2 * e[l]);
      let r = Math.sqrt(g * g + 1);
      g = d[m] - d[l] + e[l] / (g + (g >= 0 ? r : -r));
      let s = 1;
      let c = 1;
      let p = 0;
      let i = m - 1;
      for (; i >= l; i--) {
        const ei = e[i];
        const f = s * ei;
        const b = c * ei;
        const rr = f * f + g * g;
        r = Math.sqrt(rr);
        e[i + 1] = r;
        if (r === 0) {
          // Underflow: the rotation is the identity; finish this sweep early.
          d[i + 1] -= p;
          e[m] = 0;
          break;
        }
        const gp = d[i + 1] - p;
        if (rr > TINY) {
          // tql2's step (below) rewritten with t = 1/r^2: r2 = r t x, p = s r2 = f x t and
          // c r2 = g x t. The next g and p then wait for the division only, not for the square
          // root and the division after it (which only the rotation (s, c) needs).
          const t = 1 / rr;
          const x = (d[i] - gp) * f + 2 * g * b;
          const inv = r * t;
          p = f * x * t;
          s = f * inv;
          c = g * inv;
          g = g * x * t - b;
        } else {
          // 1/r^2 would overflow: the plain step.
          s = f / r;
          c = g / r;
          const r2 = (d[i] - gp) * s + 2 * c * b;
          p = s * r2;
          g = c * r2 - b;
        }
        d[i + 1] = gp + p;
        if (inline) {
          // z is small: rotate now, in the shadow of this loop's sqrt/division latency.
          for (let k = i; k < nn; k += n) {
            const zi = z[k];
            const zj = z[k + 1];
            z[k + 1] = s * zi + c * zj;
            z[k] = c * zi - s * zj;
          }
        } else {
          cs[i] = c;
          sn[i] = s;
        }
      }
      if (z !== null && !inline) applyRotations(n, z, cs, sn, i + 1, m);
      if (r === 0 && i >= l) continue;
      d[l] -= p;
      e[l] = g;
      e[m] = 0;
    }
  }
  return true;
}

/**
 * Columns (i, i+1) of z rotated by (cs[i], sn[i]) for i = hi-1 down to lo: per row, the value
 * passed down the chain stays in a register. Four rows at a time, so that four independent chains
 * hide each other's latency.
 */
function applyRotations(n: number, z: Float64Array, cs: Float64Array, sn: Float64Array, lo: number, hi: number): void {
  if (hi <= lo) return;
  let k = 0;
  for (; k + 3 < n; k += 4) {
    const r0 = k * n;
    const r1 = r0 + n;
    const r2 = r1 + n;
    const r3 = r2 + n;
    let x0 = z[r0 + hi];
    let x1 = z[r1 + hi];
    let x2 = z[r2 + hi];
    let x3 = z[r3 + hi];
    for (let i = hi - 1; i >= lo; i--) {
      const c = cs[i];
      const s = sn[i];
      const y0 = z[r0 + i];
      const y1 = z[r1 + i];
      const y2 = z[r2 + i];
      const y3 = z[r3 + i];
      z[r0 + i + 1] = s * y0 + c * x0;
      z[r1 + i + 1] = s * y1 + c * x1;
      z[r2 + i + 1] = s * y2 + c * x2;
      z[r3 + i + 1] = s * y3 + c * x3;
      x0 = c * y0 - s * x0;
      x1 = c * y1 - s * x1;
      x2 = c * y2 - s * x2;
      x3 = c * y3 - s * x3;
    }
    z[r0 + lo] = x0;
    z[r1 + lo] = x1;
    z[r2 + lo] = x2;
    z[r3 + lo] = x3;
  }
  for (; k < n; k++) {
    const r0 = k * n;
    let x0 = z[r0 + hi];
    for (let i = hi - 1; i >= lo; i--) {
      const c = cs[i];
      const s = sn[i];
      const y0 = z[r0 + i];
      z[r0 + i + 1] = s * y0 + c * x0;
      x0 = c * y0 - s * x0;
    }
    z[r0 + lo] = x0;
  }
}

/**
 * Eigenvalues only, without square roots: the Pal–Walker–Kahan implicit QR sweep on the squared
 * off-diagonal (B. N. Parlett, The Symmetric Eigenvalue Problem, sec. 8-15), Wilkinson shift from
 * the trailing 2x2 block, normwise deflation at the bottom. `d[0..n)` is the diagonal and
 * `e2[0..n-1)` the squares of the off-diagonal; on return `d` holds the eigenvalues, unsorted, and
 * `e2` is destroyed. Returns false if it failed to converge.
 */
export function tridiagonalEigenvalues(n: number, d: Float64Array, e2: Float64Array): boolean {
  let norm = 0;
  for (let i = 0; i < n; i++) {
    const t = Math.abs(d[i]) + (i < n - 1 ? Math.sqrt(e2[i]) : 0);
    if (t > norm) norm = t;
  }
  const tol2 = (EPS * norm) ** 2;
  let hi = n - 1;
  let iter = 0;
  while (hi > 0) {
    if (e2[hi - 1] <= tol2) {
      hi--;
      iter = 0;
      continue;
    }
    let lo = hi - 1;
    while (lo > 0 && e2[lo - 1] > tol2) lo--;
    if (++iter > 60) return false;
    // Wilkinson shift: the eigenvalue of the trailing 2x2 block closer to d[hi].
    const b2 = e2[hi - 1];
    const delta = 0.5 * (d[hi - 1] - d[hi]);
    const root = Math.sqrt(delta * delta + b2);
    const sigma = d[hi] - b2 / (delta + (delta >= 0 ? root : -root));
    let c2 = 1;
    let s2 = 0;
    let gamma = d[lo] - sigma;
    let pi = gamma * gamma;
    for (let i = lo; i < hi; i++) {
      const beta2 = e2[i];
      const rho = pi + beta2;
      if (i > lo) e2[i - 1] = s2 * rho;
      const oldC2 = c2;
      c2 = pi / rho;
      s2 = beta2 / rho;
      const oldGamma = gamma;
      const alpha = d[i + 1];
      gamma = c2 * (alpha - sigma) - s2 * oldGamma;
      d[i] = oldGamma + alpha - gamma;
      pi = c2 !== 0 ? (gamma * gamma) / c2 : oldC2 * beta2;
    }
    e2[hi - 1] = s2 * pi;
    d[hi] = gamma + sigma;
  }
  return true;
}

/**
 * The permutation that sorts `values[0..count)` ascending, into `order` (insertion sort: the sizes
 * are small, and QL leaves its eigenvalues nearly ordered in blocks).
 */
export function ascendingOrder(values: Float64Array, count: number, order: Int32Array): Int32Array {
  for (let i = 0; i < count; i++) {
    const x = values[i];
    let j = i - 1;
    while (j >= 0 && values[order[j]] > x) {
      order[j + 1] = order[j];
      j--;
    }
    order[j + 1] = i;
  }
  return order;
}
