/**
 * The bulk–boundary check of a 2D model: at an energy in the bulk gap, count the edge modes on each
 * edge of a wide ribbon cut along `cut` from where its bands cross the energy and the signs of their
 * velocities, and compare with the bulk invariant of the bands below that energy, computed (and its
 * gap proven) for the same parameters.
 *
 * - Chern (default for spinless models): the net number of modes moving along +A_1 (right minus
 *   left) on the 'first' edge (layer 0; the sample lies on its +A_2 side) is -o C and on the 'last'
 *   edge +o C, with o = sign(A_1 x A_2) the handedness of the cut's basis (our sign convention,
 *   shared/references.md; checked on QWZ and Haldane in both signs of C).
 * - Z2 (default when the orbitals carry spin): the modes on each edge come in Kramers pairs (a right
 *   mover at k, a left mover at -k); the number of pairs is odd exactly when Z2 = 1.
 * An edge agrees when its count has the invariant's value (net chirality, or pair parity); modes
 * beyond the least number the invariant requires come in trivial pairs (an even number of extra
 * modes, or of extra Kramers pairs): the verdict is then 'extra-modes' and names them.
 */
import { BlochHamiltonian } from '../bloch/hamiltonian.js';
import { checkInterrupt } from '../interrupt.js';
import { ModelError, valueText } from '../model/errors.js';
import type { ModelSpec } from '../model/spec.js';
import { validateModel } from '../model/validate.js';
import { eigh } from '../linalg/eigh.js';
import { BandSampler } from '../spectra/common.js';
import { chernNumber } from '../topology/chern.js';
import { z2Index } from '../topology/z2.js';
import { cutInfo, wholeNumber, type CutInfo } from './common.js';
import { openSlab } from './slab.js';
import { principalLayers, type CutSpec } from './layers.js';

export type BoundaryInvariant = 'chern' | 'z2';

export interface BulkBoundaryOptions {
  /** The edge: a periodic direction to cut open, or Miller indices of the lattice lines. */
  cut: CutSpec;
  /** The energy (default: the middle of the gap between the lower and the upper half of the bands). */
  energy?: number;
  /** 'chern' or 'z2' (default: 'z2' when the model's orbitals carry spin, else 'chern'). */
  invariant?: BoundaryInvariant;
  /** Lattice lines across the ribbon (default 32). */
  width?: number;
  /** Layers counted as each edge (default a tenth of the width, at least 2). */
  edgeLayers?: number;
  /** k-points across the edge zone (default 256). */
  nk?: number;
  /**
   * A ribbon to count on instead of the plain one (a model with `layer` on its orbitals, e.g. the
   * plain ribbon with a decorated edge); the invariant is still the bulk's.
   */
  ribbon?: ModelSpec;
}

export interface EdgeMode {
  /** Where the band crosses the energy, in fractions of the edge's reciprocal vector. */
  k: number;
  /** dE/dk_par (energy per radian of k_par); its sign is the direction along +A_1. */
  velocity: number;
  /** The state's weight on this edge's layers at the crossing. */
  weight: number;
}

export interface EdgeCount {
  modes: EdgeMode[];
  right: number;
  left: number;
  /** right - left. */
  net: number;
  /** Kramers pairs (z2: the number of right movers), or null for chern. */
  pairs: number | null;
  /** What the invariant requires of this edge: the net count (chern) or the pairs' parity (z2). */
  expected: number | null;
  /** The count has the invariant's value. */
  agrees: boolean | null;
  /** Modes beyond the least number the invariant requires (an even number when it agrees). */
  extra: number;
}

export type BoundaryVerdict = 'agree' | 'extra-modes' | 'disagree' | 'undetermined';

export interface BulkBoundaryResult {
  kind: 'bulk-boundary';
  cut: CutInfo;
  energy: number;
  /** The bulk gap the energy lies in: highest band below, lowest band above (sampled). */
  bulkGap: [number, number];
  /** Bulk bands below the energy. */
  bands: number;
  invariant: { kind: BoundaryInvariant; value: number | null; certified: boolean };
  width: number;
  edgeLayers: number;
  edges: { first: EdgeCount; last: EdgeCount };
  /** 'agree': every edge has exactly the modes the invariant requires; 'extra-modes': the invariant's value, with trivial pairs beside; 'disagree': not its value; 'undetermined': no certain invariant, or a mode on neither edge. */
  verdict: BoundaryVerdict;
  /** The verdict in words: the invariant, the count on each edge, what disagrees. */
  summary: string;
  checks: { warnings: string[]; grid: number[] };
}

/** Bulk bands on a uniform grid: for each band, its lowest and highest energy. */
function bulkBandRanges(h: BlochHamiltonian, per: number): { lo: Float64Array; hi: Float64Array } {
  const sampler = new BandSampler(h);
  const n = h.size;
  const lo = new Float64Array(n).fill(Infinity), hi = new Float64Array(n).fill(-Infinity);
  const k = new Float64Array(2);
  for (let a = 0; a < per; a++) {
    checkInterrupt();
    for (let b = 0; b < per; b++) {
      k[0] = -Math.PI + (2 * Math.PI * a) / per;
      k[1] = -Math.PI + (2 * Math.PI * b) / per;
      const e = sampler.solve(k);
      for (let i = 0; i < n; i++) { lo[i] = Math.min(lo[i], e[i]); hi[i] = Math.max(hi[i], e[i]); }
    }
  }
  return { lo, hi };
}

/** Count, on a ribbon, the modes of each edge at `energy` and compare with the bulk invariant. */
export function bulkBoundary(h: BlochHamiltonian, options: BulkBoundaryOptions): BulkBoundaryResult {
  if (options === null || typeof options !== 'object') throw new ModelError('options', `expected {cut, energy, ...}. Value: ${valueText(options)}`);
  if (h.dim !== 2) throw new ModelError('cut', `the bulk–boundary count is made on the edges of 2D models; this model has ${h.dim} periodic directions. Value: ${valueText(options.cut)}`);
  // The plain ribbon along the cut, or the one given (its edges decorated, say) for the same cut.
  const { spec, layers } = options.ribbon === undefined
    ? openSlab(h, options.cut, options.width ?? 32)
    : { spec: validateModel(options.ribbon), layers: principalLayers(h, options.cut) };
  if (spec.periodic !== 1) throw new ModelError('ribbon', `expected a ribbon (one periodic direction). Value: "${spec.name}" with ${spec.periodic}`);
  const ribbonLayers = spec.orbitals.map((o) => o.layer);
  if (ribbonLayers.some((l) => l === undefined)) throw new ModelError('ribbon', `every orbital needs its layer (0 .. width-1), as the ribbon builder sets. Value: "${spec.name}"`);
  const layerCount = Math.max(...(ribbonLayers as number[])) + 1;
  const nk = options.nk === undefined ? 256 : wholeNumber(options.nk, 'nk', 16, 100000);
  const edgeLayers = options.edgeLayers === undefined ? Math.max(2, Math.floor(layerCount / 10)) : wholeNumber(options.edgeLayers, 'edgeLayers', 1, Math.max(1, Math.floor(layerCount / 2)));
  const invariantKind = options.invariant ?? (h.spec.orbitals.some((o) => o.spin !== undefined) ? 'z2' : 'chern');
  if (invariantKind !== 'chern' && invariantKind !== 'z2') throw new ModelError('invariant', `expected "chern" or "z2". Value: ${valueText(invariantKind)}`);

  // The bulk gap the energy lies in, from the bulk bands on a 64 x 64 grid.
  const grid = 64;
  const { lo, hi } = bulkBandRanges(h, grid);
  const n = h.size;
  let energy: number;
  if (options.energy === undefined) {
    const m = Math.floor(n / 2);
    if (n < 2 || lo[m] - hi[m - 1] <= 1e-9 * Math.max(1, hi[n - 1] - lo[0])) throw new ModelError('energy', `the bulk has no gap between bands ${m - 1} and ${m} (they overlap on [${lo[m].toPrecision(4)}, ${hi[m - 1].toPrecision(4)}]); give an energy inside a gap`);
    energy = (hi[m - 1] + lo[m]) / 2;
  } else {
    energy = options.energy;
    if (typeof energy !== 'number' || !Number.isFinite(energy)) throw new ModelError('energy', `expected a finite number. Value: ${valueText(energy)}`);
  }
  const below = hi.filter((x) => x < energy).length;
  const inBand = Array.from(lo).findIndex((l, i) => l <= energy && energy <= hi[i]);
  if (below === 0 || below === n || inBand >= 0) {
    const where = inBand >= 0 ? `bulk band ${inBand} spans [${lo[inBand].toPrecision(4)}, ${hi[inBand].toPrecision(4)}]` : `the bulk bands span [${lo[0].toPrecision(4)}, ${hi[n - 1].toPrecision(4)}]`;
    throw new ModelError('energy', `is not inside a bulk gap: ${where}. Value: ${valueText(energy)}`);
  }
  const bulkGap: [number, number] = [hi[below - 1], lo[below]];

  const warnings: string[] = [];
  let value: number | null, certified: boolean;
  if (invariantKind === 'chern') {
    const c = chernNumber(h, { bands: below });
    value = c.chern;
    certified = c.checks.certified === true;
    warnings.push(...c.checks.warnings.map((w) => `Chern number: ${w}`));
  } else {
    const z = z2Index(h, { bands: below });
    value = z.z2;
    certified = z.checks.certified === true;
    warnings.push(...z.checks.warnings.map((w) => `Z2: ${w}`));
  }

  const onFirst = Uint8Array.from(ribbonLayers as number[], (l) => (l < edgeLayers ? 1 : 0));
  const onLast = Uint8Array.from(ribbonLayers as number[], (l) => (l >= layerCount - edgeLayers ? 1 : 0));
  // Modes are followed by their eigenvectors, never by sorted bands: where two modes cross at the
  // energy (the two edges' modes at E = 0 of a symmetric ribbon, a Kramers pair at its Dirac point)
  // sorted bands kink and no band crosses. Inside the window, well within the bulk gap, every state
  // is an edge state; each is given to the edge holding most of it, and matched to the state of
  // largest overlap at the next k. A matched pair on either side of the energy is a crossing.
  const windowLo = energy - 0.8 * (energy - bulkGap[0]), windowHi = energy + 0.8 * (bulkGap[1] - energy);
  const sampler = new BandSampler(new BlochHamiltonian(spec, h.params));
  const nb = sampler.bandCount;
  const k = new Float64Array(1);
  const dk = (2 * Math.PI) / nk;
  // States closer than this in energy are one level: any basis of it is as good, so the one that
  // splits it between the edges is taken.
  const degenerate = 1e-9 * Math.max(1, Math.abs(bulkGap[0]), Math.abs(bulkGap[1]));
  const samples: WindowState[][] = [];
  let stray = 0;
  for (let p = 0; p < nk; p++) {
    checkInterrupt();
    // Half a step off the symmetric points, where modes cross by symmetry.
    k[0] = -Math.PI + dk * (p + 0.5);
    const e = sampler.solveWithVectors(k);
    const v = sampler.vectors;
    const here: WindowState[] = [];
    for (let b = 0; b < nb; b++) {
      if (e[b] <= windowLo || e[b] >= windowHi) continue;
      const vector = new Float64Array(2 * nb);
      for (let row = 0; row < nb; row++) [vector[2 * row], vector[2 * row + 1]] = [v[2 * (row * nb + b)], v[2 * (row * nb + b) + 1]];
      here.push({ e: e[b], edge: -1, weight: 0, weights: [0, 0], vector });
    }
    localiseDegenerate(here, onFirst, degenerate);
    for (const state of here) {
      let wf = 0, wl = 0;
      for (let row = 0; row < nb; row++) {
        const w = state.vector[2 * row] ** 2 + state.vector[2 * row + 1] ** 2;
        if (onFirst[row]) wf += w;
        if (onLast[row]) wl += w;
      }
      state.edge = wf >= 0.5 && wf >= wl ? 0 : wl >= 0.5 ? 1 : -1;
      state.weight = Math.max(wf, wl);
      state.weights = [wf, wl];
    }
    samples.push(here);
  }
  const overlap = (x: Float64Array, y: Float64Array): number => {
    let re = 0, im = 0;
    for (let i = 0; i < x.length; i += 2) {
      re += x[i] * y[i] + x[i + 1] * y[i + 1];
      im += x[i] * y[i + 1] - x[i + 1] * y[i];
    }
    return re * re + im * im;
  };
  const first: EdgeMode[] = [], last: EdgeMode[] = [];
  for (let p = 0; p < nk; p++) {
    const next = samples[(p + 1) % nk];
    for (const a of samples[p]) {
      let best: WindowState | null = null, bestOverlap = 0.5;
      for (const b of next) {
        const o = overlap(a.vector, b.vector);
        if (o > bestOverlap) [best, bestOverlap] = [b, o];
      }
      if (best === null || (a.e < energy) === (best.e < energy)) continue;
      const t = (energy - a.e) / (best.e - a.e);
      if (a.edge < 0 || best.edge !== a.edge) {
        stray++;
        if (stray <= 3) warnings.push(`a state crossing the energy at k = ${((-Math.PI + dk * (p + 0.5 + t)) / (2 * Math.PI)).toFixed(4)} x 2pi lies on neither edge (weights ${a.weights[0].toFixed(2)} and ${a.weights[1].toFixed(2)} on the outer ${edgeLayers} layers of each): the ribbon may be too narrow for its edge modes`);
        continue;
      }
      const mode: EdgeMode = { k: (-Math.PI + dk * (p + 0.5 + t)) / (2 * Math.PI), velocity: (best.e - a.e) / dk, weight: Math.min(a.weight, best.weight) };
      (a.edge === 0 ? first : last).push(mode);
    }
  }
  const orientation = Math.sign(handedness(h, layers.basis));
  const count = (modes: EdgeMode[], sign: number): EdgeCount => {
    const right = modes.filter((m) => m.velocity > 0).length, left = modes.length - right;
    const net = right - left;
    if (value === null) return { modes, right, left, net, pairs: invariantKind === 'z2' ? right : null, expected: null, agrees: null, extra: 0 };
    if (invariantKind === 'chern') {
      const expected = sign * orientation * value + 0;
      return { modes, right, left, net, pairs: null, expected, agrees: net === expected, extra: modes.length - Math.abs(expected) };
    }
    const pairs = right;
    if (right !== left) warnings.push(`an edge has ${right} right and ${left} left movers: they are not Kramers pairs, so the ribbon does not look time-reversal symmetric`);
    return { modes, right, left, net, pairs, expected: value, agrees: right === left && pairs % 2 === value, extra: 2 * (pairs - value) };
  };
  const edges = { first: count(first, -1), last: count(last, 1) };
  let verdict: BoundaryVerdict;
  if (value === null || stray > 0) verdict = 'undetermined';
  else if (!edges.first.agrees || !edges.last.agrees) verdict = 'disagree';
  else if (edges.first.extra > 0 || edges.last.extra > 0) verdict = 'extra-modes';
  else verdict = 'agree';
  return {
    kind: 'bulk-boundary',
    cut: cutInfo(layers),
    energy,
    bulkGap,
    bands: below,
    invariant: { kind: invariantKind, value, certified },
    width: layerCount,
    edgeLayers,
    edges,
    verdict,
    summary: summarise(invariantKind, value, energy, edges, verdict, stray),
    checks: { warnings, grid: [grid, grid] },
  };
}

interface WindowState { e: number; edge: number; weight: number; weights: [number, number]; vector: Float64Array }

/**
 * Within each degenerate level (energies closer than `tolerance`), rotate the states to the
 * eigenvectors of the first edge's projector, so that a level shared by the two edges (their modes
 * at one k and energy) is split into a state on each edge instead of an arbitrary mixture.
 */
function localiseDegenerate(states: WindowState[], onFirst: Uint8Array, tolerance: number): void {
  for (let i = 0; i < states.length;) {
    let j = i + 1;
    while (j < states.length && states[j].e - states[j - 1].e < tolerance) j++;
    const m = j - i;
    if (m > 1) {
      const p = new Float64Array(2 * m * m);
      for (let a = 0; a < m; a++) {
        for (let b = 0; b < m; b++) {
          const x = states[i + a].vector, y = states[i + b].vector;
          let re = 0, im = 0;
          for (let r = 0; r < onFirst.length; r++) {
            if (!onFirst[r]) continue;
            re += x[2 * r] * y[2 * r] + x[2 * r + 1] * y[2 * r + 1];
            im += x[2 * r] * y[2 * r + 1] - x[2 * r + 1] * y[2 * r];
          }
          p[2 * (a * m + b)] = re;
          p[2 * (a * m + b) + 1] = im;
        }
      }
      const { vectors: c } = eigh(m, p);
      const old = states.slice(i, j).map((s) => s.vector);
      for (let a = 0; a < m; a++) {
        const out = new Float64Array(old[0].length);
        for (let b = 0; b < m; b++) {
          const cr = c[2 * (b * m + a)], ci = c[2 * (b * m + a) + 1];
          const x = old[b];
          for (let r = 0; r < out.length; r += 2) {
            out[r] += cr * x[r] - ci * x[r + 1];
            out[r + 1] += cr * x[r + 1] + ci * x[r];
          }
        }
        states[i + a].vector = out;
      }
    }
    i = j;
  }
}

/** sign(A_1 x A_2) of the cut's basis in Cartesian coordinates. */
function handedness(h: BlochHamiltonian, basis: number[][]): number {
  const a = h.spec.vectors;
  const cart = basis.map((row) => a[0].map((_, c) => row.reduce((s, x, j) => s + x * a[j][c], 0)));
  return cart[0][0] * cart[1][1] - cart[0][1] * cart[1][0];
}

function summarise(kind: BoundaryInvariant, value: number | null, energy: number, edges: { first: EdgeCount; last: EdgeCount }, verdict: BoundaryVerdict, stray: number): string {
  const name = kind === 'chern' ? 'C' : 'Z2';
  const describe = (label: string, e: EdgeCount): string => {
    const modes = `${e.modes.length} mode${e.modes.length === 1 ? '' : 's'} (${e.right} right, ${e.left} left${e.pairs !== null ? `, ${e.pairs} Kramers pair${e.pairs === 1 ? '' : 's'}` : ''})`;
    if (e.agrees === null) return `${label} edge: ${modes}`;
    const need = kind === 'chern' ? `net ${e.expected}` : `an ${e.expected === 1 ? 'odd' : 'even'} number of pairs`;
    if (!e.agrees) return `${label} edge: ${modes}, but ${name} = ${value} requires ${need}`;
    if (e.extra > 0) return `${label} edge: ${modes}: ${need} as ${name} = ${value} requires, plus ${e.extra} extra modes in trivial pairs (an even number${kind === 'z2' ? ` of modes, ${e.extra / 2} extra Kramers pairs` : ''}), allowed but not protected by the invariant`;
    return `${label} edge: ${modes}, as ${name} = ${value} requires`;
  };
  const head = verdict === 'undetermined'
    ? value === null ? `undetermined: the bulk ${name} is not certain at these parameters` : `undetermined: ${stray} crossing${stray === 1 ? '' : 's'} on neither edge`
    : verdict === 'agree' ? `agree: ${name} = ${value}` : verdict === 'extra-modes' ? `disagree in number, agree in ${kind === 'chern' ? 'net chirality' : 'parity'}: ${name} = ${value}` : `disagree: ${name} = ${value}`;
  return `${head} at E = ${energy.toPrecision(4)}; ${describe('first', edges.first)}; ${describe('last', edges.last)}`;
}

/** Memory and time of a bulk–boundary check before it runs (n: the model's orbitals). */
export function bulkBoundaryCost(n: number, options: Partial<BulkBoundaryOptions>): { bytes: number; seconds: number } {
  const width = typeof options.width === 'number' && options.width >= 1 ? options.width : 32;
  const nk = typeof options.nk === 'number' && options.nk >= 1 ? options.nk : 256;
  const big = n * width;
  const solve = (m: number): number => 4e-6 + 1.5e-7 * m ** 2 + 4e-9 * m ** 3;
  // The ribbon's bands, the bulk's 64 x 64 grid, and the invariant (a few thousand bulk solves).
  return { bytes: 8 * 16 * big * big + nk * big * 8, seconds: (nk + 16) * solve(big) + (64 * 64 + 4000) * solve(n) };
}
