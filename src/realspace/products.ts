/**
 * The dense complex products the real-space invariants need, on interleaved row-major arrays:
 * a frame compressed by a diagonal operator (Psi^dagger D Psi), A B, A^dagger B and A B^dagger.
 * Loops run along contiguous rows, and each product is blocked so that the rows it revisits
 * (BLOCK of them, a few hundred KiB for m ~ 1000) stay in cache: unblocked, the products of the
 * Bott index at m = 900 streamed the whole matrix from memory once per row.
 */

/** Rows kept in cache per block. */
const BLOCK = 16;

/** out[o .. o+2r) += (ar + i ai) * b[bo .. bo+2r) */
function axpyRow(r: number, ar: number, ai: number, b: Float64Array, bo: number, out: Float64Array, o: number): void {
  for (let j = 0; j < 2 * r; j += 2) {
    const br = b[bo + j], bi = b[bo + j + 1];
    out[o + j] += ar * br - ai * bi;
    out[o + j + 1] += ar * bi + ai * br;
  }
}

/** out[o ..] += x b[b1 ..] + y b[b2 ..]: two rows of b at once, one pass over out. */
function axpyTwoRows(r: number, xr: number, xi: number, yr: number, yi: number, b: Float64Array, b1: number, b2: number, out: Float64Array, o: number): void {
  for (let j = 0; j < 2 * r; j += 2) {
    const pr = b[b1 + j], pi = b[b1 + j + 1];
    const qr = b[b2 + j], qi = b[b2 + j + 1];
    out[o + j] += xr * pr - xi * pi + yr * qr - yi * qi;
    out[o + j + 1] += xr * pi + xi * pr + yr * qi + yi * qr;
  }
}

/**
 * out (m x m) = Psi^dagger D Psi, Psi an n x m frame (row i = orbital i), D = diag(dr + i di).
 */
export function compressDiagonal(n: number, m: number, psi: Float64Array, dr: Float64Array, di: Float64Array | null, out: Float64Array): Float64Array {
  const scaled = new Float64Array(2 * n * m);
  for (let k = 0; k < n; k++) {
    const er = dr[k], ei = di === null ? 0 : di[k];
    for (let j = 2 * k * m, end = 2 * (k + 1) * m; j < end; j += 2) {
      const ar = psi[j], ai = psi[j + 1];
      scaled[j] = er * ar - ei * ai;
      scaled[j + 1] = er * ai + ei * ar;
    }
  }
  return adjointMultiplyRect(m, n, m, psi, scaled, out);
}

/** out (p x r) = A (p x q) B (q x r); out must not alias a or b. Blocked over rows of B. */
export function multiplyRect(p: number, q: number, r: number, a: Float64Array, b: Float64Array, out: Float64Array): Float64Array {
  out.fill(0, 0, 2 * p * r);
  for (let k0 = 0; k0 < q; k0 += BLOCK) {
    const k1 = Math.min(q, k0 + BLOCK);
    for (let i = 0; i < p; i++) {
      const o = 2 * i * r;
      let k = k0;
      for (; k + 1 < k1; k += 2) {
        const x = 2 * (i * q + k);
        axpyTwoRows(r, a[x], a[x + 1], a[x + 2], a[x + 3], b, 2 * k * r, 2 * (k + 1) * r, out, o);
      }
      if (k < k1) axpyRow(r, a[2 * (i * q + k)], a[2 * (i * q + k) + 1], b, 2 * k * r, out, o);
    }
  }
  return out;
}

/** out (p x r) = A^dagger B, A (q x p), B (q x r): the overlaps of two sets of columns. Blocked over rows of out. */
export function adjointMultiplyRect(p: number, q: number, r: number, a: Float64Array, b: Float64Array, out: Float64Array): Float64Array {
  out.fill(0, 0, 2 * p * r);
  for (let i0 = 0; i0 < p; i0 += BLOCK) {
    const i1 = Math.min(p, i0 + BLOCK);
    let k = 0;
    for (; k + 1 < q; k += 2) {
      for (let i = i0; i < i1; i++) {
        const x = 2 * (k * p + i), y = 2 * ((k + 1) * p + i);
        axpyTwoRows(r, a[x], -a[x + 1], a[y], -a[y + 1], b, 2 * k * r, 2 * (k + 1) * r, out, 2 * i * r);
      }
    }
    if (k < q) for (let i = i0; i < i1; i++) axpyRow(r, a[2 * (k * p + i)], -a[2 * (k * p + i) + 1], b, 2 * k * r, out, 2 * i * r);
  }
  return out;
}

/** out (m x m) = A B^dagger for m x m A, B: row-by-row dot products, blocked over rows of B. */
export function multiplyAdjoint(m: number, a: Float64Array, b: Float64Array, out: Float64Array): Float64Array {
  for (let j0 = 0; j0 < m; j0 += BLOCK) {
    const j1 = Math.min(m, j0 + BLOCK);
    for (let i = 0; i < m; i++) {
      const ao = 2 * i * m;
      for (let j = j0; j < j1; j++) {
        const bo = 2 * j * m;
        let re = 0, im = 0;
        for (let k = 0; k < 2 * m; k += 2) {
          const ar = a[ao + k], ai = a[ao + k + 1];
          const br = b[bo + k], bi = b[bo + k + 1];
          re += ar * br + ai * bi;
          im += ai * br - ar * bi;
        }
        out[2 * (i * m + j)] = re;
        out[2 * (i * m + j) + 1] = im;
      }
    }
  }
  return out;
}
