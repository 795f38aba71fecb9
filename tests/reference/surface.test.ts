/**
 * Semi-infinite edges and surfaces (src/surface/): principal layers, the decimation of Lopez Sancho,
 * Lopez Sancho & Rubio, J. Phys. F 15, 851 (1985), against numpy (tests/reference/surface-numpy.ts,
 * Debian's /usr/bin/python3) and against wide ribbons; edge modes against the bulk invariants of
 * published models. Sign conventions: shared/references.md.
 */
import { describe, expect, it } from 'vitest';
import {
  BlochHamiltonian, eigh, haldane, kaneMele, lattice, qwz, ribbonSpectrum, weyl2band,
} from '../../src/index.js';
import { principalLayers, splitMatrix } from '../../src/surface/layers.js';
import { surfaceSpectrum } from '../../src/surface/spectrum.js';
import { numpyDecimation } from './surface-numpy.js';

/** Sorted eigenvalues of a split matrix plus e^{iq} H01 + h.c. */
function layerBands(h00: { re: Float64Array; im: Float64Array }, h01: { re: Float64Array; im: Float64Array }, n: number, q: number): number[] {
  const m = new Float64Array(2 * n * n);
  const c = Math.cos(q), s = Math.sin(q);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      // H00 + H01 e^{iq} + H01^dagger e^{-iq}
      const ar = h01.re[i * n + j], ai = h01.im[i * n + j];
      const br = h01.re[j * n + i], bi = -h01.im[j * n + i];
      m[2 * (i * n + j)] = h00.re[i * n + j] + ar * c - ai * s + br * c + bi * s;
      m[2 * (i * n + j) + 1] = h00.im[i * n + j] + ar * s + ai * c + bi * c - br * s;
    }
  }
  return Array.from(eigh(n, m).values);
}

function bulkBands(h: BlochHamiltonian, k: number[]): number[] {
  const m = new Float64Array(2 * h.size * h.size);
  h.fill(k, m);
  return Array.from(eigh(h.size, m).values);
}

describe('principal layers', () => {
  it('the layers rebuild the bulk: eigenvalues of H00 + H01 e^{iq} + h.c. are the bulk bands at the folded momenta (Bloch theorem; common practice)', () => {
    const h = new BlochHamiltonian(haldane(), { phi: 0.7, M: 0.1 });
    // A direction index, and Miller cuts whose principal layers hold one and two planes.
    for (const [cut, thickness] of [[1, 1], [[1, 1], 1], [[1, 2], 2]] as [number | number[], number][]) {
      const layers = principalLayers(h, cut);
      expect(layers.thickness).toBe(thickness);
      const n = layers.size;
      const h00 = splitMatrix(n), h01 = splitMatrix(n);
      const A = layers.basis;
      const det = A[0][0] * A[1][1] - A[0][1] * A[1][0];
      expect(Math.abs(det)).toBe(1);
      for (const [kp, q] of [[0.3, -1.1], [-2.0, 2.5]]) {
        layers.fill([kp], h00, h01);
        const ours = layerBands(h00, h01, n, q);
        // k'_i = k·A_i; the principal layer steps T planes, so k·A_d = (q + 2 pi j) / T.
        const expected: number[] = [];
        for (let j = 0; j < thickness; j++) {
          const kd = (q + 2 * Math.PI * j) / thickness;
          const k = [(kp * A[1][1] - kd * A[0][1]) / det, (kd * A[0][0] - kp * A[1][0]) / det];
          expected.push(...bulkBands(h, k));
        }
        expected.sort((a, b) => a - b);
        ours.forEach((e, i) => expect(e).toBeCloseTo(expected[i], 10));
      }
    }
  });

  it('bad cuts: not a primitive lattice direction, out of range, no hopping across: errors naming the field and value', () => {
    const h = new BlochHamiltonian(qwz(), { u: -1 });
    expect(() => principalLayers(h, [2, 2])).toThrow(/^cut: .*common factor 2.*Value: \[2,2\]/);
    expect(() => principalLayers(h, [0, 0])).toThrow(/^cut: .*all zero/);
    expect(() => principalLayers(h, [0.5, 1])).toThrow(/^cut: expected .*Value: \[0.5,1\]/);
    expect(() => principalLayers(h, 2)).toThrow(/^cut: expected a periodic direction from 0 to 1.*Value: 2/);
    expect(() => principalLayers(h, [1, 0, 0])).toThrow(/^cut: /);
    // Decoupled chains along a1: nothing crosses the planes of constant n2.
    const chains = lattice('decoupled chains', [[1, 0], [0, 1]]).site('a', [0, 0]).hop('a', 'a', [1, 0], 1).build();
    expect(() => principalLayers(new BlochHamiltonian(chains), 1)).toThrow(/^cut: .*no hopping across the lattice planes \[0,1\].*Value: 1/);
    expect(principalLayers(new BlochHamiltonian(chains), 0).thickness).toBe(1);
  });
});

describe('decimation (Lopez Sancho, Lopez Sancho & Rubio, J. Phys. F 15, 851 (1985))', () => {
  it('agrees with a numpy implementation of the same algorithm, vectorised over k (Kane–Mele with Rashba, both terminations and the bulk)', () => {
    const h = new BlochHamiltonian(kaneMele(), { lambda_v: 0.1, lambda_R: 0.05 });
    const r = surfaceSpectrum(h, { cut: 1, nk: 41, energyCount: 31, eta: 0.02 });
    expect(r.checks.unconverged).toBe(0);
    const ref = numpyDecimation(h, { cut: 1, ks: Array.from(r.path.fractions, (f) => 2 * Math.PI * f), energies: Array.from(r.energies), eta: 0.02 });
    let worst = 0, largest = 0;
    for (const side of ['bottom', 'top', 'bulk'] as const) {
      ref[side].forEach((x, i) => {
        worst = Math.max(worst, Math.abs(x - r[side][i]));
        largest = Math.max(largest, Math.abs(x));
      });
    }
    expect(largest).toBeGreaterThan(1);
    expect(worst).toBeLessThan(1e-9 * largest);
  });

  it('converges to a wide ribbon\'s edge-projected spectral function as the ribbon widens (QWZ u = -1, eta = 0.1; common practice)', () => {
    const h = new BlochHamiltonian(qwz(), { u: -1 });
    const eta = 0.1;
    const r = surfaceSpectrum(h, { cut: 1, nk: 21, energyCount: 25, energyRange: [-2.4, 2.4], eta });
    const ne = r.energies.length;
    const errors = [8, 32, 128].map((width) => {
      // The ribbon's layer 0 is the bottom termination's outer principal layer (one plane here).
      const rib = ribbonSpectrum(h, { direction: 1, width, edgeLayers: 1, nk: 21 });
      let diff = 0, norm = 0;
      for (let p = 0; p < r.path.count; p++) {
        for (let e = 0; e < ne; e++) {
          let a = 0;
          for (let b = 0; b < rib.bandCount; b++) {
            const d = r.energies[e] - rib.energies[p * rib.bandCount + b];
            a += (rib.edges.first[p * rib.bandCount + b] * eta) / (Math.PI * (d * d + eta * eta));
          }
          diff += Math.abs(a - r.bottom[p * ne + e]);
          norm += r.bottom[p * ne + e];
        }
      }
      return diff / norm;
    });
    expect(errors[1]).toBeLessThan(errors[0]);
    expect(errors[2]).toBeLessThan(errors[1]);
    expect(errors[2]).toBeLessThan(1e-6);
  });

  it('QWZ (u = -1, C = +1): each edge carries one mode across the gap, of opposite slopes on the two edges (Qi, Wu, Zhang, PRB 74, 085308 (2006))', () => {
    const h = new BlochHamiltonian(qwz(), { u: -1 });
    const r = surfaceSpectrum(h, { cut: 1, nk: 41, energyCount: 81, energyRange: [-0.8, 0.8], eta: 0.005 });
    const ne = r.energies.length;
    const peak = (side: 'bottom' | 'top', p: number): number => {
      let best = 0, at = NaN;
      for (let e = 0; e < ne; e++) if (r[side][p * ne + e] > best) [best, at] = [r[side][p * ne + e], r.energies[e]];
      return best > 1 ? at : NaN;
    };
    // Near k_par = 0 the edge modes cross E = 0: one peak per k on each edge, slopes opposite.
    const mid = (r.path.count - 1) / 2;
    const slope = (side: 'bottom' | 'top') => peak(side, mid + 2) - peak(side, mid - 2);
    expect(Math.abs(peak('bottom', mid))).toBeLessThan(0.03);
    expect(Math.abs(peak('top', mid))).toBeLessThan(0.03);
    expect(Math.sign(slope('bottom'))).toBe(-Math.sign(slope('top')));
    expect(Math.abs(slope('bottom'))).toBeGreaterThan(0.1);
  });

  it('bad options: eta <= 0, energies outside the spectrum, malformed windows: errors naming the field and value', () => {
    const h = new BlochHamiltonian(qwz(), { u: -1 });
    expect(() => surfaceSpectrum(h, { cut: 1, eta: 0 })).toThrow(/^eta: .*> 0\. Value: 0/);
    expect(() => surfaceSpectrum(h, { cut: 1, eta: -0.1 })).toThrow(/^eta: .*Value: -0.1/);
    expect(() => surfaceSpectrum(h, { cut: 1, energyRange: [20, 30] })).toThrow(/^energyRange: lies outside the spectrum: the bulk bands span \[-3\.000, 3\.000\].*Value: \[20,30\]/);
    expect(() => surfaceSpectrum(h, { cut: 1, energyRange: [1, -1] })).toThrow(/^energyRange: expected \[from, to\]/);
    expect(() => surfaceSpectrum(h, { cut: [1, 1, 0] })).toThrow(/^cut: /);
    expect(() => surfaceSpectrum(h, { cut: 1, maxSteps: 0 })).toThrow(/^maxSteps: .*Value: 0/);
  });

  it('a step cap too small to converge in the bands is a warning naming where, not a silent number', () => {
    const h = new BlochHamiltonian(qwz(), { u: -1 });
    const r = surfaceSpectrum(h, { cut: 1, nk: 5, energyCount: 5, energyRange: [-2, 2], eta: 1e-4, maxSteps: 3 });
    expect(r.checks.unconverged).toBeGreaterThan(0);
    expect(r.checks.warnings[0]).toMatch(/decimation did not converge at \d+ of 25 points within maxSteps = 3 .*first at k_par = \(.*\) x 2pi, E = /);
  });

  it('3D: the surface of the two-band Weyl model is sampled on a path of its 2D surface zone', () => {
    const h = new BlochHamiltonian(weyl2band(), {});
    const r = surfaceSpectrum(h, { cut: 0, nk: 4, energyCount: 11, eta: 0.05 });
    expect(r.boundary).toBe('surface');
    expect(r.path.dim).toBe(2);
    expect(r.cut.basis).toEqual([[0, 1, 0], [0, 0, 1], [1, 0, 0]]);
    expect(r.bottom.length).toBe(r.path.count * 11);
  });
});
