/**
 * Semi-infinite edges and surfaces (src/surface/): principal layers, the decimation of Lopez Sancho,
 * Lopez Sancho & Rubio, J. Phys. F 15, 851 (1985), against numpy (tests/reference/surface-numpy.ts,
 * Debian's /usr/bin/python3) and against wide ribbons; edge modes against the bulk invariants of
 * published models. Sign conventions: shared/references.md.
 */
import { describe, expect, it } from 'vitest';
import {
  BlochHamiltonian, cubicTI, eigh, haldane, hofstadter, kaneMele, lattice, qwz, ribbon, ribbonSpectrum, ssh, twoBandWeyl, type ModelSpec,
} from '../../src/index.js';
import { bulkBoundary, bulkBoundaryCost } from '../../src/surface/bulk-boundary.js';
import { surfaceMap, surfaceMapCost } from '../../src/surface/fermi-map.js';
import { principalLayers, splitMatrix } from '../../src/surface/layers.js';
import { slabSpectrum, slabSpectrumCost } from '../../src/surface/slab.js';
import { surfaceSpectrum, surfaceSpectrumCost } from '../../src/surface/spectrum.js';
import { Decimation } from '../../src/surface/decimation.js';
import { z2Index } from '../../src/topology/z2.js';
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
  it.each([
    ['Kane–Mele with Rashba (4 orbitals: the fused 4 x 4 step)', new BlochHamiltonian(kaneMele(), { lambda_v: 0.1, lambda_R: 0.05 }), 1],
    ['Haldane (2 orbitals: the general step)', new BlochHamiltonian(haldane(), { phi: 1.1, M: 0.3 }), 0],
    ['Hofstadter 1/3 (3 orbitals: odd size)', new BlochHamiltonian(hofstadter(1, 3), {}), 1],
  ])('agrees with a numpy implementation of the same algorithm, vectorised over k: %s, both terminations and the bulk', (_, h, cut) => {
    const r = surfaceSpectrum(h, { cut, nk: 41, energyCount: 31, eta: 0.02 });
    expect(r.checks.unconverged).toBe(0);
    const ref = numpyDecimation(h, { cut, ks: Array.from(r.path.fractions, (f) => 2 * Math.PI * f), energies: Array.from(r.energies), eta: 0.02 });
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

  it('a zero pivot (a non-causal onsite block, outside what physical input gives): 2 orbitals fall back to pivoting, 4 need none (block inverse); the weights equal those with the orbitals permuted (traces are invariant)', () => {
    for (const n of [2, 4]) {
      const eta = 0.05;
      const make = (perm: number[]) => {
        const h00 = splitMatrix(n), h01 = splitMatrix(n);
        for (let i = 0; i < n; i++) {
          for (let j = 0; j < n; j++) {
            // Orbital 0 sits at E = 0 with +i eta (cancelling the broadening): its pivot is zero at E = 0.
            const a = perm[i], b = perm[j];
            h00.re[a * n + b] = i === j ? (i === 0 ? 0 : 1 + i) : 0.3 / (1 + i + j);
            h00.im[a * n + b] = i === j && i === 0 ? eta : i === j ? 0 : 0.1 * (i - j);
            h01.re[a * n + b] = 0.2 * Math.cos(i + 2 * j);
            h01.im[a * n + b] = 0.2 * Math.sin(i - j);
          }
        }
        return new Decimation(n).solve(h00, h01, 0, eta);
      };
      const identity = Array.from({ length: n }, (_, i) => i);
      const swapped = identity.map((i) => (n - 1 - i));
      const a = { ...make(identity) }, b = { ...make(swapped) };
      expect(Number.isFinite(a.bottom) && Number.isFinite(a.top) && Number.isFinite(a.bulk)).toBe(true);
      for (const side of ['bottom', 'top', 'bulk'] as const) expect(a[side]).toBeCloseTo(b[side], 9);
    }
  });

  it('SSH chain end: a zero mode for |v| < |w| carrying weight 1 - (v/w)^2 on the end cell, none for |v| > |w| (Su, Schrieffer, Heeger, PRL 42, 1698 (1979); the amplitude ratio -v/w of the zero mode from its equation, common practice)', () => {
    const eta = 1e-3;
    for (const v of [0.3, 0.5, 0.8]) {
      const r = surfaceSpectrum(new BlochHamiltonian(ssh(), { v, w: 1 }), { cut: 0, energyRange: [0, 0], energyCount: 1, eta });
      expect(r.boundary).toBe('end');
      // A Lorentzian of the zero mode's weight on the end cell, height weight / (pi eta), plus bulk tails of order eta.
      expect(r.bottom[0] * Math.PI * eta).toBeCloseTo(1 - v * v, 3);
      expect(r.top[0] * Math.PI * eta).toBeCloseTo(1 - v * v, 3);
      expect(r.bulk[0] * Math.PI * eta).toBeLessThan(1e-3);
    }
    const trivial = surfaceSpectrum(new BlochHamiltonian(ssh(), { v: 1.5, w: 1 }), { cut: 0, energyRange: [0, 0], energyCount: 1, eta });
    expect(trivial.bottom[0] * Math.PI * eta).toBeLessThan(1e-3);
  });

  it('cost estimates grow with the sizes they are made from (energies x k-points, grid, width)', () => {
    const base = surfaceSpectrumCost(4, { nk: 100, energyCount: 100 });
    expect(surfaceSpectrumCost(4, { nk: 200, energyCount: 100 }).seconds).toBeCloseTo(2 * base.seconds, 12);
    expect(surfaceSpectrumCost(8, { nk: 100, energyCount: 100 }).seconds).toBeGreaterThan(base.seconds);
    expect(surfaceMapCost(2, { grid: 128, nodes: false }).seconds).toBeCloseTo(4 * surfaceMapCost(2, { grid: 64, nodes: false }).seconds, 12);
    expect(slabSpectrumCost(2, { width: 40 }).bytes).toBeGreaterThan(slabSpectrumCost(2, { width: 20 }).bytes);
    expect(bulkBoundaryCost(4, { width: 64 }).seconds).toBeGreaterThan(bulkBoundaryCost(4, { width: 32 }).seconds);
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
    const h = new BlochHamiltonian(twoBandWeyl(), {});
    const r = surfaceSpectrum(h, { cut: 0, nk: 4, energyCount: 11, eta: 0.05 });
    expect(r.boundary).toBe('surface');
    expect(r.path.dim).toBe(2);
    expect(r.cut.basis).toEqual([[0, 1, 0], [0, 0, 1], [1, 0, 0]]);
    expect(r.bottom.length).toBe(r.path.count * 11);
  });
});

/** A ribbon with a trivial band added on its first edge: orbitals hopping -1/2 along the edge (crossing E = 0 at k = ±pi/2), weakly tied to the edge. */
function withTrivialEdgeBand(spec: ModelSpec, labels: string[], anchor: string): ModelSpec {
  const s = structuredClone(spec);
  for (const label of labels) {
    s.orbitals.push({ label, position: [0, 0], layer: 0 });
    s.terms.push({ from: label, to: label, cell: [1], amplitude: -0.5 }, { from: anchor, to: label, cell: [0], amplitude: 0.05 });
  }
  return s;
}

describe('bulk–boundary check', () => {
  it('QWZ: one chiral mode per edge, opposite on the two edges, its direction set by the sign of C, for three cuts (Qi, Wu, Zhang, PRB 74, 085308 (2006))', () => {
    for (const u of [-1, 1, -3.1, 3]) {
      const h = new BlochHamiltonian(qwz(), { u });
      const c = u > -2 && u < 0 ? 1 : u > 0 && u < 2 ? -1 : 0; // references.md
      for (const cut of [1, 0, [1, 1]] as (number | number[])[]) {
        const r = bulkBoundary(h, { cut, width: 24, nk: 128 });
        expect(r.invariant).toEqual({ kind: 'chern', value: c, certified: true });
        expect(r.verdict).toBe('agree');
        expect(r.edges.first.modes.length).toBe(Math.abs(c));
        expect(r.edges.last.modes.length).toBe(Math.abs(c));
        expect(r.edges.first.net).toBe(-r.edges.last.net + 0);
        // Our orientation rule: first edge net = -sign(A1 x A2) C (cut 0 swaps the handedness).
        const [a1, a2] = r.cut.basis;
        const o = Math.sign(a1[0] * a2[1] - a1[1] * a2[0]);
        expect(r.edges.first.net).toBe(-o * c + 0);
      }
    }
  });

  it('Haldane: one chiral mode per edge, direction reversed with the sign of phi, none outside |M| < 3 sqrt3 t2 |sin phi| (Haldane, PRL 61, 2015 (1988))', () => {
    for (const [phi, M, c] of [[Math.PI / 2, 0.2, -1], [-Math.PI / 2, 0.2, 1], [Math.PI / 2, 0.7, 0]] as const) {
      const r = bulkBoundary(new BlochHamiltonian(haldane(), { phi, M }), { cut: 1, width: 32, nk: 128 });
      expect(r.invariant.value).toBe(c);
      expect(r.verdict).toBe('agree');
      expect(r.edges.first.net).toBe(-c + 0);
      expect(r.edges.first.modes.length).toBe(Math.abs(c));
    }
  });

  it('Kane–Mele: one helical (Kramers) pair per edge in the Z2 phase, none in the trivial one, with Rashba coupling (Kane & Mele, PRL 95, 226801 (2005))', () => {
    for (const [lambda_v, z2] of [[0.1, 1], [0.5, 0]] as const) {
      const r = bulkBoundary(new BlochHamiltonian(kaneMele(), { lambda_v, lambda_R: 0.05 }), { cut: 1, width: 32, nk: 128 });
      expect(r.invariant.kind).toBe('z2');
      expect(r.invariant.value).toBe(z2);
      expect(r.verdict).toBe('agree');
      for (const e of [r.edges.first, r.edges.last]) {
        expect(e.pairs).toBe(z2);
        expect([e.right, e.left]).toEqual([z2, z2]);
      }
    }
  });

  it('a ribbon with a trivial edge band added is reported: QWZ an even number (2) of extra modes with the net count right; Kane–Mele two extra Kramers pairs with the parity right (common practice)', () => {
    const q = bulkBoundary(new BlochHamiltonian(qwz(), { u: -1 }), { cut: 1, ribbon: withTrivialEdgeBand(ribbon(qwz(), 1, 32), ['x'], 'a@0') });
    expect(q.verdict).toBe('extra-modes');
    expect(q.edges.first).toMatchObject({ right: 1, left: 2, net: -1, agrees: true, extra: 2 });
    expect(q.edges.last).toMatchObject({ net: 1, extra: 0 });
    expect(q.summary).toMatch(/^disagree in number, agree in net chirality: C = 1 .*first edge: 3 modes \(1 right, 2 left\): net -1 as C = 1 requires, plus 2 extra modes in trivial pairs \(an even number\)/);
    // The trivial band's crossings are counted where -cos(k)/2 = 0: k = ±1/4 x 2pi.
    expect(q.edges.first.modes.filter((m) => Math.abs(Math.abs(m.k) - 0.25) < 0.02).length).toBe(2);
    const km = bulkBoundary(new BlochHamiltonian(kaneMele(), { lambda_v: 0.1, lambda_R: 0.05 }), { cut: 1, ribbon: withTrivialEdgeBand(ribbon(kaneMele(), 1, 32), ['x.up', 'x.dn'], 'A.up@0') });
    expect(km.verdict).toBe('extra-modes');
    expect(km.edges.first).toMatchObject({ pairs: 3, agrees: true, extra: 4 });
    expect(km.summary).toMatch(/agree in parity: Z2 = 1 .*3 Kramers pairs\): an odd number of pairs as Z2 = 1 requires, plus 4 extra modes .*2 extra Kramers pairs/);
  });

  it('a ribbon whose two edges are glued into a cylinder has no edge modes: reported as a disagreement with C = 1', () => {
    const spec = structuredClone(ribbon(qwz(), 1, 16));
    // The bulk terms across the seam, from the last layer back to the first: <0,b@0|H|0,a@15>.
    for (const t of qwz().terms.filter((t) => t.cell[1] === 1)) spec.terms.push({ from: `${t.from}@15`, to: `${t.to}@0`, cell: [t.cell[0]], amplitude: t.amplitude });
    const r = bulkBoundary(new BlochHamiltonian(qwz(), { u: -1 }), { cut: 1, ribbon: spec });
    expect(r.verdict).toBe('disagree');
    expect(r.edges.first).toMatchObject({ modes: [], expected: -1, agrees: false });
    expect(r.summary).toMatch(/^disagree: C = 1 .*first edge: 0 modes .*but C = 1 requires net -1/);
  });

  it('bad input: energy in a bulk band or outside the spectrum, a gapless bulk: errors naming the field and value', () => {
    const h = new BlochHamiltonian(qwz(), { u: -1 });
    expect(() => bulkBoundary(h, { cut: 1, energy: 1.5 })).toThrow(/^energy: is not inside a bulk gap: bulk band 1 spans \[1\.000, 3\.000\]\. Value: 1.5/);
    expect(() => bulkBoundary(h, { cut: 1, energy: 9 })).toThrow(/^energy: is not inside a bulk gap: the bulk bands span \[-3\.000, 3\.000\]\. Value: 9/);
    expect(() => bulkBoundary(h, { cut: 1, width: 1 })).toThrow(/^width: .*Value: 1/);
    expect(() => bulkBoundary(h, { cut: 1, ribbon: qwz() })).toThrow(/^ribbon: expected a ribbon \(one periodic direction\)\. Value: "Qi–Wu–Zhang" with 2/);
    expect(() => bulkBoundary(h, { cut: 1, edgeLayers: 40 })).toThrow(/^edgeLayers: expected a whole number from 1 to 16\. Value: 40/);
    expect(() => bulkBoundary(h, { cut: 1, invariant: 'winding' as 'chern' })).toThrow(/^invariant: .*Value: "winding"/);
    expect(() => bulkBoundary(new BlochHamiltonian(qwz(), { u: 2 }), { cut: 1 })).toThrow(/^energy: the bulk has no gap between bands 0 and 1/);
  });
});

describe('3D surfaces', () => {
  it('two-band Weyl model: the Fermi arc at E = 0 ends at the surface projections of the two nodes, of opposite chirality (Wan, Turner, Vishwanath & Savrasov, PRB 83, 205101 (2011))', () => {
    for (const k0 of [Math.PI / 2, 1.0]) {
      const h = new BlochHamiltonian(twoBandWeyl(), { k0 });
      const r = surfaceMap(h, { cut: 0, grid: [16, 64], energy: 0, eta: 0.02 });
      expect(r.nodes.length).toBe(2);
      const [a, b] = r.nodes;
      expect(a.chirality! * b.chirality!).toBe(-1);
      // Nodes at (0, 0, ±k0) project onto (ky, kz) = (0, ±k0) of the surface a2, a3.
      for (const n of r.nodes) {
        expect(n.kPar[0]).toBeCloseTo(0, 6);
        expect(Math.abs(n.kPar[1])).toBeCloseTo(k0 / (2 * Math.PI), 4);
      }
      // Along ky = 0 the surface weight is an arc over part of kz: its ends lie within a grid step of the nodes.
      const [n1, n2] = r.grid;
      const column = n1 / 2; // ky = 0
      const on = Array.from({ length: n2 }, (_, j) => r.bottom[j * n1 + column] > 2);
      const ends: number[] = [];
      for (let j = 0; j < n2; j++) if (on[j] !== on[(j + 1) % n2]) ends.push(-0.5 + (j + 0.5) / n2);
      expect(ends.length).toBe(2);
      const nodeKz = r.nodes.map((n) => n.kPar[1]).sort((x, y) => x - y);
      ends.sort((x, y) => x - y).forEach((e, i) => expect(Math.abs(e - nodeKz[i])).toBeLessThan(1 / n2));
      // Away from ky = 0 the surface is dark at E = 0 (the arc is a line, not a sheet).
      expect(r.bottom[(n2 / 2) * n1 + 2]).toBeLessThan(0.5);
      // Both terminations carry the arc (the model is inversion symmetric).
      expect(r.top.filter((x) => x > 2).length).toBe(r.bottom.filter((x) => x > 2).length);
    }
  });

  it('a 3D slab: every state\'s layer weights sum to 1, surface states of the arc sit on the outer layers; a 2D slab is the ribbon (spectra/ribbon.ts)', () => {
    const h = new BlochHamiltonian(twoBandWeyl(), {});
    const s = slabSpectrum(h, { cut: 0, width: 24, nk: 4, path: [{ label: 'Γ', k: [0, 0] }, { label: 'Z', k: [0, 0.5] }] });
    for (let i = 0; i < s.path.count * s.bandCount; i++) {
      let sum = 0;
      for (let l = 0; l < s.width; l++) sum += s.layerWeights[i * s.width + l];
      expect(sum).toBeCloseTo(1, 10);
    }
    // At (ky, kz) = (0, pi) (on the arc) the two states nearest E = 0 live on the outer two layers; at Γ (off the arc) they do not.
    const outer = (p: number) => {
      const e = Array.from({ length: s.bandCount }, (_, b) => [Math.abs(s.energies[p * s.bandCount + b]), b]).sort((x, y) => x[0] - y[0]).slice(0, 2);
      return e.map(([, b]) => { const w = s.layerWeights.subarray((p * s.bandCount + b) * s.width, (p * s.bandCount + b + 1) * s.width); return w[0] + w[1] + w[s.width - 2] + w[s.width - 1]; });
    };
    for (const w of outer(s.path.count - 1)) expect(w).toBeGreaterThan(0.8);
    for (const w of outer(0)) expect(w).toBeLessThan(0.5);
    const q = new BlochHamiltonian(qwz(), { u: -1 });
    const slab = slabSpectrum(q, { cut: 1, width: 12, nk: 21 });
    const rib = ribbonSpectrum(q, { direction: 1, width: 12, nk: 21, edgeLayers: 1 });
    slab.energies.forEach((e, i) => expect(e).toBeCloseTo(rib.energies[i], 10));
    rib.edges.first.forEach((w, i) => expect(slab.layerWeights[i * 12]).toBeCloseTo(w, 8));
    expect(() => slabSpectrum(q, { cut: [2, 4], width: 12 })).toThrow(/^cut: .*common factor 2/);
  });

  it('a Miller-index slab equals the supercell ribbon: QWZ cut (1, 1) has the bulk bands folded onto the edge zone (common practice)', () => {
    const q = new BlochHamiltonian(qwz(), { u: -1 });
    const s = slabSpectrum(q, { cut: [1, 1], width: 10, nk: 11 });
    expect(s.bandCount).toBe(20);
    expect(s.cut.basis).toEqual(principalLayers(q, [1, 1]).basis);
  });

  it('cubic TI: a strong index gives an odd number of surface Dirac cones, a weak one an even number, at the surface TRIMs where the bulk parities say (Fu, Kane & Mele, PRL 98, 106803 (2007); Fu & Kane, PRB 76, 045302 (2007))', () => {
    // Dirac points of this model sit at E = 0 (its spectrum is symmetric); a surface TRIM has one when
    // the surface weight there at E = 0 is far above the bulk's (eta = 1e-3).
    for (const [M, strong, weak] of [[2, 1, [0, 0, 0]], [6, 0, [1, 1, 1]], [10, 1, [1, 1, 1]], [-1, 0, [0, 0, 0]]] as const) {
      const h = new BlochHamiltonian(cubicTI(), { M });
      const z = z2Index(h, { method: 'parity' });
      expect([z.z2, z.weak]).toEqual([strong, weak]);
      const delta = (k: number[]) => z.parities!.find((p) => p.k.every((x, i) => Math.abs(Math.abs(x) - Math.abs(k[i])) < 1e-9))!.delta;
      for (const cut of [2, 0, [1, 1, 0], [1, 1, 1]] as (number | number[])[]) {
        const layers = principalLayers(h, cut);
        const solver = new Decimation(layers.size);
        const h00 = splitMatrix(layers.size), h01 = splitMatrix(layers.size);
        const trims = [[0, 0], [0.5, 0], [0, 0.5], [0.5, 0.5]];
        const cones = trims.map((f) => {
          layers.fill(f.map((x) => 2 * Math.PI * x), h00, h01);
          const r = solver.solve(h00, h01, 0, 1e-3);
          expect(r.top > 100).toBe(r.bottom > 100);
          return r.bottom > 100 && r.bulk < 1;
        });
        expect(cones.filter(Boolean).length % 2).toBe(strong);
        // A cone at the surface TRIM whose two bulk TRIMs (those with k·A_i = its coordinates mod 1) have parity product -1.
        trims.forEach((f, a) => {
          const bulk = [0, 1, 2, 3, 4, 5, 6, 7].map((t) => [t & 1, (t >> 1) & 1, (t >> 2) & 1].map((x) => x / 2))
            .filter((k) => layers.basis.slice(0, 2).every((row, i) => Math.abs(((row.reduce((s, x, j) => s + x * k[j], 0) - f[i]) % 1 + 1) % 1) < 1e-9));
          expect(bulk.length).toBe(2);
          expect(cones[a]).toBe(delta(bulk[0]) * delta(bulk[1]) === -1);
        });
      }
    }
  });

  it('maps refuse 2D models and energies outside the spectrum, naming the field', () => {
    expect(() => surfaceMap(new BlochHamiltonian(qwz(), { u: -1 }), { cut: 1 })).toThrow(/^cut: constant-energy surface maps are for 3D models/);
    expect(() => surfaceMap(new BlochHamiltonian(twoBandWeyl()), { cut: 0, energy: 40, nodes: false })).toThrow(/^energy: lies outside the spectrum.*Value: 40/);
    expect(() => surfaceMap(new BlochHamiltonian(twoBandWeyl()), { cut: 0, grid: 1 })).toThrow(/^grid: .*Value: 1/);
  });
});
