/**
 * The dense complex products the real-space invariants need, on interleaved row-major arrays:
 * a frame compressed by a diagonal operator (Psi^dagger D Psi), and products A B and A B^dagger.
 * Loops run along contiguous rows (the i-k-j order), which is what makes them fast in JavaScript.
 */

/**
 * out (m x m) = Psi^dagger D Psi, Psi an n x m frame (row i = orbital i), D = diag(dr + i di).
 * A sum of n rank-one updates, each along contiguous rows.
 */
export function compressDiagonal(n: number, m: number, psi: Float64Array, dr: Float64Array, di: Float64Array | null, out: Float64Array): Float64Array {
  out.fill(0, 0, 2 * m * m);
  const w = new Float64Array(2 * m);
  for (let k = 0; k < n; k++) {
    const row = 2 * k * m;
    const er = dr[k], ei = di === null ? 0 : di[k];
    for (let j = 0; j < m; j++) {
      const ar = psi[row + 2 * j], ai = psi[row + 2 * j + 1];
      w[2 * j] = er * ar - ei * ai;
      w[2 * j + 1] = er * ai + ei * ar;
    }
    for (let i = 0; i < m; i++) {
      const cr = psi[row + 2 * i], ci = -psi[row + 2 * i + 1];
      if (cr === 0 && ci === 0) continue;
      const o = 2 * i * m;
      for (let j = 0; j < 2 * m; j += 2) {
        const wr = w[j], wi = w[j + 1];
        out[o + j] += cr * wr - ci * wi;
        out[o + j + 1] += cr * wi + ci * wr;
      }
    }
  }
  return out;
}

/** out (p x r) = A (p x q) B (q x r); out must not alias a or b. */
export function multiplyRect(p: number, q: number, r: number, a: Float64Array, b: Float64Array, out: Float64Array): Float64Array {
  out.fill(0, 0, 2 * p * r);
  for (let i = 0; i < p; i++) {
    const o = 2 * i * r;
    for (let k = 0; k < q; k++) {
      const ar = a[2 * (i * q + k)], ai = a[2 * (i * q + k) + 1];
      if (ar === 0 && ai === 0) continue;
      const bo = 2 * k * r;
      for (let j = 0; j < 2 * r; j += 2) {
        const br = b[bo + j], bi = b[bo + j + 1];
        out[o + j] += ar * br - ai * bi;
        out[o + j + 1] += ar * bi + ai * br;
      }
    }
  }
  return out;
}

/** out (p x r) = A^dagger B, A (q x p), B (q x r): the overlaps of two sets of columns. */
export function adjointMultiplyRect(p: number, q: number, r: number, a: Float64Array, b: Float64Array, out: Float64Array): Float64Array {
  out.fill(0, 0, 2 * p * r);
  for (let k = 0; k < q; k++) {
    const bo = 2 * k * r;
    for (let i = 0; i < p; i++) {
      const ar = a[2 * (k * p + i)], ai = -a[2 * (k * p + i) + 1];
      if (ar === 0 && ai === 0) continue;
      const o = 2 * i * r;
      for (let j = 0; j < 2 * r; j += 2) {
        const br = b[bo + j], bi = b[bo + j + 1];
        out[o + j] += ar * br - ai * bi;
        out[o + j + 1] += ar * bi + ai * br;
      }
    }
  }
  return out;
}

/** out (m x m) = A B^dagger for m x m A, B: row-by-row dot products. */
export function multiplyAdjoint(m: number, a: Float64Array, b: Float64Array, out: Float64Array): Float64Array {
  for (let i = 0; i < m; i++) {
    const ao = 2 * i * m;
    for (let j = 0; j < m; j++) {
      const bo = 2 * j * m;
      let re = 0, im = 0;
      for (let k = 0; k < 2 * m; k += 2) {
        const ar = a[ao + k], ai = a[ao + k + 1];
        const br = b[bo + k], bi = -b[bo + k + 1];
        re += ar * br - ai * bi;
        im += ar * bi + ai * br;
      }
      out[2 * (i * m + j)] = re;
      out[2 * (i * m + j) + 1] = im;
    }
  }
  return out;
}
