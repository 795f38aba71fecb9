import { execFileSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import {
  bandStructure, blochHamiltonian, densityOfStates, directGap, findGapClosings, highSymmetryPoints, kPath, lattice, qwz as catalogueQwz, ribbonSpectrum, ssh, twoBandWeyl,
} from '../../src/index.js';

// Qi–Wu–Zhang, H = sin kx sx + sin ky sy + (u + cos kx + cos ky) sz (Qi, Wu, Zhang, PRB 74, 085308 (2006)).
function qwz(u: number) {
  return lattice('QWZ', [[1, 0], [0, 1]])
    .parameter('u', { default: u, range: [-4, 4] })
    .site('a', [0, 0]).site('b', [0, 0])
    .onsite('a', 'u').onsite('b', '-u')
    .hop('a', 'a', [1, 0], 0.5).hop('b', 'b', [1, 0], -0.5)
    .hop('a', 'a', [0, 1], 0.5).hop('b', 'b', [0, 1], -0.5)
    .hop('b', 'a', [1, 0], { re: 0, im: -0.5 }).hop('a', 'b', [1, 0], { re: 0, im: -0.5 })
    .hop('b', 'a', [0, 1], -0.5).hop('a', 'b', [0, 1], 0.5)
    .build();
}

// Graphene with the geometry of Castro Neto et al., RMP 81, 109 (2009): C–C distance a,
// a1 = a(3/2, √3/2), a2 = a(3/2, -√3/2); B sits at a(1, 0) = (a1 + a2)/3 from A.
const A = 1.42;
const T = 2.7;
function graphene() {
  const s = Math.sqrt(3);
  return lattice('graphene', [[1.5 * A, (s / 2) * A], [1.5 * A, -(s / 2) * A]])
    .parameter('t', { default: T })
    .site('a', [0, 0]).site('b', [1 / 3, 1 / 3])
    .hop('a', 'b', [0, 0], '-t').hop('a', 'b', [-1, 0], '-t').hop('a', 'b', [0, -1], '-t')
    .build();
}

/** Fractional coordinates (units of b_i) of a Cartesian momentum: f_i = q·a_i / 2 pi. */
function fractionsOf(q: number[], vectors: number[][]): number[] {
  return vectors.map((a) => (q[0] * a[0] + q[1] * a[1]) / (2 * Math.PI));
}
const modOne = (x: number) => Math.abs(x - Math.round(x));

describe('graphene Dirac points (Castro Neto et al., RMP 81, 109 (2009))', () => {
  const model = graphene();
  const K = [(2 * Math.PI) / (3 * A), (2 * Math.PI) / (3 * Math.sqrt(3) * A)];
  const Kp = [(2 * Math.PI) / (3 * A), -(2 * Math.PI) / (3 * Math.sqrt(3) * A)];

  it('the gap-closing locator finds exactly K and K\' from a coarse generic grid', () => {
    // 13 points per direction: neither K nor K' is a grid point, so refinement does the work.
    const result = findGapClosings(model, { bands: 1, grid: 13 });
    const closed = result.points.filter((p) => p.closed);
    expect(closed).toHaveLength(2);
    const targets = [fractionsOf(K, model.vectors), fractionsOf(Kp, model.vectors)];
    for (const target of targets) {
      const hit = closed.filter((p) => p.fractions.every((f, i) => modOne(f - target[i]) < 1e-7));
      expect(hit).toHaveLength(1);
      expect(hit[0].gap).toBeLessThan(1e-6);
    }
    expect(result.checks.gapless).toBe(true);
  });

  it('the lattice helper puts K and K\' at the analytic zone corners', () => {
    const { family, points } = highSymmetryPoints(model);
    expect(family).toBe('hexagonal');
    const expected = { K: fractionsOf(K, model.vectors), "K'": fractionsOf(Kp, model.vectors) };
    for (const [label, f] of Object.entries(expected)) {
      points[label].forEach((x, i) => expect(modOne(x - f[i])).toBeLessThan(1e-12));
    }
  });

  it('has Fermi velocity hbar v = 3 t a / 2 at the located Dirac point', () => {
    const point = findGapClosings(model, { bands: 1, grid: 13 }).points[0];
    const h = blochHamiltonian(model);
    const out = new Float64Array(8);
    const q = 1e-5;
    for (const angle of [0, 0.7, 2.1, 4]) {
      const dq = [q * Math.cos(angle), q * Math.sin(angle)];
      const k = model.vectors.map((a, i) => point.k[i] + dq[0] * a[0] + dq[1] * a[1]);
      h.fill(k, out);
      const offDiagonal = Math.hypot(out[2], out[3]); // E = ±|H_ab| for this model
      expect(offDiagonal / q).toBeCloseTo((3 * T * A) / 2, 3);
    }
  });
});

describe('graphene density of states near the Dirac point (Castro Neto et al., RMP 81, 109 (2009))', () => {
  it('vanishes linearly: rho(E) = A_c |E| / (pi (hbar v)^2) per cell for spinless electrons, two valleys', () => {
    // Each cone holds E^2 / (4 pi v^2) states per area below |E|; A_c = 3 sqrt3 a^2 / 2 and
    // hbar v = 3 t a / 2 (same source) give rho = 2 sqrt3 |E| / (3 pi t^2), independent of a.
    const dos = densityOfStates(graphene(), { grid: 300, energies: { from: -3.2 * T, to: 3.2 * T, count: 640 } });
    const at = (E: number) => dos.density[Math.floor((E + 3.2 * T) / dos.binWidth)];
    for (const x of [0.1, 0.15, 0.2]) {
      const E = x * T;
      const expected = (2 * Math.sqrt(3) * E) / (3 * Math.PI * T * T);
      expect(Math.abs(at(E) - expected)).toBeLessThan(0.05 * expected);
      expect(Math.abs(at(-E) - expected)).toBeLessThan(0.05 * expected);
    }
    // Van Hove singularities at E = ±t (the M points), bandwidth 6t.
    let peak = 0;
    dos.density.forEach((d, j) => { if (d > dos.density[peak]) peak = j; });
    expect(Math.abs(Math.abs(dos.energy[peak]) - T)).toBeLessThan(2 * dos.binWidth);
    expect(dos.bandRange[1] - dos.bandRange[0]).toBeCloseTo(6 * T, 10);
  });
});

describe('Qi–Wu–Zhang gap closings from the closed form |d(k)| = 0 (Qi, Wu, Zhang, PRB 74, 085308 (2006))', () => {
  const cases: [number, number[][]][] = [
    [-2, [[0, 0]]],
    [0, [[Math.PI, 0], [0, Math.PI]]],
    [2, [[Math.PI, Math.PI]]],
  ];
  for (const [u, expected] of cases) {
    it(`u = ${u}: closes exactly at ${expected.map((k) => `(${k.map((x) => (x === 0 ? '0' : 'π')).join(', ')})`).join(' and ')}`, () => {
      // Odd grid: Γ is not a grid point, so it must be found by refinement.
      const result = findGapClosings(qwz(u), { bands: 1, grid: 15 });
      const closed = result.points.filter((p) => p.closed);
      expect(closed).toHaveLength(expected.length);
      for (const k of expected) {
        const hit = closed.filter((p) => p.k.every((x, i) => modOne((x - k[i]) / (2 * Math.PI)) < 1e-7));
        expect(hit).toHaveLength(1);
      }
    });
  }

  it('u = -1: gapped, minimum direct gap 2 min|d| = 2 (at Γ and X, from the closed form)', () => {
    const gap = directGap(qwz(-1), { bands: 1, grid: 32 });
    expect(gap.minGap).toBeCloseTo(2, 10);
    expect(gap.checks.gapless).toBeUndefined();
    const refined = findGapClosings(qwz(-1), { bands: 1, grid: 15 });
    expect(refined.points.some((p) => p.closed)).toBe(false);
    expect(refined.points[0].gap).toBeCloseTo(2, 8);
  });
});

// Two-band Weyl model d = (sin kx, sin ky, 2 - cos kx - cos ky + cos kz - cos k0) with k0 = pi/2:
// |d| = 0 only at (0, 0, ±k0) (closed form; a minimal Weyl semimetal, common practice).
function weyl() {
  return lattice('Weyl', [[1, 0, 0], [0, 1, 0], [0, 0, 1]])
    .site('a', [0, 0, 0]).site('b', [0, 0, 0])
    .onsite('a', 2).onsite('b', -2)
    .hop('a', 'a', [1, 0, 0], -0.5).hop('b', 'b', [1, 0, 0], 0.5)
    .hop('a', 'a', [0, 1, 0], -0.5).hop('b', 'b', [0, 1, 0], 0.5)
    .hop('a', 'a', [0, 0, 1], 0.5).hop('b', 'b', [0, 0, 1], -0.5)
    .hop('b', 'a', [1, 0, 0], { re: 0, im: -0.5 }).hop('a', 'b', [1, 0, 0], { re: 0, im: -0.5 })
    .hop('b', 'a', [0, 1, 0], -0.5).hop('a', 'b', [0, 1, 0], 0.5)
    .build();
}

describe('Weyl points in 3D from the closed form |d(k)| = 0 (common practice)', () => {
  it('locates exactly the two nodes (0, 0, ±pi/2) from a coarse grid that misses them', () => {
    const result = findGapClosings(weyl(), { bands: 1, grid: 9 });
    const closed = result.points.filter((p) => p.closed);
    expect(closed).toHaveLength(2);
    for (const kz of [Math.PI / 2, -Math.PI / 2]) {
      const hit = closed.filter((p) => Math.hypot(p.k[0], p.k[1], p.k[2] - kz) < 1e-7);
      expect(hit).toHaveLength(1);
      expect(hit[0].cartesian[2]).toBeCloseTo(kz, 7); // unit cubic cell: Cartesian = reduced
    }
  });
});

describe('Weyl points of the catalogue model, at (0, 0, ±k0) by its closed form (common practice)', () => {
  it('k0 = 1: exactly two nodes, found from a coarse grid', () => {
    const closed = findGapClosings(twoBandWeyl(), { params: { k0: 1 }, bands: 1, grid: 9 }).points.filter((p) => p.closed);
    expect(closed.map((p) => p.k[2]).sort((a, b) => a - b)).toEqual([expect.closeTo(-1, 7), expect.closeTo(1, 7)]);
    for (const p of closed) expect(Math.hypot(p.k[0], p.k[1])).toBeLessThan(1e-7);
  });
});

describe('square-lattice tight binding, E = -2t(cos kx + cos ky) (common practice)', () => {
  const t = 1;
  const model = lattice('square', [[2, 0], [0, 2]]).parameter('t', { default: t }).site('s', [0, 0])
    .hop('s', 's', [1, 0], '-t').hop('s', 's', [0, 1], '-t').build();

  it('k-path Γ-X-M-Γ has length π/a + π/a + √2 π/a with labels at the corners', () => {
    const a = 2;
    const path = kPath(model, { path: 'Γ-X-M-Γ', pointsPerSegment: 10 });
    expect(path.distance[path.count - 1]).toBeCloseTo(((2 + Math.SQRT2) * Math.PI) / a, 12);
    expect(path.labels.map((l) => l.label)).toEqual(['Γ', 'X', 'M', 'Γ']);
    expect(path.labels.map((l) => l.distance)).toEqual([0, Math.PI / a, (2 * Math.PI) / a, expect.closeTo(((2 + Math.SQRT2) * Math.PI) / a, 12)]);
    // Bands along it follow the dispersion: -4t at Γ, 0 at X, +4t at M.
    const b = bandStructure(model, { path: 'G X M G', pointsPerSegment: 10 });
    expect(b.energies[0]).toBeCloseTo(-4 * t, 12);
    expect(b.energies[10]).toBeCloseTo(0, 12);
    expect(b.energies[20]).toBeCloseTo(4 * t, 12);
  });

  // Exact DOS per site: rho(E) = K(sqrt(1 - (E/4t)^2)) / (2 pi^2 t), K the complete elliptic integral
  // of the first kind (E. N. Economou, Green's Functions in Quantum Physics, ch. 5; formula from
  // memory, checked here against a numpy histogram of the dispersion). Values from scipy.
  const energies = [-3.5, -2.5, -1.5, -0.7, 0.4, 1.2, 2.2, 3.3];
  const reference = JSON.parse(execFileSync('/usr/bin/python3', ['-c', `
import json, numpy as np
from scipy.special import ellipk
E = np.array(${JSON.stringify(energies)})
exact = ellipk(1 - (E / 4) ** 2) / (2 * np.pi ** 2)
k = (np.arange(1600) + 0.5) * 2 * np.pi / 1600
e = (-2 * (np.cos(k)[:, None] + np.cos(k)[None, :])).ravel()
hist, edges = np.histogram(e, bins=np.linspace(-4, 4, 161), density=True)
centres = (edges[1:] + edges[:-1]) / 2
print(json.dumps({"exact": exact.tolist(), "hist": np.interp(E, centres, hist).tolist()}))
`], { encoding: 'utf8' })) as { exact: number[]; hist: number[] };

  it('the elliptic-integral formula agrees with a numpy histogram (sanity of the reference)', () => {
    energies.forEach((_, i) => expect(Math.abs(reference.hist[i] - reference.exact[i])).toBeLessThan(0.01 * reference.exact[i] + 2e-3));
  });

  it('linear-simplex DOS: integral 1, bandwidth 8t, matches the exact DOS, log singularity at 0', () => {
    const dos = densityOfStates(model, { grid: 200, energies: { from: -4.4, to: 4.4, count: 440 } });
    let integral = 0;
    for (const d of dos.density) integral += d * dos.binWidth;
    expect(integral).toBeCloseTo(1, 12);
    expect(dos.bandRange[1] - dos.bandRange[0]).toBeCloseTo(8 * t, 12);
    const at = (E: number) => dos.density[Math.floor((E + 4.4) / dos.binWidth)];
    expect(at(-4.2)).toBe(0);
    expect(at(4.2)).toBe(0);
    energies.forEach((E, i) => expect(Math.abs(at(E) - reference.exact[i])).toBeLessThan(0.01 * reference.exact[i]));
    // Van Hove: rho(E) ~ ln(16t/|E|) / (2 pi^2 t) near 0, so rho(E1) - rho(E2) = ln(E2/E1) / (2 pi^2 t).
    const rise = at(0.05) - at(0.4);
    expect(rise).toBeCloseTo(Math.log(0.4 / 0.05) / (2 * Math.PI ** 2 * t), 2);
    let peak = 0;
    dos.density.forEach((d, j) => { if (d > dos.density[peak]) peak = j; });
    expect(Math.abs(dos.energy[peak])).toBeLessThan(dos.binWidth);
  });

  it('Gaussian DOS: integral 1 and its smoothed peak at E = 0', () => {
    const dos = densityOfStates(model, { grid: 120, method: 'gaussian', width: 0.05 });
    let integral = 0;
    for (const d of dos.density) integral += d * dos.binWidth;
    expect(integral).toBeCloseTo(1, 6);
    let peak = 0;
    dos.density.forEach((d, j) => { if (d > dos.density[peak]) peak = j; });
    expect(Math.abs(dos.energy[peak])).toBeLessThan(2 * dos.binWidth);
  });
});

describe('QWZ ribbon: chiral edge modes iff the bulk is topological (bulk–boundary correspondence, common practice; phases from Qi, Wu, Zhang 2006)', () => {
  const width = 24;
  /** In-gap states (|E| < window) with their k and edge weights. */
  function inGap(u: number, direction: number) {
    const r = ribbonSpectrum(catalogueQwz(), { params: { u }, direction, width, nk: 101, edgeLayers: 4 });
    const states: { k: number; e: number; first: number; last: number }[] = [];
    for (let p = 0; p < r.path.count; p++) {
      for (let n = 0; n < r.bandCount; n++) {
        const e = r.energies[p * r.bandCount + n];
        if (Math.abs(e) < 0.5) states.push({ k: 2 * Math.PI * r.path.fractions[p], e, first: r.edges.first[p * r.bandCount + n], last: r.edges.last[p * r.bandCount + n] });
      }
    }
    return { r, states };
  }
  /** Least-squares slope dE/dk of a set of (k, E). */
  function slope(points: { k: number; e: number }[]) {
    const mk = points.reduce((s, p) => s + p.k, 0) / points.length;
    const me = points.reduce((s, p) => s + p.e, 0) / points.length;
    return points.reduce((s, p) => s + (p.k - mk) * (p.e - me), 0) / points.reduce((s, p) => s + (p.k - mk) ** 2, 0);
  }

  for (const direction of [0, 1]) {
    it(`u = -1 (C = 1), opened along a${direction + 1}: every in-gap state sits on one edge, and the two edges move oppositely`, () => {
      const { r, states } = inGap(-1, direction);
      expect(r.kind).toBe('ribbon');
      expect(r.bandCount).toBe(2 * width);
      expect(r.edges.definition).toMatch(/first 4 and the last 4 of the 24 cells/);
      expect(states.length).toBeGreaterThan(10);
      for (const s of states) expect(Math.max(s.first, s.last)).toBeGreaterThan(0.9);
      const onFirst = states.filter((s) => s.first > 0.9), onLast = states.filter((s) => s.last > 0.9);
      expect(onFirst.length).toBeGreaterThan(4);
      expect(onLast.length).toBeGreaterThan(4);
      const v1 = slope(onFirst), v2 = slope(onLast);
      expect(Math.sign(v1)).toBe(-Math.sign(v2));
      expect(Math.abs(v1)).toBeGreaterThan(0.3);
      expect(Math.abs(v2)).toBeGreaterThan(0.3);
    });
  }

  it('u = -3 (C = 0): no state inside the bulk gap', () => {
    const { states, r } = inGap(-3, 1);
    expect(states).toHaveLength(0);
    // Bulk states spread over the width: edge weights stay well below 1.
    expect(Math.max(...r.edges.first)).toBeLessThan(0.6);
  });
});

describe('SSH open chain: two zero-energy end modes iff w > v (Su, Schrieffer, Heeger, PRL 42, 1698 (1979))', () => {
  it('bulk gap closes only at k = pi when v = w (E = ±|v + w e^{ik}|, same source)', () => {
    const result = findGapClosings(ssh(), { params: { v: 0.7, w: 0.7 }, bands: 1, grid: 25 });
    const closed = result.points.filter((p) => p.closed);
    expect(closed).toHaveLength(1);
    expect(Math.abs(Math.abs(closed[0].k[0]) - Math.PI)).toBeLessThan(1e-7);
    expect(findGapClosings(ssh(), { params: { v: 0.7, w: 0.9 }, bands: 1, grid: 25 }).points[0].gap).toBeCloseTo(0.4, 7);
  });

  for (const [v, w, zeroModes] of [[0.5, 1, 2], [1, 0.5, 0], [0.3, 1.2, 2], [1.2, 0.3, 0]] as const) {
    it(`v = ${v}, w = ${w}: ${zeroModes} zero modes`, () => {
      const r = ribbonSpectrum(ssh(), { params: { v, w }, direction: 0, width: 40 });
      expect(r.path.count).toBe(1);
      expect(r.bandCount).toBe(80);
      const zero = Array.from(r.energies.keys()).filter((n) => Math.abs(r.energies[n]) < 1e-6);
      expect(zero).toHaveLength(zeroModes);
      // The end modes live on the ends: their weight on the outer 4 cells is nearly all of it.
      for (const n of zero) expect(r.edges.first[n] + r.edges.last[n]).toBeGreaterThan(0.99);
      // The rest of the spectrum is gapped by about 2|v - w| (bulk gap, same source).
      const smallestNonZero = Math.min(...Array.from(r.energies).filter((e) => Math.abs(e) >= 1e-6).map(Math.abs));
      expect(smallestNonZero).toBeGreaterThan(0.9 * Math.abs(v - w));
    });
  }
});
