/**
 * The SIMD kernels of the real-space invariants (src/realspace/kernels.ts) against plain
 * references written here or kept in the engine as the plain path: the batched Chebyshev
 * recursion against `chebyshevApply` (one vector at a time, scalar JavaScript) on a disordered
 * sample; the same series must come out whatever the batch and whatever order the series end at.
 * The blocked complex product against the textbook triple loop, on sizes that leave partial
 * register tiles and partial cache blocks.
 */
import { describe, expect, it } from 'vitest';
import { blochHamiltonian } from '../../src/bloch/hamiltonian.js';
import { haldane, qwz } from '../../src/model/catalogue.js';
import { adjointInto, simdProduct } from '../../src/realspace/kernels.js';
import { ChebyshevBatch, chebyshevApply, chebyshevScaling, stepCoefficients } from '../../src/realspace/kpm.js';
import { buildSample } from '../../src/realspace/sample.js';
import { uniform } from './linalg-fixtures.js';

function maxDiff(a: Float64Array, b: Float64Array): number {
  let d = 0;
  for (let i = 0; i < a.length; i++) d = Math.max(d, Math.abs(a[i] - b[i]));
  return d;
}

describe('batched Chebyshev recursion (SIMD kernel)', () => {
  it('equals chebyshevApply for batches of 1 to 4 series of different orders, with probes', () => {
    for (const [model, params] of [[qwz(), { u: -1 }], [haldane(), {}]] as const) {
      const sample = buildSample(blochHamiltonian(model, params), { sizes: [9, 7], boundary: ['open', 'periodic'], onsiteDisorder: 1.5, vacancies: 0.05, seed: 3 });
      const h = sample.hamiltonian, n = h.n, s = chebyshevScaling(h);
      const next = uniform(17);
      const random = () => Float64Array.from({ length: 2 * n }, next);
      const work: [Float64Array, Float64Array, Float64Array] = [new Float64Array(2 * n), new Float64Array(2 * n), new Float64Array(2 * n)];
      const batch = new ChebyshevBatch(h, s);
      for (const orders of [[40], [2, 3], [57, 12, 1, 30], [25, 25, 25]]) {
        for (const q of orders.length > 2 ? [1] : [1, 2]) {
          const series = orders.map((order, j) => {
            const coefficients = [stepCoefficients(0.1 * j - 0.2, order), stepCoefficients(0.3, Math.max(1, order - 7))].slice(0, q);
            return { input: random(), coefficients, outputs: coefficients.map(() => new Float64Array(2 * n)), probe: { index: (5 * j) % n, moments: new Float64Array(order + 3) } };
          });
          batch.run(series);
          for (const x of series) {
            const want = x.coefficients.map(() => new Float64Array(2 * n));
            const moments = new Float64Array(x.probe.moments.length);
            // Reference: the longest set first, padded so that it runs as long as the probe.
            const padded = x.coefficients.map((c) => { const p = new Float64Array(Math.max(c.length, moments.length)); p.set(c); return p; });
            chebyshevApply(h, s, padded, x.input, want, work, { index: x.probe.index, moments });
            x.outputs.forEach((o, t) => expect(maxDiff(o, want[t])).toBeLessThan(1e-12));
            expect(maxDiff(x.probe.moments, moments)).toBeLessThan(1e-12);
          }
        }
      }
    }
  });

  it('refuses batches it cannot run', () => {
    const sample = buildSample(blochHamiltonian(qwz(), { u: -1 }), { sizes: [3, 3] });
    const h = sample.hamiltonian, batch = new ChebyshevBatch(h, chebyshevScaling(h));
    const one = () => ({ input: new Float64Array(2 * h.n), coefficients: [new Float64Array(3)], outputs: [new Float64Array(2 * h.n)] });
    expect(() => batch.run([])).toThrow(RangeError);
    expect(() => batch.run([one(), one(), one(), one(), one()])).toThrow(RangeError);
    const two = () => ({ ...one(), coefficients: [new Float64Array(3), new Float64Array(3)], outputs: [new Float64Array(2 * h.n), new Float64Array(2 * h.n)] });
    expect(() => batch.run([two(), two(), two()])).toThrow(RangeError);
    expect(() => batch.run([one(), { ...one(), coefficients: [new Float64Array(3), new Float64Array(3)], outputs: [new Float64Array(2 * h.n), new Float64Array(2 * h.n)] }])).toThrow(RangeError);
  });
});

describe('complex product (SIMD kernel)', () => {
  /** C = A B by the definition, one complex entry at a time. */
  function plainProduct(p: number, q: number, r: number, a: Float64Array, b: Float64Array): Float64Array {
    const c = new Float64Array(2 * p * r);
    for (let i = 0; i < p; i++) {
      for (let j = 0; j < r; j++) {
        let re = 0, im = 0;
        for (let k = 0; k < q; k++) {
          const ar = a[2 * (i * q + k)], ai = a[2 * (i * q + k) + 1], br = b[2 * (k * r + j)], bi = b[2 * (k * r + j) + 1];
          re += ar * br - ai * bi;
          im += ar * bi + ai * br;
        }
        c[2 * (i * r + j)] = re;
        c[2 * (i * r + j) + 1] = im;
      }
    }
    return c;
  }

  it('equals the triple loop on odd and block-crossing sizes, by the complex kernel and by three real products', () => {
    const next = uniform(5);
    for (const [p, q, r] of [[1, 1, 1], [3, 5, 2], [2, 1, 7], [7, 130, 67], [64, 257, 129], [67, 300, 33], [5, 300, 1]]) {
      const a = Float64Array.from({ length: 2 * p * q }, next), b = Float64Array.from({ length: 2 * q * r }, next);
      const got = simdProduct(p, q, r, (v) => v.set(a), (v) => v.set(b), new Float64Array(2 * p * r));
      const want = plainProduct(p, q, r, a, b);
      expect(maxDiff(got, want)).toBeLessThan(1e-13 * q);
    }
  });

  it('writes the conjugate transpose', () => {
    const next = uniform(6);
    const [rows, cols] = [37, 70];
    const a = Float64Array.from({ length: 2 * rows * cols }, next), t = new Float64Array(2 * rows * cols);
    adjointInto(rows, cols, a, t);
    for (let i = 0; i < rows; i++) {
      for (let j = 0; j < cols; j++) {
        expect(t[2 * (j * rows + i)]).toBe(a[2 * (i * cols + j)]);
        expect(t[2 * (j * rows + i) + 1]).toBe(-a[2 * (i * cols + j) + 1]);
      }
    }
  });
});
