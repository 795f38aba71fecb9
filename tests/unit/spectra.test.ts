import { afterEach, describe, expect, it } from 'vitest';
import {
  bandStructure, blochHamiltonian, densityOfStates, directGap, findGapClosings, highSymmetryPoints, installInterruptFlag, InterruptedError,
  kPath, lattice, reciprocalVectors, ribbonSpectrum,
} from '../../src/index.js';
import { nelderMead } from '../../src/spectra/gap.js';

const dot = (x: number[], y: number[]) => x.reduce((s, v, i) => s + v * y[i], 0);
const rotate = (v: number[], angle: number) => [v[0] * Math.cos(angle) - v[1] * Math.sin(angle), v[0] * Math.sin(angle) + v[1] * Math.cos(angle)];

function chain(vectors: number[][], periodic = vectors.length) {
  return lattice('one site', vectors, periodic).site('s', new Array(vectors.length).fill(0))
    .hop('s', 's', [1, 0, 0].slice(0, periodic), -1).build();
}

describe('reciprocal vectors', () => {
  it('satisfy a_i·b_j = 2 pi delta_ij for an oblique 3D cell', () => {
    const a = [[1, 0.2, 0], [0.3, 1.1, 0.1], [0.1, -0.2, 0.9]];
    const b = reciprocalVectors(a);
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) expect(dot(a[i], b[j])).toBeCloseTo(i === j ? 2 * Math.PI : 0, 12);
  });

  it('of a ribbon lie along its periodic axis', () => {
    const b = reciprocalVectors([[2, 1], [0, 5]], 1);
    expect(b).toHaveLength(1);
    expect(b[0][0] / b[0][1]).toBeCloseTo(2, 12);
    expect(dot([2, 1], b[0])).toBeCloseTo(2 * Math.PI, 12);
  });
});

describe('high-symmetry points', () => {
  it('hexagonal corners K, K\' are equidistant from Γ and two neighbouring reciprocal lattice points, in every orientation', () => {
    for (const second of [[0.5, Math.sqrt(3) / 2], [-0.5, Math.sqrt(3) / 2]]) {
      for (const angle of [0, 0.3, 1.9]) {
        const vectors = [rotate([1, 0], angle), rotate(second, angle)];
        const { family, points } = highSymmetryPoints({ vectors, periodic: 2 });
        expect(family).toBe('hexagonal');
        const b = reciprocalVectors(vectors);
        const cart = (f: number[]) => [f[0] * b[0][0] + f[1] * b[1][0], f[0] * b[0][1] + f[1] * b[1][1]];
        const bz = Math.hypot(...b[0]) / Math.sqrt(3); // corner distance of a hexagonal zone
        for (const label of ['K', "K'"]) {
          const k = points[label];
          // Distances to all 9 nearby lattice points: the three smallest are equal (a zone corner).
          const d = [-1, 0, 1].flatMap((m) => [-1, 0, 1].map((n) => Math.hypot(...cart([k[0] - m, k[1] - n])))).sort((x, y) => x - y);
          expect(d[0]).toBeCloseTo(bz, 12);
          expect(d[1]).toBeCloseTo(bz, 12);
          expect(d[2]).toBeCloseTo(bz, 12);
          expect(d[3]).toBeGreaterThan(bz * 1.5);
        }
        // K' = -K modulo the reciprocal lattice; K and K' are not equivalent.
        const sum = points.K.map((x, i) => x + points["K'"][i]);
        sum.forEach((x) => expect(Math.abs(x - Math.round(x))).toBeLessThan(1e-12));
        expect(Math.abs(points.K[0] - points["K'"][0] - Math.round(points.K[0] - points["K'"][0])) + Math.abs(points.K[1] - points["K'"][1] - Math.round(points.K[1] - points["K'"][1]))).toBeGreaterThan(0.1);
        // M is the midpoint of a shortest reciprocal vector.
        expect(Math.hypot(...cart(points.M))).toBeCloseTo(Math.hypot(...b[0]) / 2, 12);
      }
    }
  });

  it('classifies square, rectangular, oblique, chain, cubic and orthorhombic lattices', () => {
    expect(highSymmetryPoints({ vectors: [rotate([2, 0], 0.4), rotate([0, 2], 0.4)], periodic: 2 }).family).toBe('square');
    expect(highSymmetryPoints({ vectors: [[1, 0], [0, 2]], periodic: 2 }).family).toBe('rectangular');
    expect(highSymmetryPoints({ vectors: [[1, 0], [0.3, 1]], periodic: 2 }).family).toBe('oblique');
    expect(highSymmetryPoints({ vectors: [[3, 0], [0, 1]], periodic: 1 }).family).toBe('chain');
    const cubic = highSymmetryPoints({ vectors: [[1, 0, 0], [0, 1, 0], [0, 0, 1]], periodic: 3 });
    expect(cubic.family).toBe('cubic');
    expect(cubic.points.R).toEqual([0.5, 0.5, 0.5]);
    expect(highSymmetryPoints({ vectors: [[1, 0, 0], [0, 1, 0], [0, 0, 2]], periodic: 3 }).family).toBe('orthorhombic');
    expect(() => highSymmetryPoints({ vectors: [[1]], periodic: 0 })).toThrow(/periodic/);
  });
});

describe('k-paths', () => {
  const square = chain([[1, 0], [0, 1]]);

  it('accumulates Cartesian length, independent of the lattice orientation', () => {
    const rotated = lattice('rotated', [rotate([1.5, 0], 0.7), rotate([0, 1.5], 0.7)]).site('s', [0, 0]).hop('s', 's', [1, 0], -1).build();
    const path = kPath(rotated, { path: 'Γ X M Γ', pointsPerSegment: 7 });
    expect(path.count).toBe(22);
    expect(path.distance[path.count - 1]).toBeCloseTo(((2 + Math.SQRT2) * Math.PI) / 1.5, 12);
    // Uniform steps within a segment; monotone overall.
    for (let p = 1; p < path.count; p++) expect(path.distance[p]).toBeGreaterThan(path.distance[p - 1]);
    expect(path.distance[1] - path.distance[0]).toBeCloseTo(Math.PI / 1.5 / 7, 12);
  });

  it('jumps keep the distance and merge the labels', () => {
    const path = kPath(square, { path: 'Γ X | M Γ', pointsPerSegment: 4 });
    expect(path.count).toBe(10);
    expect(path.breaks).toEqual([5]);
    expect(path.distance[5]).toBe(path.distance[4]);
    expect(path.labels.map((l) => l.label)).toEqual(['Γ', 'X|M', 'Γ']);
    expect(Array.from(path.fractions.subarray(10, 12))).toEqual([0.5, 0.5]);
    expect(path.distance[9]).toBeCloseTo(Math.PI + Math.SQRT2 * Math.PI, 12);
  });

  it('takes explicit labelled points and defaults to the customary path', () => {
    const path = kPath(square, { path: [{ label: 'A', k: [0.1, 0.2] }, { label: 'B', k: [0.1, -0.3] }], pointsPerSegment: 5 });
    expect(path.distance[5]).toBeCloseTo(Math.PI, 12);
    expect(kPath(square).labels.map((l) => l.label)).toEqual(['Γ', 'X', 'M', 'Γ']);
  });

  it('names the field and value of bad input', () => {
    expect(() => kPath(square, { path: 'Γ Q' })).toThrow(/path\[1\]: unknown point "Q"/);
    expect(() => kPath(square, { path: [{ label: 'A', k: [0] }, { label: 'B', k: [0, 0] }] })).toThrow(/path\[0\]\.k: expected 2 finite numbers/);
    expect(() => kPath(square, { path: 'Γ X | M' })).toThrow(/piece 1 has 1/);
    expect(() => kPath(square, { pointsPerSegment: 0 })).toThrow(/pointsPerSegment: .*Value: 0/);
    expect(() => kPath(square, { path: 'Γ X' }).count).not.toThrow();
  });
});

describe('bands', () => {
  it('reuses a compiled Hamiltonian with new parameters and reports the gap on the path', () => {
    const ssh = lattice('SSH', [[1, 0], [0, 1]], 1).parameter('v', { default: 1 }).parameter('w', { default: 0.5 })
      .site('a', [0, 0]).site('b', [0.5, 0]).hop('a', 'b', [0], 'v').hop('b', 'a', [1], 'w').build();
    const h = blochHamiltonian(ssh);
    const first = bandStructure(h, { params: { v: 1, w: 0.5 }, pointsPerSegment: 20 });
    // E = ±|v + w e^{ik}|: gap 2|v - w| at the zone edge (Su, Schrieffer, Heeger, PRL 42, 1698 (1979)).
    expect(first.checks.minGap).toBeCloseTo(1, 12);
    expect(first.checks.minGapAt).toEqual([0.5]);
    const closing = bandStructure(h, { params: { v: 0.7, w: 0.7 }, pointsPerSegment: 20 });
    expect(closing.checks.gapless).toBe(true);
    expect(closing.checks.warnings[0]).toMatch(/closes on the path/);
    expect(closing.energies.length).toBe(closing.path.count * 2);
  });

  it('of a finite model (a flake) is its spectrum at the single empty k', () => {
    const dimer = lattice('dimer', [[1]], 0).site('a', [0]).site('b', [0.5]).hop('a', 'b', [], -1).build();
    const b = bandStructure(dimer);
    expect(b.path.count).toBe(1);
    expect(Array.from(b.energies)).toEqual([expect.closeTo(-1, 14), expect.closeTo(1, 14)]);
    expect(b.checks.minGap).toBeCloseTo(2, 14);
  });

  it('stops at an interrupt', () => {
    const flag = new Int32Array(new SharedArrayBuffer(4));
    installInterruptFlag(flag);
    Atomics.store(flag, 0, 1);
    expect(() => bandStructure(chain([[1, 0], [0, 1]]))).toThrow(InterruptedError);
  });
  afterEach(() => installInterruptFlag(null));
});

describe('ribbon spectra', () => {
  const square = lattice('square', [[1, 0, 0], [0, 1, 0], [0, 0, 1]]).site('s', [0, 0, 0])
    .hop('s', 's', [1, 0, 0], -1).hop('s', 's', [0, 1, 0], -1).hop('s', 's', [0, 0, 1], -1).build();

  it('a slab samples its own 2D zone; bulk states of a single band have edge weight layers/width on average', () => {
    const r = ribbonSpectrum(square, { direction: 2, width: 10, nk: 3, edgeLayers: 2 });
    expect(r.path.dim).toBe(2);
    expect(r.path.labels.map((l) => l.label)).toEqual(['Γ', 'X', 'M', 'Γ']);
    expect(r.energies.length).toBe(r.path.count * 10);
    // Open chain of 10 sites along z: E = e_xy - 2 cos(pi m / 11) (a standing wave; common practice).
    const e0 = r.energies[0];
    expect(e0).toBeCloseTo(-4 - 2 * Math.cos(Math.PI / 11), 12);
    // Summed over all states at one k, each edge holds exactly its orbitals' share: 2 of 10.
    let first = 0;
    for (let n = 0; n < 10; n++) first += r.edges.first[n];
    expect(first).toBeCloseTo(2, 12);
  });

  it('names bad options', () => {
    expect(() => ribbonSpectrum(square, { direction: 3, width: 4 })).toThrow(/ribbon\.direction/);
    expect(() => ribbonSpectrum(square, { direction: 0, width: 4, edgeLayers: 5 })).toThrow(/edgeLayers: expected a whole number from 1 to the width 4\. Value: 5/);
    expect(ribbonSpectrum(square, { direction: 0, width: 3, edgeLayers: 2, nk: 1 }).checks.warnings[0]).toMatch(/edges overlap/);
  });
});

describe('band groups and gaps', () => {
  const threeBand = lattice('three', [[1]]).site('a', [0]).site('b', [0]).site('c', [0])
    .onsite('a', -2).onsite('c', 2).hop('a', 'a', [1], 0.1).hop('b', 'b', [1], 0.1).hop('c', 'c', [1], 0.1).build();

  it('measures a middle group against the bands on both sides', () => {
    // Bands -2, 0, 2 plus the same 0.2 cos k each: the direct gap of the middle band is 2 at every k,
    // while the lowest-one-band gap to the middle band is 2 as well and the top band is never counted.
    const gap = directGap(threeBand, { bands: [1], grid: 16 });
    expect(gap.minGap).toBeCloseTo(2, 12);
    expect(Math.max(...gap.gap) - Math.min(...gap.gap)).toBeLessThan(1e-12);
    expect(() => directGap(threeBand, { bands: [0, 2] })).toThrow(/bands: band indices must be contiguous/);
    expect(() => directGap(threeBand, { bands: 3 })).toThrow(/bands: expected a whole number of lowest bands from 1 to 2\. Value: 3/);
    expect(() => directGap(threeBand, { bands: [0, 1, 2] })).toThrow(/no gap to measure/);
    expect(() => directGap(threeBand, { grid: [4, 4] })).toThrow(/grid: expected a number or 1 numbers/);
  });

  it('Nelder–Mead finds the minimum of an anisotropic quadratic', () => {
    // A zero minimum (like gap^2 at a closing point) is resolved to near the tolerance; with a
    // non-zero floor only to about sqrt(machine epsilon), as for any value-only minimiser.
    const zero = nelderMead((p) => (p[0] - 0.3) ** 2 + 4 * (p[1] + 1.2) ** 2 + (p[0] - 0.3) * (p[1] + 1.2), [0, 0], [0.5, 0.5], 1e-11, 5000);
    expect(Math.abs(zero.x[0] - 0.3)).toBeLessThan(1e-10);
    expect(Math.abs(zero.x[1] + 1.2)).toBeLessThan(1e-10);
    const floor = nelderMead((p) => (p[0] - 0.3) ** 2 + 4 * (p[1] + 1.2) ** 2 + 0.5, [0, 0], [0.5, 0.5], 1e-10, 5000);
    expect(Math.abs(floor.x[0] - 0.3)).toBeLessThan(1e-6);
    expect(floor.value).toBeCloseTo(0.5, 14);
  });

  it('warns when there are more grid minima than it refines', () => {
    // A flat, gapped two-band model: every grid point is a (tied) minimum.
    const flat = lattice('flat', [[1, 0], [0, 1]]).site('a', [0, 0]).site('b', [0, 0]).onsite('a', 1).onsite('b', -1).build();
    const result = findGapClosings(flat, { grid: 6, maxCandidates: 3 });
    expect(result.checks.warnings[0]).toMatch(/36 local minima/);
    expect(result.points.every((p) => !p.closed && Math.abs(p.gap - 2) < 1e-12)).toBe(true);
  });
});

describe('density of states normalisation', () => {
  it('integrates to the number of bands in 1D, 2D and 3D, with either method', () => {
    const models = [
      lattice('1D', [[1]]).site('a', [0]).site('b', [0.5]).onsite('a', 0.3).hop('a', 'b', [0], -1).hop('b', 'a', [1], -0.6).build(),
      lattice('2D', [[1, 0], [0.5, 0.9]]).site('a', [0, 0]).site('b', [0.5, 0]).onsite('a', 0.4).hop('a', 'b', [0, 0], -1).hop('b', 'a', [1, 0], -0.5).hop('a', 'a', [0, 1], 0.3).build(),
      lattice('3D', [[1, 0, 0], [0, 1, 0], [0, 0, 1]]).site('s', [0, 0, 0]).hop('s', 's', [1, 0, 0], -1).hop('s', 's', [0, 1, 0], -1).hop('s', 's', [0, 0, 1], -1).build(),
    ];
    for (const model of models) {
      for (const method of ['linear', 'gaussian'] as const) {
        const dos = densityOfStates(model, { method, grid: model.periodic === 3 ? 12 : model.periodic === 2 ? 40 : 400 });
        const integral = dos.density.reduce((s, d) => s + d * dos.binWidth, 0);
        expect(integral).toBeCloseTo(model.orbitals.length, method === 'linear' ? 10 : 5);
        expect(dos.density.every((d) => d >= -1e-12)).toBe(true);
      }
    }
  });

  it('simple cubic linear-tetrahedron DOS is symmetric with bandwidth 12t (common practice)', () => {
    const model = lattice('sc', [[1, 0, 0], [0, 1, 0], [0, 0, 1]]).site('s', [0, 0, 0])
      .hop('s', 's', [1, 0, 0], -1).hop('s', 's', [0, 1, 0], -1).hop('s', 's', [0, 0, 1], -1).build();
    const dos = densityOfStates(model, { grid: 16, energies: { from: -6.5, to: 6.5, count: 26 } });
    expect(dos.bandRange).toEqual([-6, 6]);
    for (let j = 0; j < 13; j++) expect(dos.density[j]).toBeCloseTo(dos.density[25 - j], 10);
    expect(dos.density[0]).toBe(0);
  });

  it('names bad options', () => {
    const model = chain([[1]]);
    expect(() => densityOfStates(model, { method: 'box' as 'linear' })).toThrow(/method: expected "linear" or "gaussian"\. Value: "box"/);
    expect(() => densityOfStates(model, { method: 'gaussian', width: -1 })).toThrow(/width: expected a positive number\. Value: -1/);
    expect(() => densityOfStates(model, { energies: { from: 1, to: 0, count: 10 } })).toThrow(/energies: expected finite from < to/);
    expect(densityOfStates(model, { energies: { from: -1, to: 1, count: 10 } }).checks.warnings[0]).toMatch(/cuts the bands/);
  });
});
