/**
 * The bulk–boundary check (src/surface/bulk-boundary.ts, chain-ends.ts, surface-count.ts) on every
 * catalogue model in each of its phases, at parameters taken from the published phase diagrams;
 * boundaries decorated on purpose; bad input. Sign conventions: shared/references.md and the
 * files' headers.
 */
import { describe, expect, it } from 'vitest';
import {
  BlochHamiltonian, CATALOGUE, compute, cubicTI, hofstadter, kitaevChain, lattice, ribbon, riceMele, ssh, twoBandWeyl, type ModelSpec,
} from '../../src/index.js';
import { bulkBoundary, bulkBoundaryCost, type BulkBoundaryOptions, type BulkBoundaryResult } from '../../src/surface/bulk-boundary.js';
import { principalLayers } from '../../src/surface/layers.js';
import { openSlab } from '../../src/surface/slab.js';
import { z2Index } from '../../src/topology/z2.js';

interface Phase {
  /** The phase and where its parameters come from. */
  label: string;
  params: Record<string, number>;
  options: BulkBoundaryOptions;
  /** The invariant the phase diagram gives (W, M, C, Z2 or nu0; Weyl: nodes counted with |chirality|). */
  value: number;
  /** What else the boundary must show. */
  check?: (r: BulkBoundaryResult) => void;
}

/** The first end of a chiral chain: |W| modes, on sublattice A for W > 0 (convention of chain-ends.ts). */
const chiralEnds = (w: number) => (r: BulkBoundaryResult): void => {
  expect(r.ends!.first).toMatchObject({ sublatticeA: Math.max(w, 0), sublatticeB: Math.max(-w, 0), net: w });
  expect(r.ends!.last).toMatchObject({ sublatticeA: Math.max(-w, 0), sublatticeB: Math.max(w, 0), net: -w + 0 });
};
/** Chern: |C| modes on each edge, net -C on the first (the cuts below have right-handed bases, o = +1). */
const chiralEdges = (c: number) => (r: BulkBoundaryResult): void => {
  expect([r.edges!.first.net, r.edges!.last.net, r.edges!.first.modes.length]).toEqual([-c + 0, c, Math.abs(c)]);
};
const helicalEdges = (z2: number) => (r: BulkBoundaryResult): void => {
  expect([r.edges!.first.pairs, r.edges!.last.pairs]).toEqual([z2, z2]);
};
/** Dirac points on both surfaces, at the surface TRIMs given (fractions). */
const cones = (at: number[][]) => (r: BulkBoundaryResult): void => {
  for (const s of [r.surfaces!.bottom, r.surfaces!.top]) expect(s.cones!.map((c) => c.kPar)).toEqual(at);
};
/** Weyl: the net crossings of the lines on the bottom surface, and their opposite on the top. */
const arcs = (nets: number[]) => (r: BulkBoundaryResult): void => {
  expect(r.surfaces!.bottom.lines!.map((l) => l.net)).toEqual(nets);
  expect(r.surfaces!.top.lines!.map((l) => l.net)).toEqual(nets.map((x) => -x + 0));
};

const ribbonOptions: BulkBoundaryOptions = { cut: 1, width: 32, nk: 128 };

const PHASES: Record<string, Phase[]> = {
  // Su, Schrieffer, Heeger, PRL 42, 1698 (1979): end zero modes for |v| < |w|, none for |v| > |w|.
  ssh: [
    { label: 'v < w: W = 1', params: { v: 0.5, w: 1 }, options: { cut: 0 }, value: 1, check: chiralEnds(1) },
    { label: 'v > w: W = 0', params: { v: 1.5, w: 1 }, options: { cut: 0 }, value: 0, check: chiralEnds(0) },
  ],
  // Rice & Mele, PRL 49, 1455 (1982): u = 0 is the SSH chain; u != 0 breaks the chiral symmetry, so no invariant protects end modes.
  riceMele: [
    { label: 'u = 0, v < w', params: { v: 0.5, w: 1, u: 0 }, options: { cut: 0 }, value: 1, check: chiralEnds(1) },
    { label: 'u = 0, v > w', params: { v: 1.5, w: 1, u: 0 }, options: { cut: 0 }, value: 0, check: chiralEnds(0) },
  ],
  // Kitaev, Physics-Uspekhi 44, 131 (2001): one Majorana mode per end for |mu| < 2|t|, none outside.
  kitaevChain: [
    { label: '|mu| < 2t', params: { mu: 0.5 }, options: { cut: 0 }, value: -1, check: (r) => expect([r.ends!.first.modes.length, r.ends!.last.modes.length]).toEqual([1, 1]) },
    { label: 'mu > 2t', params: { mu: 3 }, options: { cut: 0 }, value: 1, check: (r) => expect([r.ends!.first.modes.length, r.ends!.last.modes.length]).toEqual([0, 0]) },
    { label: 'mu < -2t', params: { mu: -3 }, options: { cut: 0 }, value: 1, check: (r) => expect([r.ends!.first.modes.length, r.ends!.last.modes.length]).toEqual([0, 0]) },
  ],
  // Qi, Wu, Zhang, PRB 74, 085308 (2006); signs in references.md.
  qwz: [
    { label: '-2 < u < 0: C = 1', params: { u: -1 }, options: ribbonOptions, value: 1, check: chiralEdges(1) },
    { label: '0 < u < 2: C = -1', params: { u: 1 }, options: ribbonOptions, value: -1, check: chiralEdges(-1) },
    { label: '|u| > 2: C = 0', params: { u: 3 }, options: ribbonOptions, value: 0, check: chiralEdges(0) },
  ],
  // Haldane, PRL 61, 2015 (1988): C = -sign(sin phi) for |M| < 3 sqrt3 t2 |sin phi| (references.md).
  haldane: [
    { label: 'phi = pi/2: C = -1', params: { phi: Math.PI / 2, M: 0.2 }, options: ribbonOptions, value: -1, check: chiralEdges(-1) },
    { label: 'phi = -pi/2: C = 1', params: { phi: -Math.PI / 2, M: 0.2 }, options: ribbonOptions, value: 1, check: chiralEdges(1) },
    { label: '|M| > 3 sqrt3 t2: C = 0', params: { phi: Math.PI / 2, M: 0.7 }, options: ribbonOptions, value: 0, check: chiralEdges(0) },
  ],
  // Kane & Mele, PRL 95, 226801 (2005): Z2 = 1 for |lambda_v| < 3 sqrt3 lambda_SO (0.312 at lambda_SO = 0.06).
  kaneMele: [
    { label: 'lambda_v = 0.1: Z2 = 1', params: { lambda_v: 0.1, lambda_R: 0.05 }, options: ribbonOptions, value: 1, check: helicalEdges(1) },
    { label: 'lambda_v = 0.5: Z2 = 0', params: { lambda_v: 0.5, lambda_R: 0.05 }, options: ribbonOptions, value: 0, check: helicalEdges(0) },
  ],
  // Bernevig, Hughes, Zhang, Science 314, 1757 (2006); Fu & Kane, PRB 76, 045302 (2007): Z2 = 1 for 0 < M/B < 8 except at 4.
  bhz: [
    { label: 'M/B = -1: Z2 = 0', params: { M: -1, B: 1 }, options: ribbonOptions, value: 0, check: helicalEdges(0) },
    { label: 'M/B = 1: Z2 = 1', params: { M: 1, B: 1 }, options: ribbonOptions, value: 1, check: helicalEdges(1) },
    { label: 'M/B = 3: Z2 = 1', params: { M: 3, B: 1 }, options: ribbonOptions, value: 1, check: helicalEdges(1) },
    { label: 'M/B = 9: Z2 = 0', params: { M: 9, B: 1 }, options: ribbonOptions, value: 0, check: helicalEdges(0) },
  ],
  // Thouless, Kohmoto, Nightingale, den Nijs, PRL 49, 405 (1982), flux 1/3: the lower gap C = -1, the
  // upper gap (at -E: the bipartite lattice's spectrum is symmetric, common practice) C = -1 + 2 = 1.
  hofstadter: [
    { label: 'lower gap: C = -1', params: {}, options: ribbonOptions, value: -1, check: chiralEdges(-1) },
    { label: 'upper gap: C = 1', params: {}, options: { ...ribbonOptions, energy: NaN }, value: 1, check: chiralEdges(1) },
  ],
  // Common practice (the wire construction; references.md): C = 1 for |delta| < |g|, 0 for |delta| > |g|.
  coupledWires: [
    { label: '|delta| < |g|: C = 1', params: { delta: 0.1, g: 0.3 }, options: ribbonOptions, value: 1, check: chiralEdges(1) },
    { label: '|delta| > |g|: C = 0', params: { delta: 0.4, g: 0.2 }, options: ribbonOptions, value: 0, check: chiralEdges(0) },
  ],
  // The catalogue's Weyl model (common practice, catalogue.ts): 2 nodes at (0, 0, ±k0) for m > (1 + cos k0)/2,
  // more at kx or ky = pi below. Arcs: Wan, Turner, Vishwanath & Savrasov, PRB 83, 205101 (2011).
  twoBandWeyl: [
    { label: 'm = 1, k0 = pi/2: two nodes, one arc between them', params: { m: 1, k0: Math.PI / 2 }, options: { cut: 0, nk: 128 }, value: 2, check: arcs([0, -1]) },
    { label: 'm = 1, cut along y (left-handed basis): the arc counted the other way', params: { m: 1, k0: Math.PI / 2 }, options: { cut: 1, nk: 128 }, value: 2, check: arcs([0, 1]) },
    { label: 'm = 1, surface normal to the nodes\' separation: both project on one point, no arc', params: { m: 1, k0: Math.PI / 2 }, options: { cut: 2, nk: 128 }, value: 2, check: arcs([0]) },
    { label: 'm = 0.3 < (1 + cos k0)/2: six nodes', params: { m: 0.3, k0: Math.PI / 2 }, options: { cut: 0, nk: 128, width: 40 }, value: 6 },
  ],
  // The catalogue's cubic TI (catalogue.ts; Fu & Kane, PRB 76, 045302 (2007) parities): strong for 0 < M/B < 4
  // and 8 < M/B < 12, weak (1,1,1) for 4 < M/B < 8, trivial outside; cones by Fu, Kane & Mele, PRL 98, 106803 (2007).
  cubicTI: [
    { label: 'M/B = 2: strong, one cone at the zone centre', params: { M: 2 }, options: { cut: 2 }, value: 1, check: cones([[0, 0]]) },
    { label: 'M/B = 6: weak (1,1,1), two cones on (001)', params: { M: 6 }, options: { cut: 2 }, value: 0, check: cones([[0.5, 0], [0, 0.5]]) },
    { label: 'M/B = 6: weak, two cones on (110)', params: { M: 6 }, options: { cut: [1, 1, 0] }, value: 0, check: (r) => expect(r.surfaces!.bottom.count).toBe(2) },
    { label: 'M/B = 10: strong, one cone at the zone corner', params: { M: 10 }, options: { cut: 2 }, value: 1, check: cones([[0.5, 0.5]]) },
    { label: 'M/B = -1: trivial, none', params: { M: -1 }, options: { cut: 2 }, value: 0, check: cones([]) },
    { label: 'M/B = 14: trivial, none', params: { M: 14 }, options: { cut: 0 }, value: 0, check: cones([]) },
  ],
};

describe('bulk–boundary check on every catalogue model', () => {
  it('has phases for every catalogue model (a new model needs its phases here)', () => {
    expect(Object.keys(PHASES).sort()).toEqual(Object.keys(CATALOGUE).sort());
  });

  for (const [name, phases] of Object.entries(PHASES)) {
    it(`${name}: the boundary agrees with the bulk invariant in each phase`, () => {
      for (const phase of phases) {
        const h = new BlochHamiltonian(CATALOGUE[name](), phase.params);
        let options = phase.options;
        if (Number.isNaN(options.energy)) options = { ...options, energy: -bulkBoundary(h, { ...options, energy: undefined }).energy };
        const r = bulkBoundary(h, options);
        const where = `${name}, ${phase.label}: ${r.summary}`;
        expect(r.boundary, where).toBe(['end', 'edge', 'surface'][h.dim - 1]);
        expect(r.invariant.value, where).toBe(phase.value);
        expect(r.invariant.certified, where).toBe(true);
        expect(r.verdict, where).toBe('agree');
        phase.check?.(r);
      }
    }, 60000);
  }
});

describe('the conventions and the reasons', () => {
  it('a chiral chain with W = -1 (intercell bond A -> B of the next cell) has its first end mode on B: the zero-mode equation v psi_A(n) + w psi_A(n-1) = 0 then lives on B (common practice); the sign is W\'s', () => {
    const reversed = lattice('reversed chain', [[1]])
      .parameter('v', { default: 0.5, range: [-2, 2], unit: '', doc: 'intracell' })
      .parameter('w', { default: 1, range: [-2, 2], unit: '', doc: 'intercell' })
      .site('A', [0]).site('B', [0.5])
      .hop('A', 'B', [0], 'v').hop('A', 'B', [1], 'w')
      .build();
    const r = bulkBoundary(new BlochHamiltonian(reversed, {}), { cut: 0 });
    expect([r.invariant.value, r.verdict]).toEqual([-1, 'agree']);
    chiralEnds(-1)(r);
    // The sublattice given by hand is the one used: swapping A and B swaps the sign of W and of every polarisation.
    const swapped = bulkBoundary(new BlochHamiltonian(reversed, {}), { cut: 0, sublattice: ['B'] });
    expect([swapped.invariant.value, swapped.verdict]).toEqual([1, 'agree']);
    chiralEnds(1)(swapped);
  });

  it('Rice–Mele with u != 0: undetermined, saying no invariant protects end modes (Rice & Mele, PRL 49, 1455 (1982); common practice)', () => {
    const r = bulkBoundary(new BlochHamiltonian(riceMele(), { u: 0.2 }), { cut: 0 });
    expect(r.invariant).toEqual({ kind: 'none', value: null, certified: false });
    expect(r.verdict).toBe('undetermined');
    expect(r.summary).toMatch(/^undetermined: no invariant protects end modes: the chain is not a BdG chain and has no chiral \(sublattice\) symmetry/);
  });

  it('a sample too thin for its boundary modes gives no verdict (near a transition the end modes of a 64-cell chain hybridise out of the gap: without the guard this read as a disagreement), and says how wide it must be (Combes–Thomas decay bound, common practice)', () => {
    for (const [v, width] of [[0.99, 64], [0.95, 16]]) {
      const r = bulkBoundary(new BlochHamiltonian(ssh(), { v, w: 1 }), { cut: 0, width });
      expect(r.verdict).toBe('undetermined');
      expect(r.summary).toMatch(new RegExp(`^undetermined: the chain \\(${width} cells\\) is too short for its end modes`));
      // D / delta = w / |w - v| cells per decay length (D = w bounds ||dH/dk|| of the SSH chain).
      expect(r.checks.warnings.join(' ')).toMatch(new RegExp(`raise width to at least ${Math.ceil(4 / (1 - v) - 1e-9)}`));
    }
    const ribbon = bulkBoundary(new BlochHamiltonian(CATALOGUE.qwz(), { u: -1.9 }), { cut: 1, width: 16, nk: 64 });
    expect(ribbon.verdict).toBe('undetermined');
    expect(ribbon.summary).toMatch(/^undetermined: the ribbon \(16 lines\) is too narrow/);
    const slab = bulkBoundary(new BlochHamiltonian(cubicTI(), { M: 3.8 }), { cut: 2, width: 12 });
    expect(slab.verdict).toBe('undetermined');
    expect(slab.summary).toMatch(/^undetermined: the slab \(12 planes\) is too thin/);
  });

  it('end modes are localised: the SSH zero mode puts 1 - (v/w)^(2L) of its weight on the outer L cells (amplitude ratio -v/w, common practice); a zero-mode pair on one end is not split across the ends', () => {
    const r = bulkBoundary(new BlochHamiltonian(ssh(), { v: 0.5, w: 1 }), { cut: 0, width: 40, edgeLayers: 3 });
    expect(r.ends!.first.modes[0].weight).toBeCloseTo(1 - 0.5 ** 6, 8);
    expect(Math.abs(r.ends!.first.modes[0].energy)).toBeLessThan(1e-10);
    expect(r.ends!.first.modes[0].polarisation).toBeCloseTo(1, 8);
  });

  it('cubic TI: the Dirac points on every cut lie at the surface TRIMs whose two bulk TRIMs have parity product -1 (Fu, Kane & Mele, PRL 98, 106803 (2007)), and the weak (111) surface, normal to nu = (1,1,1), has only unprotected ones', () => {
    for (const M of [2, 6, 10]) {
      const h = new BlochHamiltonian(cubicTI(), { M });
      const z = z2Index(h, { method: 'parity' });
      const delta = (k: number[]) => z.parities!.find((p) => p.k.every((x, i) => Math.abs(Math.abs(x) - Math.abs(k[i])) < 1e-9))!.delta;
      for (const cut of [0, [1, 1, 0], [1, 1, 1]] as (number | number[])[]) {
        const r = bulkBoundary(h, { cut, width: 40 });
        const layers = principalLayers(h, cut);
        const predicted = [[0, 0], [0.5, 0], [0, 0.5], [0.5, 0.5]].filter((f) => {
          const bulk = [0, 1, 2, 3, 4, 5, 6, 7].map((t) => [t & 1, (t >> 1) & 1, (t >> 2) & 1].map((x) => x / 2))
            .filter((k) => layers.basis.slice(0, 2).every((row, i) => Math.abs(((row.reduce((s, x, j) => s + x * k[j], 0) - f[i]) % 1 + 1) % 1) < 1e-9));
          return delta(bulk[0]) * delta(bulk[1]) === -1;
        });
        cones(predicted)(r);
        const weakNormal = M === 6 && Array.isArray(cut) && cut.length === 3 && cut.every((x) => x === 1);
        expect(r.verdict, r.summary).toBe(weakNormal ? 'extra-modes' : 'agree');
        if (weakNormal) expect(r.surfaces!.bottom).toMatchObject({ count: 4, expected: 0, agrees: true, extra: 4 });
      }
    }
  });

  it('the kind runs through compute for 1D and 3D models (the registry lists sublattice)', () => {
    const end = compute({ kind: 'bulk-boundary', model: kitaevChain(), params: { mu: 0.5 }, cut: 0, width: 40 });
    expect(end.kind === 'bulk-boundary' && end.verdict).toBe('agree');
    const surface = compute({ kind: 'bulk-boundary', model: twoBandWeyl(), cut: 0, nk: 64, width: 16 });
    expect(surface.kind === 'bulk-boundary' && surface.verdict).toBe('agree');
    const chiral = compute({ kind: 'bulk-boundary', model: ssh(), cut: 0, sublattice: ['B'] });
    expect(chiral.kind === 'bulk-boundary' && chiral.invariant.value).toBe(-1);
  });

  it('cost grows with the sample for every dimension', () => {
    expect(bulkBoundaryCost(2, { width: 128 }).seconds).toBeGreaterThan(bulkBoundaryCost(2, { width: 64 }).seconds);
    expect(bulkBoundaryCost(4, { width: 48 }, 3).seconds).toBeGreaterThan(bulkBoundaryCost(4, { width: 24 }, 3).seconds);
    expect(bulkBoundaryCost(4, { width: 24, nk: 512 }, 3).seconds).toBeGreaterThan(bulkBoundaryCost(4, { width: 24, nk: 256 }, 3).seconds);
  });
});

/** Orbitals added to the first boundary of an open sample: each its own band, weakly tied to `anchor`. */
function decorate(spec: ModelSpec, labels: string[], anchor: string, hop: (label: string) => ModelSpec['terms']): ModelSpec {
  const s = structuredClone(spec);
  for (const label of labels) {
    s.orbitals.push({ label, position: spec.orbitals[0].position.map(() => 0), layer: 0 });
    s.terms.push({ from: anchor, to: label, cell: spec.terms[0].cell.map(() => 0), amplitude: 0.05 }, ...hop(label));
  }
  return s;
}

describe('decorated boundaries are reported', () => {
  it('SSH trivial chain with a dangling site on its first end: a zero mode where W = 0 allows none, a disagreement (the sublattice imbalance of the end, common practice)', () => {
    const chain = structuredClone(ribbon(ssh(), 0, 64));
    chain.orbitals.push({ label: 'x', position: [0], layer: 0 });
    chain.terms.push({ from: 'A@0', to: 'x', cell: [], amplitude: 1 });
    const r = bulkBoundary(new BlochHamiltonian(ssh(), { v: 1.5 }), { cut: 0, ribbon: chain });
    expect(r.verdict).toBe('disagree');
    expect(r.ends!.first).toMatchObject({ net: -1, expected: 0, agrees: false });
    expect(r.summary).toMatch(/^disagree: W = 0 .*first end: 1 mode \(0 on A, 1 on B\), but W = 0 requires N_A - N_B = 0/);
  });

  it('Kitaev chain with an extra Majorana pair (a decoupled fermion at E = 0) on an end: parity right, reported as extra modes (common practice)', () => {
    const { spec } = openSlab(new BlochHamiltonian(kitaevChain()), 0, 64);
    const chain = structuredClone(spec);
    chain.orbitals.push({ label: 'y.e', position: [0], layer: 0, nambu: 'particle' }, { label: 'y.h', position: [0], layer: 0, nambu: 'hole' });
    const r = bulkBoundary(new BlochHamiltonian(kitaevChain(), { mu: 0.5 }), { cut: 0, ribbon: chain });
    expect(r.verdict).toBe('extra-modes');
    expect(r.ends!.first).toMatchObject({ net: 3, expected: 1, agrees: true, extra: 2 });
  });

  it('strong TI slab with a flat Kramers band added on its bottom surface at E = 0.1 (in the gap at every TRIM): four extra Dirac points, the parity still odd (common practice)', () => {
    const h = new BlochHamiltonian(cubicTI(), { M: 2 });
    const { spec } = openSlab(h, 2, 24);
    const slab = decorate(spec, ['x.up', 'x.dn'], 's.up@0', (label) => [{ from: label, to: label, cell: [0, 0], amplitude: 0.1 }]);
    const r = bulkBoundary(h, { cut: 2, ribbon: slab });
    expect(r.verdict).toBe('extra-modes');
    expect(r.surfaces!.bottom).toMatchObject({ count: 5, expected: 1, agrees: true, extra: 4 });
    expect(r.surfaces!.top).toMatchObject({ count: 1, extra: 0 });
  });

  it('Weyl slab with a trivial band crossing E = 0 on its bottom surface: two extra crossings on each line, net counts unchanged (common practice)', () => {
    const h = new BlochHamiltonian(twoBandWeyl(), {});
    const { spec } = openSlab(h, 0, 24);
    const slab = decorate(spec, ['x'], 'a@0', (label) => [{ from: label, to: label, cell: [1, 0], amplitude: -0.5 }]);
    const r = bulkBoundary(h, { cut: 0, nk: 128, ribbon: slab });
    expect(r.verdict).toBe('extra-modes');
    arcs([0, -1])(r);
    expect(r.surfaces!.bottom.extra).toBe(4);
  });
});

describe('bad input', () => {
  it('errors name the field and value', () => {
    const chain = new BlochHamiltonian(ssh(), {});
    expect(() => bulkBoundary(chain, { cut: 1 })).toThrow(/^cut: expected a periodic direction from 0 to 0.*Value: 1/);
    expect(() => bulkBoundary(chain, { cut: 0, invariant: 'chern' })).toThrow(/^invariant: expected "winding" or "majorana" for a 1D model\. Value: "chern"/);
    expect(() => bulkBoundary(chain, { cut: 0, energy: 0.3 })).toThrow(/^energy: the end modes of a chiral chain are protected at E = 0 only\. Value: 0.3/);
    expect(() => bulkBoundary(chain, { cut: 0, sublattice: ['C'] })).toThrow(/^sublattice\[0\]: unknown orbital "C"/);
    expect(() => bulkBoundary(new BlochHamiltonian(riceMele(), { u: 0.2 }), { cut: 0, invariant: 'winding' })).toThrow(/^sublattice: no chiral/);
    expect(() => bulkBoundary(chain, { cut: 0, ribbon: ribbon(hofstadter(), 1, 4) })).toThrow(/^ribbon: expected a finite chain \(no periodic direction\)/);
    expect(() => bulkBoundary(chain, { cut: 0, width: 1 })).toThrow(/^width: .*Value: 1/);
    // Gapless chains at E = 0 (SSH v = w; Kitaev mu = 2t): no count, an error naming the energy.
    expect(() => bulkBoundary(new BlochHamiltonian(ssh(), { v: 1, w: 1 }), { cut: 0 })).toThrow(/^energy: is not inside a bulk gap: bands 0 and 1 touch at 0\.000 \(the bulk is gapless there\)\. Value: 0/);
    expect(() => bulkBoundary(new BlochHamiltonian(kitaevChain(), { mu: 2 }), { cut: 0 })).toThrow(/^energy: is not inside a bulk gap/);
    const flake = ribbon(ssh(), 0, 4);
    expect(() => bulkBoundary(new BlochHamiltonian(flake, {}), { cut: 0 })).toThrow(/^model: the bulk–boundary check counts the ends of 1D, the edges of 2D and the surfaces of 3D models; this model has 0 periodic directions/);
    const ti = new BlochHamiltonian(cubicTI(), {});
    expect(() => bulkBoundary(ti, { cut: [2, 4, 0] })).toThrow(/^cut: .*common factor 2/);
    expect(() => bulkBoundary(ti, { cut: 3 })).toThrow(/^cut: expected a periodic direction from 0 to 2.*Value: 3/);
    expect(() => bulkBoundary(ti, { cut: 2, invariant: 'chern' })).toThrow(/^invariant: expected "z2" or "weyl" for a 3D model\. Value: "chern"/);
    expect(() => bulkBoundary(ti, { cut: 2, energy: 5 })).toThrow(/^energy: is not inside a bulk gap/);
    expect(() => bulkBoundary(ti, { cut: 2, sublattice: ['s.up'] })).toThrow(/^sublattice: is for 1D chiral chains/);
    expect(() => bulkBoundary(new BlochHamiltonian(twoBandWeyl(), {}), { cut: 0, energy: Infinity })).toThrow(/^energy: expected a finite number\. Value: Infinity/);
  });
});
