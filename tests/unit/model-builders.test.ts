import { describe, expect, it } from 'vitest';
import {
  blochHamiltonian, bogoliubov, eigh, flake, haldane, hofstadter, lattice, magneticFlux, qwz, ribbon, supercell, twoBandWeyl, coupledWireArray,
  type ModelSpec,
} from '../../src/index.js';

function matrixAt(model: ModelSpec, params: Record<string, number>, k: number[]): { n: number; h: Float64Array } {
  const b = blochHamiltonian(model, params);
  return { n: b.size, h: b.fill(k, new Float64Array(2 * b.size * b.size)) };
}
function energies(model: ModelSpec, params: Record<string, number>, k: number[]): number[] {
  const { n, h } = matrixAt(model, params, k);
  return Array.from(eigh(n, h).values);
}
const sorted = (x: number[]) => [...x].sort((a, b) => a - b);

/** Primitive reduced momenta that fold onto supercell momentum K: k = M^{-1}(K + 2 pi n). */
function unfolded(m: number[][], K: number[]): number[][] {
  const d = m.length;
  const inv = d === 2
    ? [[m[1][1], -m[0][1]], [-m[1][0], m[0][0]]].map((r) => r.map((x) => x / (m[0][0] * m[1][1] - m[0][1] * m[1][0])))
    : [[1 / m[0][0]]];
  const found = new Map<string, number[]>();
  const range = [-4, -3, -2, -1, 0, 1, 2, 3, 4];
  const ns = d === 2 ? range.flatMap((a) => range.map((b) => [a, b])) : range.map((a) => [a]);
  for (const n of ns) {
    const rhs = K.map((x, i) => x + 2 * Math.PI * n[i]);
    const k = inv.map((row) => row.reduce((s, x, j) => s + x * rhs[j], 0));
    const wrapped = k.map((x) => x - 2 * Math.PI * Math.round(x / (2 * Math.PI)));
    found.set(wrapped.map((x) => x.toFixed(9)).join(','), wrapped);
  }
  return [...found.values()];
}

describe('supercell', () => {
  it('copies orbitals into every cell and folds the primitive spectrum (common practice: band folding)', () => {
    const params = { t2: 0.13, phi: 0.7, M: 0.05 };
    for (const m of [[[2, 1], [-1, 1]], [[1, 0], [0, 2]], [[2, 0], [1, 2]]]) {
      const big = supercell(haldane(), m);
      const det = Math.abs(m[0][0] * m[1][1] - m[0][1] * m[1][0]);
      expect(big.orbitals).toHaveLength(2 * det);
      for (const K of [[0.4, -1.3], [Math.PI - 0.01, 2.2]]) {
        const ks = unfolded(m, K);
        expect(ks).toHaveLength(det);
        const folded = sorted(ks.flatMap((k) => energies(haldane(), params, k)));
        const direct = energies(big, params, K);
        direct.forEach((e, i) => expect(e).toBeCloseTo(folded[i], 10));
      }
    }
  });

  it('keeps the orbital positions (Cartesian) and carries open directions over', () => {
    const big = supercell(haldane(), [[2, 1], [-1, 1]]);
    const cart = (spec: ModelSpec, p: number[]) => [0, 1].map((c) => p.reduce((s, x, i) => s + x * spec.vectors[i][c], 0));
    const copies = big.orbitals.filter((o) => o.label.startsWith('B@'));
    expect(copies).toHaveLength(3);
    for (const b of copies) {
      const cell = b.label.slice(2).split(',').map(Number);
      const [x, y] = cart(big, b.position);
      const [x0, y0] = cart(haldane(), [1 / 3 + cell[0], 1 / 3 + cell[1]]);
      expect(x).toBeCloseTo(x0, 12);
      expect(y).toBeCloseTo(y0, 12);
    }
    const strip = ribbon(qwz(), 1, 3);
    expect(supercell(strip, [[2]]).orbitals).toHaveLength(12);
  });

  it('names the field of a bad matrix', () => {
    expect(() => supercell(qwz(), [[1, 1], [2, 2]])).toThrow(/supercell\.matrix: the matrix is singular/);
    expect(() => supercell(qwz(), [[1.5, 0], [0, 1]])).toThrow(/supercell\.matrix: expected a 2 x 2 integer matrix.*Value: \[\[1\.5,0\],\[0,1\]\]/);
  });
});

describe('ribbon and flake', () => {
  it('a ribbon is periodic along the rest and tags each orbital with its layer', () => {
    const r = ribbon(qwz(), 1, 5);
    expect(r.periodic).toBe(1);
    expect(r.orbitals).toHaveLength(10);
    expect(r.orbitals.map((o) => o.layer)).toEqual([0, 0, 1, 1, 2, 2, 3, 3, 4, 4]);
    expect(r.orbitals[4].position).toEqual([0, 2]);
    // Open along a1 instead: the remaining periodic direction is a2, listed first.
    const s = ribbon(qwz(), 0, 2);
    expect(s.vectors).toEqual([[0, 1], [1, 0]]);
    // A slab of a 3D model: 2 periodic directions left. At kx = ky = 0 only d_z = t (cos kz - cos k0)
    // remains; opening z replaces cos kz by the open-chain levels cos(pi n/(W+1)), one per sz sector.
    const slab = ribbon(twoBandWeyl(), 2, 6);
    expect(slab.periodic).toBe(2);
    expect(slab.orbitals).toHaveLength(12);
    const e = energies(slab, { t: 1, m: 1, k0: 1.1 }, [0, 0]);
    const dz = [1, 2, 3, 4, 5, 6].flatMap((n) => { const d = -Math.cos(1.1) + Math.cos((Math.PI * n) / 7); return [d, -d]; }).sort((a, b) => a - b);
    dz.forEach((x, i) => expect(e[i]).toBeCloseTo(x, 12));
  });

  it('a square-lattice flake has the particle-in-a-box spectrum -2t[cos(pi m/(L+1)) + cos(pi n/(L+1))] (common practice)', () => {
    const sq = lattice('square', [[1, 0], [0, 1]]).site('a', [0, 0]).hop('a', 'a', [1, 0], -1).hop('a', 'a', [0, 1], -1).build();
    const [Lx, Ly] = [5, 4];
    const f = flake(sq, [Lx, Ly]);
    expect(f.periodic).toBe(0);
    const expected: number[] = [];
    for (let m = 1; m <= Lx; m++) for (let n = 1; n <= Ly; n++) expected.push(-2 * Math.cos((Math.PI * m) / (Lx + 1)) - 2 * Math.cos((Math.PI * n) / (Ly + 1)));
    const got = energies(f, {}, []);
    sorted(expected).forEach((e, i) => expect(got[i]).toBeCloseTo(e, 10));
  });

  it('a flake can be cut to a shape, dropping terms to removed orbitals', () => {
    const sq = lattice('square', [[1, 0], [0, 1]]).site('a', [0, 0]).hop('a', 'a', [1, 0], -1).hop('a', 'a', [0, 1], -1).build();
    const disc = flake(sq, [7, 7], { keep: ([x, y]) => Math.hypot(x - 3, y - 3) <= 2.5 });
    expect(disc.orbitals).toHaveLength(21);
    expect(() => ribbon(qwz(), 2, 4)).toThrow(/ribbon\.direction: expected a periodic direction from 0 to 1 of "Qi–Wu–Zhang"\. Value: 2/);
    expect(() => ribbon(qwz(), 0, 0)).toThrow(/ribbon\.width: expected a positive integer number of cells\. Value: 0/);
  });
});

/** H_ij of a finite model, (re, im). */
function element(n: number, h: Float64Array, i: number, j: number): [number, number] {
  return [h[2 * (i * n + j)], h[2 * (i * n + j) + 1]];
}

/** Product of <next|H|current> around loops of sites at distance `bond` from a centre, counter-clockwise. */
function loopPhases(model: ModelSpec, params: Record<string, number>, bond: number, sites: number): number[] {
  const { n, h } = matrixAt(model, params, []);
  const cart = model.orbitals.map((o) => [0, 1].map((c) => o.position.reduce((s, x, i) => s + x * model.vectors[i][c], 0)));
  const centres = new Map<string, number[]>();
  for (const p of cart) for (let a = 0; a < 24; a++) {
    const c = [p[0] + bond * Math.cos((a * Math.PI) / 12), p[1] + bond * Math.sin((a * Math.PI) / 12)];
    centres.set(c.map((x) => x.toFixed(6)).join(','), c);
  }
  const phases: number[] = [];
  for (const c of centres.values()) {
    const ring = cart.map((p, i) => ({ i, d: Math.hypot(p[0] - c[0], p[1] - c[1]), a: Math.atan2(p[1] - c[1], p[0] - c[0]) }))
      .filter((s) => Math.abs(s.d - bond) < 1e-9).sort((x, y) => x.a - y.a);
    if (ring.length !== sites) continue;
    let re = 1, im = 0;
    for (let s = 0; s < sites; s++) {
      const [er, ei] = element(n, h, ring[(s + 1) % sites].i, ring[s].i);
      [re, im] = [re * er - im * ei, re * ei + im * er];
    }
    expect(Math.hypot(re, im)).toBeGreaterThan(1e-9);
    phases.push(Math.atan2(im, re));
  }
  return phases;
}

describe('magnetic flux by Peierls phases', () => {
  const wrap = (a: number) => a - 2 * Math.PI * Math.round(a / (2 * Math.PI));

  it('every square plaquette of a flake cut from the magnetic supercell encloses e^{+2 pi i p/q} counter-clockwise (flux convention of builders/flux.ts)', () => {
    for (const [p, q] of [[1, 3], [2, 5]]) {
      const phases = loopPhases(flake(hofstadter(p, q), [2, 3]), {}, Math.SQRT1_2, 4);
      expect(phases).toHaveLength((2 * q - 1) * 2);
      for (const ph of phases) expect(wrap(ph - (2 * Math.PI * p) / q)).toBeCloseTo(0, 10);
    }
  });

  it('every hexagon of a honeycomb in a field encloses e^{+2 pi i p/q}, across supercell boundaries too (gauge consistency)', () => {
    const [p, q] = [1, 4];
    const hex = flake(magneticFlux(haldane(), { p, q }), [2, 3]);
    const phases = loopPhases(hex, { t2: 0, M: 0 }, 1, 6);
    expect(phases.length).toBeGreaterThan(10);
    for (const ph of phases) expect(wrap(ph - (2 * Math.PI * p) / q)).toBeCloseTo(0, 10);
  });

  it('a flake of the magnetic supercell model is gauge-equivalent to a flake with Landau-gauge Peierls phases put in directly (Peierls substitution)', () => {
    // Second-neighbour hoppings make loops that leave a supercell on one sublattice and return on
    // the other: these see the gauge factor of the magnetic translation.
    const params = { t2: 0.15, phi: 0.4, M: 0.1 };
    for (const [p, q] of [[1, 3], [2, 5]]) {
      const fromSupercell = energies(flake(magneticFlux(haldane(), { p, q }), [2, 2]), params, []);
      const plain = flake(haldane(), [2 * q, 2]);
      const { n, h } = matrixAt(plain, params, []);
      const x = plain.orbitals.map((o) => o.position);
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
        // hop from j to i: theta = 2 pi (p/q) (x1_j + x1_i)/2 (x2_i - x2_j)
        const theta = ((2 * Math.PI * p) / q) * ((x[j][0] + x[i][0]) / 2) * (x[i][1] - x[j][1]);
        const [re, im] = element(n, h, i, j);
        h[2 * (i * n + j)] = re * Math.cos(theta) - im * Math.sin(theta);
        h[2 * (i * n + j) + 1] = re * Math.sin(theta) + im * Math.cos(theta);
      }
      const direct = Array.from(eigh(n, h).values);
      expect(fromSupercell).toHaveLength(direct.length);
      direct.forEach((e, i) => expect(fromSupercell[i]).toBeCloseTo(e, 10));
    }
  });

  it('pi flux on the square lattice gives E = ±2t sqrt(cos^2(K1/2) + cos^2 k2) (derived by hand; common practice)', () => {
    const m = hofstadter(1, 2);
    for (const [K1, k2] of [[0.3, 1.2], [-2.0, 0.1]]) {
      const e = energies(m, { t: 1 }, [K1, k2]);
      const expected = 2 * Math.sqrt(Math.cos(K1 / 2) ** 2 + Math.cos(k2) ** 2);
      expect(e[0]).toBeCloseTo(-expected, 12);
      expect(e[1]).toBeCloseTo(expected, 12);
    }
  });

  it('names the field of bad flux options', () => {
    expect(() => magneticFlux(qwz(), { p: 1, q: 0 })).toThrow(/flux\.q: expected a positive integer\. Value: 0/);
    expect(() => magneticFlux(qwz(), { p: 0.5, q: 3 })).toThrow(/flux\.p: expected an integer\. Value: 0\.5/);
    expect(() => magneticFlux(qwz(), { p: 1, q: 3, plane: [0, 0] })).toThrow(/flux\.plane/);
    expect(magneticFlux(twoBandWeyl(), { p: 1, q: 2, plane: [0, 2] }).orbitals).toHaveLength(4);
  });
});

describe('Bogoliubov–de Gennes doubling', () => {
  // A normal state without time reversal (Haldane, phi != 0, pi) makes H(-k)^T differ from H(k).
  const normal = haldane();
  const model = bogoliubov(normal, {
    parameters: { D: { default: 0.3 } },
    chemicalPotential: 0.2,
    pairing: [
      { from: 'A', to: 'B', cell: [0, 0], amplitude: 'D' },
      { from: 'A', to: 'A', cell: [1, 0], amplitude: { re: 0.1, im: 0.05 } },
    ],
  });

  it('has blocks [[H(k) - mu, D(k)], [D(k)^dagger, -H(-k)^T + mu]] with D(k)^T = -D(-k) (bdg.ts convention)', () => {
    const k = [0.7, -1.9];
    const mk = k.map((x) => -x);
    const { h } = matrixAt(model, {}, k);
    const { h: hm } = matrixAt(model, {}, mk);
    const { h: h0 } = matrixAt(normal, {}, k);
    const { h: h0m } = matrixAt(normal, {}, mk);
    const at = (m: Float64Array, n: number, i: number, j: number) => element(n, m, i, j);
    for (let i = 0; i < 2; i++) for (let j = 0; j < 2; j++) {
      const [pr, pi] = at(h, 4, i, j);
      const [nr, ni] = at(h0, 2, i, j);
      expect(pr).toBeCloseTo(nr - (i === j ? 0.2 : 0), 12);
      expect(pi).toBeCloseTo(ni, 12);
      const [hr, hi] = at(h, 4, 2 + i, 2 + j);
      const [tr, ti] = at(h0m, 2, j, i);
      expect(hr).toBeCloseTo(-tr + (i === j ? 0.2 : 0), 12);
      expect(hi).toBeCloseTo(-ti, 12);
      const [dr, di] = at(h, 4, i, 2 + j);
      const [er, ei] = at(hm, 4, j, 2 + i);
      expect(dr).toBeCloseTo(-er, 12);
      expect(di).toBeCloseTo(-ei, 12);
    }
    // The onsite A-B pairing D c+_B c+_A puts D at (B particle, A hole) and -D at (A particle, B hole).
    const pairAt = (m: Float64Array, i: number, j: number) => element(4, m, i, j)[0];
    const { h: hnoA } = matrixAt(bogoliubov(normal, { pairing: [{ from: 'A', to: 'B', cell: [0, 0], amplitude: 0.3 }] }), {}, [0, 0]);
    expect(pairAt(hnoA, 1, 2)).toBeCloseTo(0.3, 14);
    expect(pairAt(hnoA, 0, 3)).toBeCloseTo(-0.3, 14);
  });

  it('spectrum at k is minus the spectrum at -k (particle–hole symmetry; common practice)', () => {
    for (const k of [[0.7, -1.9], [2.5, 0.4]]) {
      const e = energies(model, {}, k);
      const f = energies(model, {}, k.map((x) => -x)).map((x) => -x).sort((a, b) => a - b);
      e.forEach((x, i) => expect(x).toBeCloseTo(f[i], 10));
    }
  });

  it('tags orbitals and refuses bad pairing terms by field', () => {
    expect(model.orbitals.map((o) => `${o.label}:${o.nambu}`)).toEqual(['A.e:particle', 'B.e:particle', 'A.h:hole', 'B.h:hole']);
    expect(() => bogoliubov(normal, { pairing: [{ from: 'A', to: 'C', cell: [0, 0], amplitude: 1 }] })).toThrow(/bdg\.pairing\[0\]\.to: unknown orbital "C"/);
    expect(() => bogoliubov(normal, { pairing: [{ from: 'A', to: 'A', cell: [0, 0], amplitude: 1 }] })).toThrow(/bdg\.pairing\[0\]: pairing an orbital with itself in the same cell vanishes/);
    expect(() => bogoliubov(normal, { pairing: [{ from: 'A', to: 'B', cell: [0, 0], amplitude: 'Delta' }] })).toThrow(/bdg\.pairing\[0\]\.amplitude: expression "Delta" uses undefined parameter "Delta"/);
    expect(() => bogoliubov(model, { pairing: [] })).toThrow(/bdg\.model: .* is already in Nambu form/);
  });
});

describe('wire stack', () => {
  const chain = lattice('chain', [[1]]).site('a', [0]).hop('a', 'a', [1], -1).build();
  const couplings = [{ from: 'a', to: 'a', cell: [0, 1], amplitude: -0.5 }];

  it('periodic stacks are 2D with `wires` wires per cell; open stacks are 1D with wire layers', () => {
    const one = coupledWireArray(chain, { couplings });
    expect(one.periodic).toBe(2);
    // Anisotropic square lattice: E = -2 cos k - cos ky.
    expect(energies(one, {}, [0.4, 1.1])[0]).toBeCloseTo(-2 * Math.cos(0.4) - Math.cos(1.1), 12);
    const three = coupledWireArray(chain, { couplings, wires: 3 });
    expect(three.orbitals).toHaveLength(3);
    const e = energies(three, {}, [0.4, 0.3]);
    const expected = [0, 1, 2].map((n) => -2 * Math.cos(0.4) - Math.cos((0.3 + 2 * Math.PI * n) / 3)).sort((a, b) => a - b);
    e.forEach((x, i) => expect(x).toBeCloseTo(expected[i], 12));
    const open = coupledWireArray(chain, { couplings, wires: 4, boundary: 'open' });
    expect(open.periodic).toBe(1);
    expect(open.orbitals.map((o) => o.layer)).toEqual([0, 1, 2, 3]);
    // Open chain of 4 wires across: -2 cos k - cos(pi n / 5), n = 1..4.
    const eo = energies(open, {}, [0.4]);
    [1, 2, 3, 4].map((n) => -2 * Math.cos(0.4) - Math.cos((Math.PI * n) / 5)).sort((a, b) => a - b).forEach((x, i) => expect(eo[i]).toBeCloseTo(x, 12));
  });

  it('names the field of bad options', () => {
    expect(() => coupledWireArray(qwz(), { couplings })).toThrow(/wires\.chain: expected a one-dimensional chain/);
    expect(() => coupledWireArray(chain, { couplings: [{ from: 'b', to: 'a', cell: [0, 1], amplitude: 1 }] })).toThrow(/wires\.couplings\[0\]\.from: unknown orbital "b"/);
    expect(() => coupledWireArray(chain, { couplings, wires: 0 })).toThrow(/wires\.wires: expected a positive integer\. Value: 0/);
  });
});
