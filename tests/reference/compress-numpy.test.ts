/**
 * The compression Psi^dagger D Psi of a frame by a diagonal of few distinct values (position
 * phases on a lattice, a spin sign: the grouped Hermitian sums of src/realspace/kernels.ts) against
 * numpy (Debian's /usr/bin/python3), psi.conj().T @ (d[:, None] * psi), on sizes that cross the
 * kernel's tile edges. Tolerance: normwise, 64 eps n max|psi|^2 (the usual bound of a sum of n
 * products, common practice).
 */
import { describe, expect, it } from 'vitest';
import { compressDiagonal } from '../../src/realspace/products.js';
import { SeededRandom } from '../../src/realspace/random.js';
import { EPS, numpy } from '../unit/linalg-fixtures.js';

/** Ours beside numpy's for the n x m frame psi and the diagonal dr + i di. */
function compare(n: number, m: number, psi: Float64Array, dr: Float64Array, di: Float64Array | null): Float64Array {
  // NaN everywhere first: an entry left unwritten fails the comparison; the tail must stay as it is.
  const out = new Float64Array(2 * m * m + 4).fill(NaN);
  out.fill(7, 2 * m * m);
  compressDiagonal(n, m, psi, dr, di, out);
  expect(Array.from(out.subarray(2 * m * m))).toEqual([7, 7, 7, 7]);
  const d = new Float64Array(2 * n);
  for (let k = 0; k < n; k++) {
    d[2 * k] = dr[k];
    d[2 * k + 1] = di === null ? 0 : di[k];
  }
  const want = numpy<number[]>(
    'c = inp["psi"].conj().T @ (inp["d"][:, None] * inp["psi"])\nout = np.stack([c.real, c.imag], axis=-1).ravel().tolist()',
    { psi: { data: psi, shape: [n, m], complex: true }, d: { data: d, shape: [n], complex: true } },
  );
  let big = 0, err = 0;
  for (const x of psi) big = Math.max(big, Math.abs(x));
  for (let e = 0; e < 2 * m * m; e++) err = Math.max(err, Math.abs(out[e] - want[e]));
  expect(err).toBeLessThan(64 * EPS * n * 2 * big * big);
  return out;
}

function frame(rng: SeededRandom, n: number, m: number): Float64Array {
  return Float64Array.from({ length: 2 * n * m }, () => rng.centred(2));
}

describe('Psi^dagger D Psi by groups of equal diagonal values, against numpy', () => {
  it('position phases e^{2 pi i x / L} of a 7 x 23 lattice with two orbitals per cell (orbitals row by row, so each group is spread out), m = 161 across a tile edge', () => {
    const rng = new SeededRandom(41);
    const [lx, ly] = [7, 23];
    const n = 2 * lx * ly, m = 161;
    const dr = new Float64Array(n), di = new Float64Array(n);
    for (let y = 0; y < ly; y++) for (let x = 0; x < lx; x++) for (let o = 0; o < 2; o++) {
      const k = 2 * (y * lx + x) + o;
      dr[k] = Math.cos((2 * Math.PI * x) / lx);
      di[k] = Math.sin((2 * Math.PI * x) / lx);
    }
    compare(n, m, frame(rng, n, m), dr, di);
  });

  it('a real diagonal of two values (a spin sign, +-1/2), deep groups; the result is exactly Hermitian', () => {
    const rng = new SeededRandom(42);
    const n = 300, m = 133;
    const dr = Float64Array.from({ length: n }, (_, k) => (k % 3 === 0 ? 0.5 : -0.5));
    const out = compare(n, m, frame(rng, n, m), dr, null);
    for (let i = 0; i < m; i++) {
      expect(out[2 * (i * m + i) + 1]).toBe(0);
      for (let j = i + 1; j < m; j++) {
        expect(out[2 * (j * m + i)]).toBe(out[2 * (i * m + j)]);
        expect(out[2 * (j * m + i) + 1]).toBe(-out[2 * (i * m + j) + 1]);
      }
    }
  });

  it('five complex values in groups of unequal sizes, a small frame (m = 9, one tile)', () => {
    const rng = new SeededRandom(43);
    const n = 120, m = 9;
    const values = [[1, 0], [0, 1], [-0.6, 0.8], [0.3, -2], [-1, -1]];
    const dr = new Float64Array(n), di = new Float64Array(n);
    for (let k = 0; k < n; k++) {
      const [re, im] = values[Math.floor(rng.next() * rng.next() * values.length)];
      dr[k] = re;
      di[k] = im;
    }
    compare(n, m, frame(rng, n, m), dr, di);
  });
});
