/**
 * Real-space winding number of a chiral chain (Mondragon-Shem, Hughes, Song & Prodan, PRL 113,
 * 046802 (2014)): with the flat-band Hamiltonian Q = 1 - 2P (P the states below E = 0) split by
 * the sublattices, Q_AB and Q_BA,
 *   nu = T( Q_BA [X, Q_AB] ) = (1/N) sum_{i in B, cell(i) in window} sum_{j in A} |Q_ij|^2 (x_j - x_i),
 * T the trace per cell over a window of N cells, X the cell index (the lattice convention, as in
 * src/topology/chiral.ts); on a periodic chain x_j - x_i is the nearest image. The sign is that of
 * the k-space winding of chiral.ts (nu of q = H_BA; checked on the SSH chain in the tests). With
 * disorder nu is an average, not an integer: it is quantised only when the states at E = 0 are
 * localised, which is the paper's point; the nearest integer and the distance to it are reported.
 *
 * Honesty: onsite disorder or any same-sublattice term breaks chiral symmetry (the largest such
 * element is reported, and the winding is null when it is not zero); zero modes (|E| below the
 * tolerance, edge modes of an open chain) are counted.
 */
import type { BlochHamiltonian } from '../bloch/hamiltonian.js';
import type { CostEstimate } from '../cost.js';
import { HermitianEigensolver } from '../linalg/eigh.js';
import { ModelError, valueText } from '../model/errors.js';
import { refuseIfTooLarge } from './budget.js';
import { denseSampleBytes, denseSolveSeconds } from './occupied.js';
import { buildSample, checkSampleOptions, type Boundary, type DisorderDescription, type Sample, type SampleOptions } from './sample.js';
import { toDense } from './sparse.js';

export interface ChainWindingOptions extends SampleOptions {
  /** Orbital labels of sublattice A; default: two-colouring of the model's hopping graph (orbital 0 in A). */
  sublattice?: string[];
  /** Fraction of the chain, centred, that the trace runs over; default 0.5 open, 1 periodic. */
  window?: number;
}

export interface ChainWindingResult {
  kind: 'chain-winding';
  convention: 'lattice';
  /** The trace per cell, or null when chiral symmetry is broken. */
  winding: number | null;
  nearestInteger: number | null;
  sublattices: [string[], string[]];
  /** First and last cell of the window. */
  window: [number, number];
  orbitals: number;
  sizes: number[];
  boundary: Boundary[];
  disorder: DisorderDescription;
  checks: {
    warnings: string[];
    /** Largest |H_ij| between orbitals of the same sublattice (0 with chiral symmetry). */
    chiralBreaking: number;
    /** Smallest |E| of the sample. */
    smallestEnergy: number;
    /** States with |E| within the tolerance (end modes of an open chain). */
    zeroModes: number;
  };
}

/** Two-colour the model orbitals so that every term joins different colours. */
function sublattices(h: BlochHamiltonian, given: string[] | undefined): Uint8Array {
  const labels = h.spec.orbitals.map((o) => o.label);
  const colour = new Uint8Array(h.size);
  if (given !== undefined) {
    if (!Array.isArray(given) || given.length === 0) throw new ModelError('sublattice', `expected a nonempty list of orbital labels. Value: ${valueText(given)}`);
    colour.fill(1);
    for (const g of given) {
      const i = labels.indexOf(g);
      if (i < 0) throw new ModelError('sublattice', `unknown orbital ${valueText(g)}; the model's orbitals are ${valueText(labels)}`);
      colour[i] = 0;
    }
    return colour;
  }
  const hop = h.hoppings();
  const seen = new Int8Array(h.size).fill(-1);
  for (let start = 0; start < h.size; start++) {
    if (seen[start] >= 0) continue;
    seen[start] = 0;
    const stack = [start];
    while (stack.length > 0) {
      const a = stack.pop()!;
      for (let t = 0; t < hop.count; t++) {
        if (Math.hypot(hop.re[t], hop.im[t]) === 0) continue;
        const [x, y] = [hop.from[t], hop.to[t]];
        if (x !== a && y !== a) continue;
        const b = x === a ? y : x;
        if (seen[b] < 0) {
          seen[b] = 1 - seen[a];
          stack.push(b);
        } else if (seen[b] === seen[a]) {
          throw new ModelError('sublattice', `the model's terms join ${labels[a]} and ${labels[b]} of one sublattice: it has no chiral symmetry to two-colour; give the sublattice explicitly`);
        }
      }
    }
  }
  seen.forEach((c, i) => (colour[i] = c));
  return colour;
}

export function chainWindingCost(orbitals: number, options: Pick<SampleOptions, 'sizes'>): CostEstimate {
  const n = (Array.isArray(options.sizes) ? options.sizes : [1]).reduce((a, b) => a * Math.max(1, b), 1) * orbitals;
  return { bytes: denseSampleBytes(n) + 16 * n * n, seconds: denseSolveSeconds(n) + 4e-9 * n ** 3 };
}

export function chainWinding(h: BlochHamiltonian, options: ChainWindingOptions): ChainWindingResult {
  if (h.dim !== 1) throw new ModelError('model', `the chain winding needs a model with one periodic direction; this one has ${h.dim}`);
  const checked = checkSampleOptions(options, 1);
  const periodic = checked.boundary[0] === 'periodic';
  const fraction = options.window ?? (periodic ? 1 : 0.5);
  if (typeof fraction !== 'number' || !(fraction > 0 && fraction <= 1)) throw new ModelError('window', `expected a fraction in (0, 1]. Value: ${valueText(fraction)}`);
  const colour = sublattices(h, options.sublattice);
  refuseIfTooLarge('the chain winding', checked.sizes, (sizes) => chainWindingCost(h.size, { sizes }));
  const sample = buildSample(h, options);
  const labels = h.spec.orbitals.map((o) => o.label);
  const names: [string[], string[]] = [labels.filter((_, i) => colour[i] === 0), labels.filter((_, i) => colour[i] === 1)];
  return { ...windingOfSample(sample, colour, fraction), sublattices: names };
}

function windingOfSample(sample: Sample, colour: Uint8Array, fraction: number): Omit<ChainWindingResult, 'sublattices'> {
  const n = sample.size;
  const L = sample.sizes[0];
  const periodic = sample.boundary[0] === 'periodic';
  const dense = toDense(sample.hamiltonian);
  const side = Uint8Array.from(sample.orbitals, (a) => colour[a]);
  let chiralBreaking = 0, scale = 0;
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
    const x = Math.hypot(dense[2 * (i * n + j)], dense[2 * (i * n + j) + 1]);
    scale = Math.max(scale, x);
    if (side[i] === side[j]) chiralBreaking = Math.max(chiralBreaking, x);
  }
  const values = new Float64Array(n);
  const vectors = new Float64Array(2 * n * n);
  new HermitianEigensolver(n).solve(dense, values, vectors);
  const tol = 1e-9 * Math.max(scale, 1e-300);
  let m = 0, zeroModes = 0, smallest = Infinity;
  for (let k = 0; k < n; k++) {
    if (values[k] < 0) m++;
    if (Math.abs(values[k]) <= tol) zeroModes++;
    smallest = Math.min(smallest, Math.abs(values[k]));
  }
  const first = Math.floor((L * (1 - fraction)) / 2);
  const last = Math.min(L - 1, first + Math.max(1, Math.round(L * fraction)) - 1);
  const warnings: string[] = [];
  const broken = chiralBreaking > tol;
  if (broken) warnings.push(`chiral symmetry is broken (a same-sublattice element of size ${chiralBreaking.toPrecision(3)}, e.g. onsite disorder): no winding is given`);
  if (zeroModes > 0) warnings.push(`${zeroModes} state(s) at zero energy (within ${tol.toExponential(1)})${periodic ? '' : ', end modes of the open chain'}; each counts as filled or empty by the sign of its computed energy`);
  let sum = 0;
  if (!broken) {
    // Q_ij = -2 sum_{k occupied} psi_ik conj(psi_jk) for i != j.
    for (let i = 0; i < n; i++) {
      const ci = sample.cells[i];
      if (side[i] !== 1 || ci < first || ci > last) continue;
      for (let j = 0; j < n; j++) {
        if (side[j] !== 0) continue;
        let re = 0, im = 0;
        for (let k = 0; k < m; k++) {
          const ar = vectors[2 * (i * n + k)], ai = vectors[2 * (i * n + k) + 1];
          const br = vectors[2 * (j * n + k)], bi = -vectors[2 * (j * n + k) + 1];
          re += ar * br - ai * bi;
          im += ar * bi + ai * br;
        }
        let dx = sample.cells[j] - ci;
        if (periodic) dx -= L * Math.round(dx / L);
        sum += 4 * (re * re + im * im) * dx;
      }
    }
  }
  const winding = broken ? null : sum / (last - first + 1);
  return {
    kind: 'chain-winding', convention: 'lattice', winding, nearestInteger: winding === null ? null : Math.round(winding) + 0,
    window: [first, last], orbitals: n, sizes: sample.sizes, boundary: sample.boundary, disorder: sample.disorder,
    checks: { warnings, chiralBreaking, smallestEnergy: smallest, zeroModes },
  };
}
