/**
 * Eigenvalues (and eigenvectors) of a real symmetric tridiagonal matrix by implicit QL with
 * Wilkinson shifts (Bowdler, Martin, Reinsch & Wilkinson, Numer. Math. 11, 293 (1968), "tql2").
 */

const EPS = 2 ** -52;

/**
 * Diagonalises the symmetric tridiagonal matrix with diagonal `d[0..n)` and off-diagonal
 * `e[0..n-1)` (e[i] couples i and i+1; e[n-1] is scratch). On return `d` holds the eigenvalues,
 * unsorted, and `e` is destroyed. With `z`, the rotations are applied to the rows of the n x n
 * row-major real matrix `z` (start from the identity to get the eigenvectors as rows: row j is
 * the eigenvector of d[j]). Returns false if it failed to converge.
 *
 * Deflation is normwise (|e_i| <= eps ||T||): every eigenpair has a residual of order eps ||T||.
 */
export function tridiagonalQL(
  n: number,
  d: Float64Array,
  e: Float64Array,
  z: Float64Array | null,
): boolean {
  if (n === 0) return true;
  e[n - 1] = 0;
  let norm = 0;
  for (let i = 0; i < n; i++) {
    const t = Math.abs(d[i]) + Math.abs(e[i]);
    if (t > norm) norm = t;
  }
  const tol = EPS * norm;
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
        const f = s * e[i];
        const b = c * e[i];
        r = Math.sqrt(f * f + g * g);
        e[i + 1] = r;
        if (r === 0) {
          // Underflow: the rotation is the identity; finish this sweep early.
          d[i + 1] -= p;
          e[m] = 0;
          break;
        }
        s = f / r;
        c = g / r;
        g = d[i + 1] - p;
        r = (d[i] - g) * s + 2 * c * b;
        p = s * r;
        d[i + 1] = g + p;
        g = c * r - b;
        if (z !== null) {
          const ri = i * n;
          const rj = ri + n;
          for (let k = 0; k < n; k++) {
            const zi = z[ri + k];
            const zj = z[rj + k];
            z[rj + k] = s * zi + c * zj;
            z[ri + k] = c * zi - s * zj;
          }
        }
      }
      if (r === 0 && i >= l) continue;
      d[l] -= p;
      e[l] = g;
      e[m] = 0;
    }
  }
  return true;
}
