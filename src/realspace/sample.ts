/**
 * Disordered finite samples of a periodic model: L1 x L2 (x L3) cells, each direction open (hard
 * wall, terms leaving the sample dropped) or periodic (terms wrap around), as one sparse
 * Hamiltonian with every orbital's cell and position. Built from the compiled model's terms at its
 * parameter values (`BlochHamiltonian.hoppings`), never from H(k).
 *
 * Disorder (all seeded, `random.ts`; one seed gives one sample everywhere):
 * - onsite (Anderson) W: a potential uniform in [-W/2, W/2] per site (a site = the orbitals of one
 *   cell at one position, e.g. both spins of an atom), added to each of its orbitals;
 * - bond B: each bond between two different sites multiplied by (1 + d), d uniform in [-B/2, B/2],
 *   one d per bond, shared by all orbital terms of that bond (so spin partners stay partners);
 * - vacancies f: each site removed with probability f, with all its orbitals and terms;
 * - displacement D: each site moved by a Cartesian vector whose components are uniform in
 *   [-D/2, D/2]. Amplitudes are unchanged (the positions enter the position operators of the
 *   invariants only) unless `decayLength` l is given: then t -> t exp(-(|r'| - |r|)/l), r and r'
 *   the bond's Cartesian vector before and after displacement.
 * - parameter disorder {p: w, ...}: each bond, and each site for the terms within one site, draws
 *   its own value of each named model parameter, uniform in [p - w/2, p + w/2] (p the model's
 *   value), and its terms are evaluated with those values. This is disorder in whatever a
 *   parameter controls: a hopping (v and w of a chiral chain, each with its own width, as in
 *   Mondragon-Shem, Hughes, Song & Prodan, PRL 113, 046802 (2014)), a mass, a flux.
 * Draw order, stated so a reference can reproduce it: sites in cell order (direction 0 fastest),
 * model sites in order, 2 + dim uniforms each (vacancy, potential, displacement components) drawn
 * whatever is enabled; then, when B > 0, bonds in cell order and term order, one uniform per bond
 * on its first appearance (bonds leaving an open sample included). Parameter draws come from the
 * seed's stream 2: bonds and sites in the same order, on first appearance, one uniform per named
 * parameter in name order. So a sample at W and at 2W has the same configuration, scaled.
 */
import type { BlochHamiltonian, Hoppings } from '../bloch/hamiltonian.js';
import type { CostEstimate } from '../cost.js';
import { ModelError, valueText } from '../model/errors.js';
import type { ModelSpec, ParameterValues } from '../model/spec.js';
import { refuseIfTooLarge } from './budget.js';
import { checkSeed, SeededRandom } from './random.js';
import { sparseBytes, TripletList, type SparseMatrix } from './sparse.js';

export type Boundary = 'open' | 'periodic';

/** The options that describe a sample; every real-space diagnostic takes them. */
export interface SampleOptions {
  /** Cells along each periodic direction of the model. */
  sizes: number[];
  /** One boundary for all directions or one per direction; default 'open'. */
  boundary?: Boundary | Boundary[];
  /** Anderson disorder strength W >= 0 (energy). Default 0. */
  onsiteDisorder?: number;
  /** Relative bond disorder B >= 0. Default 0. */
  bondDisorder?: number;
  /** Fraction of sites removed, in [0, 1). Default 0. */
  vacancies?: number;
  /** Width >= 0 of the uniform disorder in each named model parameter, per bond (or site). */
  parameterDisorder?: Record<string, number>;
  /** Width D >= 0 of the uniform displacement per Cartesian component. Default 0. */
  displacement?: number;
  /** Decay length of the hopping law for displaced sites; default: amplitudes unchanged. */
  decayLength?: number;
  /** Nonnegative integer seed; default 0. */
  seed?: number;
}

export interface DisorderDescription {
  seed: number;
  onsite: { width: number; distribution: string };
  bond: { width: number; distribution: string };
  parameters: { widths: Record<string, number>; distribution: string };
  vacancies: { fraction: number; removed: number };
  displacement: { width: number; distribution: string; hoppings: string };
}

export interface Sample {
  /** Orbitals kept. */
  size: number;
  /** Directions (the model's periodic ones). */
  dim: number;
  sizes: number[];
  boundary: Boundary[];
  /** Cell index of each orbital (dim per orbital). */
  cells: Int32Array;
  /** Model orbital index of each orbital. */
  orbitals: Int32Array;
  /** Position in reduced lattice coordinates (cell + orbital position + displacement), dim per orbital. */
  positions: Float64Array;
  /** +1 spin up, -1 spin down, 0 spinless, per orbital. */
  spin: Int8Array;
  /** +1 when the first two lattice vectors are right-handed (a1 x a2 > 0), else -1. */
  orientation: number;
  hamiltonian: SparseMatrix;
  disorder: DisorderDescription;
}

interface Checked {
  sizes: number[];
  boundary: Boundary[];
  onsite: number;
  bond: number;
  /** Disordered parameters in name order, with their widths. */
  parameters: [string, number][];
  vacancies: number;
  displacement: number;
  decayLength: number | null;
  seed: number;
}

function nonnegative(value: unknown, field: string, fallback: number): number {
  if (value === undefined) return fallback;
  if (typeof value !== 'number' || !Number.isFinite(value) || value < 0) throw new ModelError(field, `expected a nonnegative number. Value: ${valueText(value)}`);
  return value;
}

/** Validates the sample options against a model with `dim` periodic directions. */
export function checkSampleOptions(options: SampleOptions, dim: number): Checked {
  if (options === null || typeof options !== 'object') throw new ModelError('options', `expected an object. Value: ${valueText(options)}`);
  if (dim < 1) throw new ModelError('model', 'a real-space sample needs a model with at least one periodic direction');
  const sizes = options.sizes;
  if (!Array.isArray(sizes) || sizes.length !== dim) throw new ModelError('sizes', `expected ${dim} cell counts, one per periodic direction. Value: ${valueText(sizes)}`);
  sizes.forEach((s, i) => {
    if (typeof s !== 'number' || !Number.isInteger(s) || s < 1) throw new ModelError(`sizes[${i}]`, `expected a positive integer number of cells. Value: ${valueText(s)}`);
  });
  const b = options.boundary ?? 'open';
  const boundary = typeof b === 'string' ? new Array<Boundary>(dim).fill(b) : b;
  if (!Array.isArray(boundary) || boundary.length !== dim || boundary.some((x) => x !== 'open' && x !== 'periodic')) {
    throw new ModelError('boundary', `expected "open", "periodic" or one of them per direction (${dim}). Value: ${valueText(b)}`);
  }
  const vacancies = nonnegative(options.vacancies, 'vacancies', 0);
  if (vacancies >= 1) throw new ModelError('vacancies', `expected a fraction in [0, 1). Value: ${valueText(vacancies)}`);
  const decay = options.decayLength;
  if (decay !== undefined && (typeof decay !== 'number' || !(decay > 0) || !Number.isFinite(decay))) {
    throw new ModelError('decayLength', `expected a positive length. Value: ${valueText(decay)}`);
  }
  const widths = options.parameterDisorder ?? {};
  if (widths === null || typeof widths !== 'object' || Array.isArray(widths)) throw new ModelError('parameterDisorder', `expected an object of widths, one per model parameter. Value: ${valueText(widths)}`);
  const parameters = Object.keys(widths).sort().map((name): [string, number] => [name, nonnegative(widths[name], `parameterDisorder.${name}`, 0)]);
  return {
    sizes: [...sizes],
    boundary: [...boundary],
    onsite: nonnegative(options.onsiteDisorder, 'onsiteDisorder', 0),
    bond: nonnegative(options.bondDisorder, 'bondDisorder', 0),
    parameters: parameters.some(([, w]) => w > 0) ? parameters : [],
    vacancies,
    displacement: nonnegative(options.displacement, 'displacement', 0),
    decayLength: decay ?? null,
    seed: checkSeed(options.seed ?? 0),
  };
}

/** Bytes per stored entry while assembling (JavaScript arrays of the triplets, then CSR). */
const ASSEMBLY_BYTES = 64;

/** Memory and time to build a sample of `orbitals` model orbitals and `terms` model terms per cell. */
export function sampleCost(orbitals: number, terms: number, sizes: number[]): CostEstimate {
  const cells = sizes.reduce((a, b) => a * Math.max(1, b), 1);
  const n = cells * orbitals;
  const entries = cells * (2 * terms + orbitals);
  return { bytes: sparseBytes(n, entries) + entries * ASSEMBLY_BYTES + n * 48, seconds: entries * 3e-7 };
}

/** Sites: model orbitals sharing one position. Returns the site of each orbital and the site count. */
function modelSites(spec: ModelSpec): { site: Int32Array; count: number } {
  const keys = new Map<string, number>();
  const site = new Int32Array(spec.orbitals.length);
  spec.orbitals.forEach((o, i) => {
    const key = o.position.join(',');
    if (!keys.has(key)) keys.set(key, keys.size);
    site[i] = keys.get(key)!;
  });
  return { site, count: keys.size };
}

/** Solve the displacement's reduced coordinates: sum_j r_j a_j = delta (lattice vectors square). */
function toReduced(vectors: number[][], dim: number, delta: number[]): number[] {
  // Gaussian elimination on the dim x dim system A^T r = delta.
  const a = Array.from({ length: dim }, (_, i) => [...Array.from({ length: dim }, (_, j) => vectors[j][i]), delta[i]]);
  for (let c = 0; c < dim; c++) {
    let p = c;
    for (let r = c + 1; r < dim; r++) if (Math.abs(a[r][c]) > Math.abs(a[p][c])) p = r;
    [a[c], a[p]] = [a[p], a[c]];
    for (let r = 0; r < dim; r++) {
      if (r === c) continue;
      const f = a[r][c] / a[c][c];
      for (let k = c; k <= dim; k++) a[r][k] -= f * a[c][k];
    }
  }
  return a.map((row, i) => row[dim] / row[i]);
}

function cartesian(vectors: number[][], dim: number, reduced: ArrayLike<number>): number[] {
  const out = new Array<number>(vectors[0].length).fill(0);
  for (let j = 0; j < dim; j++) for (let c = 0; c < out.length; c++) out[c] += reduced[j] * vectors[j][c];
  return out;
}

/** Build the sample described by `options` from the model compiled in `h` at its parameter values. */
export function buildSample(h: BlochHamiltonian, options: SampleOptions): Sample {
  const o = checkSampleOptions(options, h.dim);
  const spec = h.spec;
  refuseIfTooLarge('the sample', o.sizes, (s) => sampleCost(h.size, spec.terms.length, s));
  const dim = h.dim;
  const vectors = spec.vectors;
  if (o.displacement > 0 && vectors[0].length !== dim) {
    throw new ModelError('displacement', `needs lattice vectors with ${dim} Cartesian components (the model's have ${vectors[0].length}). Value: ${o.displacement}`);
  }
  for (const [name] of o.parameters) {
    if (!Object.hasOwn(spec.parameters, name)) {
      const known = Object.keys(spec.parameters);
      throw new ModelError(`parameterDisorder.${name}`, `model "${spec.name}" has no parameter ${JSON.stringify(name)} (it has: ${known.length ? known.join(', ') : 'none'})`);
    }
  }
  const hop = h.hoppings();
  for (let t = 0; t < hop.count; t++) {
    for (let j = dim; j < hop.cellDim; j++) {
      if (hop.cells[t * hop.cellDim + j] !== 0) throw new ModelError(`terms[${t}].cell`, `a term crosses an open direction of the model. Value: ${valueText(Array.from(hop.cells.subarray(t * hop.cellDim, (t + 1) * hop.cellDim)))}`);
    }
  }
  const { site: siteOf, count: sitesPerCell } = modelSites(spec);
  const norb = h.size;
  const cellCount = o.sizes.reduce((a, b) => a * b, 1);
  const stride = o.sizes.map((_, i) => o.sizes.slice(0, i).reduce((a, b) => a * b, 1));
  const cellOf = (index: number, out: number[]) => {
    for (let j = 0; j < dim; j++) out[j] = Math.floor(index / stride[j]) % o.sizes[j];
    return out;
  };

  // Site draws: vacancy, potential, displacement.
  const rng = new SeededRandom(o.seed);
  const totalSites = cellCount * sitesPerCell;
  const vacant = new Uint8Array(totalSites);
  const potential = new Float64Array(totalSites);
  const shift = new Float64Array(totalSites * dim);
  let removed = 0;
  for (let s = 0; s < totalSites; s++) {
    vacant[s] = rng.next() < o.vacancies ? 1 : 0;
    removed += vacant[s];
    potential[s] = rng.centred(o.onsite);
    const delta: number[] = [];
    for (let j = 0; j < dim; j++) delta.push(rng.centred(o.displacement));
    if (o.displacement > 0) shift.set(toReduced(vectors, dim, delta), s * dim);
  }

  // Orbitals kept, numbered in cell order then model order.
  const index = new Int32Array(cellCount * norb).fill(-1);
  let size = 0;
  for (let c = 0; c < cellCount; c++) for (let a = 0; a < norb; a++) if (!vacant[c * sitesPerCell + siteOf[a]]) index[c * norb + a] = size++;
  if (size === 0) throw new ModelError('vacancies', `every site was removed. Value: ${o.vacancies}`);
  const cells = new Int32Array(size * dim);
  const orbitals = new Int32Array(size);
  const positions = new Float64Array(size * dim);
  const spin = new Int8Array(size);
  const cell: number[] = new Array<number>(dim).fill(0);
  const triplets = new TripletList();
  for (let c = 0; c < cellCount; c++) {
    cellOf(c, cell);
    for (let a = 0; a < norb; a++) {
      const i = index[c * norb + a];
      if (i < 0) continue;
      const s = c * sitesPerCell + siteOf[a];
      orbitals[i] = a;
      spin[i] = spec.orbitals[a].spin === 'up' ? 1 : spec.orbitals[a].spin === 'down' ? -1 : 0;
      for (let j = 0; j < dim; j++) {
        cells[i * dim + j] = cell[j];
        positions[i * dim + j] = cell[j] + spec.orbitals[a].position[j] + shift[s * dim + j];
      }
      if (o.onsite > 0) triplets.add(i, i, potential[s], 0);
    }
  }

  addTerms(h, hop, o, { dim, norb, sitesPerCell, siteOf, cellCount, stride, index, shift, vectors, spec }, rng, triplets, cellOf);
  const hamiltonian = triplets.toCsr(size);
  const orientation = dim >= 2 && vectors[0][0] * vectors[1][1] - vectors[0][1] * vectors[1][0] < 0 ? -1 : 1;
  return {
    size, dim, sizes: o.sizes, boundary: o.boundary, cells, orbitals, positions, spin, orientation, hamiltonian,
    disorder: {
      seed: o.seed,
      onsite: { width: o.onsite, distribution: `uniform in [-${o.onsite / 2}, ${o.onsite / 2}] per site, added to each orbital of the site` },
      bond: { width: o.bond, distribution: `each bond times (1 + d), d uniform in [-${o.bond / 2}, ${o.bond / 2}], one d per bond` },
      parameters: {
        widths: Object.fromEntries(o.parameters),
        distribution: o.parameters.length === 0 ? 'none' : `each bond (or site) draws ${o.parameters.map(([p, w]) => `${p} uniform in [${p} - ${w / 2}, ${p} + ${w / 2}]`).join(', ')}, around ${o.parameters.map(([p]) => `${p} = ${h.params[p]}`).join(', ')}`,
      },
      vacancies: { fraction: o.vacancies, removed },
      displacement: {
        width: o.displacement,
        distribution: `each Cartesian component uniform in [-${o.displacement / 2}, ${o.displacement / 2}] per site`,
        hoppings: o.decayLength === null ? 'amplitudes unchanged (positions enter the position operators only)' : `t exp(-(|r'| - |r|)/${o.decayLength}) with r, r' the bond vector before and after`,
      },
    },
  };
}

interface Layout {
  dim: number;
  norb: number;
  sitesPerCell: number;
  siteOf: Int32Array;
  cellCount: number;
  stride: number[];
  index: Int32Array;
  shift: Float64Array;
  vectors: number[][];
  spec: ModelSpec;
}

/** Every term from every cell, wrapped or dropped at the boundary, with bond and parameter disorder and the distance law. */
function addTerms(h: BlochHamiltonian, hop: Hoppings, o: Checked, l: Layout, rng: SeededRandom, triplets: TripletList, cellOf: (i: number, out: number[]) => number[]): void {
  const { dim, norb, sitesPerCell, siteOf } = l;
  const cell = new Array<number>(dim).fill(0);
  const target = new Array<number>(dim).fill(0);
  // One draw per bond (a pair of sites and the cell vector between them), or per site for the
  // terms within a site, on its first appearance.
  const bonds = new Map<string, number>();
  const parameterRng = new SeededRandom(o.seed, 2);
  const bondParameters = new Map<string, ParameterValues>();
  const amplitude = new Float64Array(2);
  for (let c = 0; c < l.cellCount; c++) {
    cellOf(c, cell);
    for (let t = 0; t < hop.count; t++) {
      const a = hop.from[t], b = hop.to[t];
      const R = Array.from(hop.cells.subarray(t * hop.cellDim, t * hop.cellDim + dim));
      let inside = true;
      for (let j = 0; j < dim; j++) {
        let x = cell[j] + R[j];
        if (x < 0 || x >= o.sizes[j]) {
          if (o.boundary[j] === 'open') inside = false;
          x = ((x % o.sizes[j]) + o.sizes[j]) % o.sizes[j];
        }
        target[j] = x;
      }
      let tc = 0;
      for (let j = 0; j < dim; j++) tc += target[j] * l.stride[j];
      const sameSite = siteOf[a] === siteOf[b] && R.every((x) => x === 0);
      const ga = c * sitesPerCell + siteOf[a], gb = tc * sitesPerCell + siteOf[b];
      let key = '';
      if (sameSite) {
        if (o.parameters.length > 0) key = `${ga}`;
      } else if (o.bond > 0 || o.parameters.length > 0) {
        const forward = `${ga}|${gb}|${R.join(',')}`;
        const backward = `${gb}|${ga}|${R.map((x) => -x).join(',')}`;
        key = ga < gb || (ga === gb && forward < backward) ? forward : backward;
      }
      let factor = 1;
      if (!sameSite && o.bond > 0) {
        let d = bonds.get(key);
        if (d === undefined) {
          d = rng.centred(o.bond);
          bonds.set(key, d);
        }
        factor = 1 + d;
      }
      let values: ParameterValues | undefined;
      if (o.parameters.length > 0) {
        values = bondParameters.get(key);
        if (values === undefined) {
          values = { ...h.params };
          for (const [name, width] of o.parameters) values[name] += parameterRng.centred(width);
          bondParameters.set(key, values);
        }
      }
      if (!inside) continue;
      const i = l.index[c * norb + a], k = l.index[tc * norb + b];
      if (i < 0 || k < 0) continue;
      if (o.decayLength !== null && !sameSite) {
        const sa = c * sitesPerCell + siteOf[a], sb = tc * sitesPerCell + siteOf[b];
        const before: number[] = [], after: number[] = [];
        for (let j = 0; j < dim; j++) {
          const d0 = R[j] + l.spec.orbitals[b].position[j] - l.spec.orbitals[a].position[j];
          before.push(d0);
          after.push(d0 + l.shift[sb * dim + j] - l.shift[sa * dim + j]);
        }
        const r0 = Math.hypot(...cartesian(l.vectors, dim, before));
        const r1 = Math.hypot(...cartesian(l.vectors, dim, after));
        factor *= Math.exp(-(r1 - r0) / o.decayLength);
      }
      let re = hop.re[t], im = hop.im[t];
      if (values !== undefined) {
        h.termAmplitude(t, values, amplitude);
        [re, im] = [amplitude[0], amplitude[1]];
      }
      re *= factor;
      im *= factor;
      const onsite = a === b && R.every((x) => x === 0);
      triplets.add(k, i, re, im);
      if (!onsite) triplets.add(i, k, re, -im);
    }
  }
}
