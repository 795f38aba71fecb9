/**
 * Z2 indices of time-reversal-symmetric insulators, three ways:
 * - 'flow': hybrid Wannier centres over half the zone (k1 from 0 to pi, Wilson loops along k2);
 *   Z2 is the parity of the number of centres that jump over the largest-gap line between
 *   neighbouring k1 (crossings counted on the circle, so the parity cannot flip when the line
 *   jumps between 0 and 1). Grids are refined until two successive ones agree with every link sound.
 * - 'parity': Fu–Kane, (-1)^nu = product over time-reversal-invariant momenta of
 *   delta_i = product of the inversion eigenvalues of one member of each occupied Kramers pair
 *   (Fu & Kane, PRB 76, 045302 (2007)).
 * - spin Chern number when S_z is conserved (orbitals' spin tags): (C_up - C_down)/2.
 * In 3D, the six planes k_i = 0, pi give the strong index nu0 and the weak indices nu_i = z(k_i = pi).
 */
import { BlochHamiltonian } from '../bloch/hamiltonian.js';
import { checkInterrupt } from '../interrupt.js';
import { HermitianEigensolver } from '../linalg/eigh.js';
import { ModelError, valueText } from '../model/errors.js';
import type { ModelSpec } from '../model/spec.js';
import { chernNumber, type ChernOptions, type ChernResult } from './chern.js';
import { certifyGap, type GapCertificate } from '../spectra/certify.js';
import { certificateChecks } from './checks.js';
import {
  bandGroup, bisectLines, compileSource, formatK, FRAME_MEMORY, FrameSampler, resolvePlane, uniformLines,
  type BandGroup, type TopologyChecks, type TopologyOptions, type TopologySource,
} from './common.js';
import { crossingsBetween, largestGap, WilsonColumns } from './wilson.js';

/**
 * Link modulus below which a Z2 flow grid is refined: frames turning by more than about 120 degrees
 * between neighbouring k. (Looser than the drawing limit: only the crossing parity has to be right,
 * and it must also agree between two successive grids.)
 */
export const Z2_LINK = 0.5;

export type Z2Method = 'flow' | 'parity';

/** A matrix entry: real, or complex. */
export type MatrixEntry = number | { re: number; im: number };

export interface Z2Options extends TopologyOptions {
  method?: Z2Method;
  /** Flow: [points along each Wilson loop, steps over half the zone], or 'auto' (default). */
  grid?: [number, number] | number | 'auto';
  /** Flow, 'auto': largest number of points along a loop. Default 512. */
  maxGrid?: number;
  /**
   * Parity: the inversion operator on the orbitals, with H(-k) = P H(k) P^dagger in the 'lattice'
   * convention. Default: detected when the model has orbital parities (every orbital on an
   * inversion centre, each term even or odd in k).
   */
  inversion?: MatrixEntry[][];
}

export interface Z2Checks extends TopologyChecks {
  coarse?: boolean;
  converged?: boolean;
}

/** One time-reversal-invariant plane's flow count. */
export interface Z2Plane {
  normal?: number;
  at?: number;
  z2: number | null;
  crossings: number;
  grid: [number, number];
}

export interface Z2Result {
  kind: 'z2';
  method: Z2Method;
  bands: [number, number];
  /** The Z2 index (2D) or the strong index nu0 (3D); null when gapless or unresolved. */
  z2: number | null;
  /** 3D: the weak indices (nu1, nu2, nu3) = z(k_i = pi). */
  weak?: (number | null)[];
  /** Flow: the per-plane counts (one plane in 2D, six in 3D). */
  planes?: Z2Plane[];
  /** Parity: delta_i at each TRIM (fractions of the reciprocal vectors). */
  parities?: { k: number[]; delta: number }[];
  /** The inversion operator used (parity), as detected or given. */
  inversion?: 'given' | 'orbital parities';
  checks: Z2Checks;
}

interface FlowCount {
  crossings: number;
  minLinkAlong: number;
  minLinkAcross: number;
  unpaired: boolean;
}

/** Kramers partners at a time-reversal-invariant k1 are degenerate: true when the centres are not in pairs. */
function unpairedCentres(c: Float64Array): boolean {
  if (c.length % 2 === 1) return true;
  for (let j = 0; j + 1 < c.length; j += 2) if (Math.min(Math.abs(c[j + 1] - c[j]), 1 - Math.abs(c[j + 1] - c[j])) > 1e-4) return true;
  return false;
}

/**
 * Crossings of the largest-gap line over k1 in [0, pi] (nHalf steps), loops along the plane's second
 * axis: the count on a uniform grid as sampled, with no gap proof (explicit grids, and the bench's
 * baseline).
 */
export function flowCrossings(sampler: FrameSampler, plane: ReturnType<typeof resolvePlane>, nAlong: number, nHalf: number): FlowCount {
  const cols = new WilsonColumns(sampler, plane, uniformLines(nAlong));
  let crossings = 0;
  let zPrev = 0;
  let unpaired = false;
  for (let i = 0; i <= nHalf; i++) {
    checkInterrupt();
    cols.column((Math.PI * i) / nHalf);
    const z = largestGap(cols.centres).mid;
    if (i > 0) crossings += crossingsBetween(zPrev, z, cols.centres);
    zPrev = z;
    if ((i === 0 || i === nHalf) && unpairedCentres(cols.centres)) unpaired = true;
  }
  return { crossings, minLinkAlong: Math.min(1, cols.minLinkAlong), minLinkAcross: Math.min(1, cols.minLinkAcross), unpaired };
}

/** Largest distance a centre moves between two sorted sets on the circle, under the best cyclic matching. */
export function centreDisplacement(a: Float64Array, b: Float64Array): number {
  const m = a.length;
  let best = Infinity;
  for (let s = 0; s < m; s++) {
    let worst = 0;
    for (let i = 0; i < m; i++) {
      const d = Math.abs(a[i] - b[(i + s) % m]);
      worst = Math.max(worst, Math.min(d, 1 - d));
    }
    best = Math.min(best, worst);
  }
  return best;
}

/**
 * `lines` together with their mirror images k -> -k (within [-pi, pi)): a loop sampled symmetrically
 * keeps the Kramers degeneracy of the discrete Wilson loop at time-reversal-invariant k1 exact.
 */
function mirrored(lines: Float64Array): Float64Array {
  const all = [...lines, ...Array.from(lines, (y) => (y === -Math.PI ? -Math.PI : -y))].sort((a, b) => a - b);
  return Float64Array.from(all.filter((y, i) => i === 0 || y - all[i - 1] > 1e-12));
}

/** Link modulus below which an automatic flow grid bisects that link: frames turning by more than about 45 degrees. */
export const CERTAIN_LINK = 0.7;

/**
 * The flow of one time-reversal-invariant plane on an automatic grid. The gap is proven over the
 * half plane k1 in [0, pi] first; the Wilson loops then run on the certificate's lines (dense where
 * the gap is small), bisecting every link along a loop whose modulus is below CERTAIN_LINK and
 * every step in k1 across which a centre moves more than a quarter of the largest gap between
 * centres (the line the crossings are counted against stays clear of every centre), until none
 * does. Null crossings with a reason when the gap is not proven or the refinement runs out.
 */
function certifiedFlow(
  h: BlochHamiltonian, group: BandGroup, plane: ReturnType<typeof resolvePlane>, tolerance: number | undefined, maxGrid: number,
): { cert: GapCertificate; count: Pick<FlowCount, 'crossings' | 'unpaired'> | null; lines: [number, number]; failure?: string } {
  // The loops run on the gap proof's own lines: the frames solved for the proof are kept. The proof
  // starts coarse (8 lines per axis): it adds lines only where the gap needs them, and the flow's own
  // condition below refines further (Kane–Mele at lambda_v 0.1: 300 solves instead of 440 from 16).
  const sampler = new FrameSampler(h, group).remember(FRAME_MEMORY);
  const cert = certifyGap(h, group, { axes: plane.axes, origin: plane.origin, ranges: [[0, Math.PI], [-Math.PI, Math.PI]] }, {
    tolerance, start: 8, maxLines: maxGrid, solve: (k) => sampler.sample(k, undefined, 0, false),
  });
  let xs = cert.positions[0];
  let ys = mirrored(cert.positions[1].subarray(0, -1));
  const lines = (): [number, number] => [ys.length, xs.length - 1];
  if (cert.verdict !== 'gapped') return { cert, count: null, lines: lines() };
  for (;;) {
    const cols = new WilsonColumns(sampler, plane, ys);
    const centres: Float64Array[] = [];
    for (const x of xs) {
      checkInterrupt();
      cols.restart();
      cols.column(x);
      centres.push(Float64Array.from(cols.centres));
    }
    const badAlong = Uint8Array.from(cols.linkAlong, (mod) => (mod < CERTAIN_LINK ? 1 : 0));
    const badAcross = new Uint8Array(xs.length);
    let bad = badAlong.reduce((a, b) => a + b, 0);
    for (let i = 0; i + 1 < xs.length; i++) {
      const clear = Math.min(largestGap(centres[i]).gap, largestGap(centres[i + 1]).gap) / 4;
      if (centreDisplacement(centres[i], centres[i + 1]) > clear) {
        badAcross[i] = 1;
        bad++;
      }
    }
    if (bad === 0) {
      let crossings = 0;
      for (let i = 1; i < xs.length; i++) crossings += crossingsBetween(largestGap(centres[i - 1]).mid, largestGap(centres[i]).mid, centres[i]);
      const unpaired = unpairedCentres(centres[0]) || unpairedCentres(centres[xs.length - 1]);
      return { cert, count: { crossings, unpaired }, lines: lines() };
    }
    ys = mirrored(bisectLines(ys, badAlong, Math.PI));
    badAcross[xs.length - 1] = 0;
    xs = bisectLines(xs, badAcross, Math.PI);
    if (ys.length > maxGrid || xs.length > maxGrid + 1) {
      return { cert, count: null, lines: lines(), failure: `more than ${maxGrid} lines (maxGrid) would be needed: ${bad} links or k1 steps still turn too far` };
    }
  }
}

function z2Flow(h: BlochHamiltonian, group: BandGroup, options: Z2Options): Z2Result {
  const planes = h.dim === 2 ? [undefined] : [0, 1, 2].flatMap((normal) => [{ normal, at: 0 }, { normal, at: Math.PI }]);
  const grid = options.grid ?? 'auto';
  const maxGrid = options.maxGrid ?? 512;
  if (!Number.isInteger(maxGrid) || maxGrid < 16) throw new ModelError('maxGrid', `expected a whole number of at least 16. Value: ${valueText(maxGrid)}`);
  const results: Z2Plane[] = [];
  const warnings: string[] = [];
  let coarse = false;
  let converged = true;
  let unpaired = false;
  const certs: GapCertificate[] = [];
  for (const spec of planes) {
    const plane = resolvePlane(h.dim, spec);
    const where = spec === undefined ? '' : ` (plane k${spec.normal + 1} = ${spec.at === 0 ? '0' : 'pi'})`;
    let count: Pick<FlowCount, 'crossings' | 'unpaired'> | null;
    let used: [number, number];
    let cert: GapCertificate;
    if (grid !== 'auto') {
      const [nAlong, nHalf] = typeof grid === 'number' ? [grid, Math.max(2, Math.round(grid / 2))] : grid;
      if (![nAlong, nHalf].every((x) => Number.isInteger(x) && x >= 3 && x <= 100_000)) throw new ModelError('grid', `expected whole numbers of k-points from 3 to 100000, or "auto". Value: ${valueText(grid)}`);
      cert = certifyGap(h, group, { axes: plane.axes, origin: plane.origin, ranges: [[0, Math.PI], [-Math.PI, Math.PI]] }, { tolerance: options.gapTolerance });
      const sampled = cert.verdict === 'gapped' ? flowCrossings(new FrameSampler(h, group), plane, nAlong, nHalf) : null;
      count = sampled;
      used = [nAlong, nHalf];
      if (sampled !== null && (sampled.minLinkAlong < Z2_LINK || sampled.minLinkAcross < Z2_LINK)) {
        coarse = true;
        warnings.push(`grid ${nAlong}x${nHalf}${where} is too coarse to trust: smallest link modulus along ${sampled.minLinkAlong.toFixed(3)}, across ${sampled.minLinkAcross.toFixed(3)} (limit ${Z2_LINK})`);
      }
    } else {
      const flow = certifiedFlow(h, group, plane, options.gapTolerance, maxGrid);
      ({ cert, count } = flow);
      used = flow.lines;
      if (flow.failure !== undefined) {
        converged = false;
        warnings.push(`no certain Z2${where}: ${flow.failure}`);
      }
    }
    certs.push(cert);
    if (count?.unpaired) {
      unpaired = true;
      warnings.push(`Wannier centres at a time-reversal-invariant momentum${where} are not in Kramers pairs: the model does not look time-reversal symmetric, so Z2 is not defined by this count`);
    }
    results.push({ ...(spec ?? {}), z2: count === null ? null : count.crossings % 2, crossings: count?.crossings ?? 0, grid: used });
  }
  // The plane whose gap failed, or else the one with the smallest gap, speaks for the checks.
  const reported = certs.find((c) => c.verdict !== 'gapped') ?? certs.reduce((a, b) => (b.minGap < a.minGap ? b : a));
  const checks: Z2Checks = certificateChecks(reported, group, results[results.length - 1].grid, 'the Z2 index');
  checks.warnings.push(...warnings);
  if (coarse) checks.coarse = true;
  if (grid === 'auto') checks.converged = converged;
  const ok = reported.verdict === 'gapped' && converged && !unpaired && results.every((r) => r.z2 !== null);
  checks.certified = ok && grid === 'auto';
  for (const r of results) if (!ok) r.z2 = null;
  const base = { kind: 'z2' as const, method: 'flow' as const, bands: [group.lo, group.hi] as [number, number], planes: results, checks };
  if (h.dim === 2) return { ...base, z2: results[0].z2 };
  // planes: [k1=0, k1=pi, k2=0, k2=pi, k3=0, k3=pi]
  const z = results.map((r) => r.z2);
  const strongs = [0, 1, 2].map((i) => (z[2 * i] === null || z[2 * i + 1] === null ? null : (z[2 * i]! + z[2 * i + 1]!) % 2));
  if (ok && !(strongs[0] === strongs[1] && strongs[1] === strongs[2])) {
    checks.warnings.push(`the strong index differs between directions (${strongs.join(', ')}): the planes disagree, so nu0 is not reported`);
  }
  const strong = ok && strongs[0] === strongs[1] && strongs[1] === strongs[2] ? strongs[0] : null;
  return { ...base, z2: strong, weak: [z[1], z[3], z[5]] };
}

/** The inversion operator as an interleaved complex matrix, checked for size. */
function inversionMatrix(p: MatrixEntry[][], n: number): Float64Array {
  if (!Array.isArray(p) || p.length !== n) throw new ModelError('inversion', `expected a ${n} x ${n} matrix (one row per orbital). Value: ${valueText(p)}`);
  const out = new Float64Array(2 * n * n);
  p.forEach((row, i) => {
    if (!Array.isArray(row) || row.length !== n) throw new ModelError(`inversion[${i}]`, `expected ${n} entries. Value: ${valueText(row)}`);
    row.forEach((x, j) => {
      if (typeof x === 'number' && Number.isFinite(x)) out[2 * (i * n + j)] = x;
      else if (x !== null && typeof x === 'object' && Number.isFinite(x.re) && Number.isFinite(x.im)) {
        out[2 * (i * n + j)] = x.re;
        out[2 * (i * n + j) + 1] = x.im;
      } else throw new ModelError(`inversion[${i}][${j}]`, `expected a number or {re, im}. Value: ${valueText(x)}`);
    });
  });
  return out;
}

/** Largest |(P A P^dagger - B)_ij|. */
function conjugationError(n: number, p: Float64Array, a: Float64Array, b: Float64Array): number {
  let worst = 0;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      let re = 0, im = 0;
      for (let x = 0; x < n; x++) {
        for (let y = 0; y < n; y++) {
          // P_ix A_xy conj(P_jy)
          const pr = p[2 * (i * n + x)], pi = p[2 * (i * n + x) + 1];
          const ar = a[2 * (x * n + y)], ai = a[2 * (x * n + y) + 1];
          const qr = p[2 * (j * n + y)], qi = -p[2 * (j * n + y) + 1];
          const tr = pr * ar - pi * ai, ti = pr * ai + pi * ar;
          re += tr * qr - ti * qi;
          im += tr * qi + ti * qr;
        }
      }
      worst = Math.max(worst, Math.hypot(re - b[2 * (i * n + j)], im - b[2 * (i * n + j) + 1]));
    }
  }
  return worst;
}

const PROBES = [[0.31, -1.17, 0.73], [2.03, 0.41, -2.6], [-0.87, 2.71, 1.3]];

/**
 * Orbital parities: P = diag(s_a), s_a = ±1, when every matrix element H_ab(k) is even or odd in k
 * (then s_a s_b is its parity); found by two-colouring the graph of odd elements. Null if none fits.
 */
function detectOrbitalParities(h: BlochHamiltonian): Float64Array | null {
  const n = h.size, dim = h.dim;
  const plus = new Float64Array(2 * n * n), minus = new Float64Array(2 * n * n);
  const parity = new Int8Array(n * n); // 0 unknown/zero, +1 even, -1 odd, 2 neither
  for (const probe of PROBES) {
    const k = probe.slice(0, dim);
    h.fill(k, plus);
    h.fill(k.map((x) => -x), minus);
    const scale = Math.max(1e-300, ...Array.from(plus, Math.abs));
    for (let e = 0; e < n * n; e++) {
      const ar = plus[2 * e], ai = plus[2 * e + 1], br = minus[2 * e], bi = minus[2 * e + 1];
      if (Math.hypot(ar, ai) < 1e-12 * scale && Math.hypot(br, bi) < 1e-12 * scale) continue;
      const even = Math.hypot(ar - br, ai - bi) < 1e-10 * scale;
      const odd = Math.hypot(ar + br, ai + bi) < 1e-10 * scale;
      const got = even ? 1 : odd ? -1 : 2;
      if (parity[e] === 0) parity[e] = got;
      else if (parity[e] !== got) parity[e] = 2;
    }
  }
  const sign = new Int8Array(n);
  for (let start = 0; start < n; start++) {
    if (sign[start] !== 0) continue;
    sign[start] = 1;
    const stack = [start];
    while (stack.length > 0) {
      const a = stack.pop()!;
      for (let b = 0; b < n; b++) {
        const p = parity[a * n + b];
        if (p === 0) continue;
        if (p === 2) return null;
        const want = (sign[a] * p) as 1 | -1;
        if (sign[b] === 0) {
          sign[b] = want;
          stack.push(b);
        } else if (sign[b] !== want) return null;
      }
    }
  }
  const out = new Float64Array(2 * n * n);
  for (let a = 0; a < n; a++) out[2 * (a * n + a)] = sign[a];
  return out;
}

function z2Parity(source: BlochHamiltonian, group: BandGroup, options: Z2Options): Z2Result {
  // The inversion operator is defined in the lattice convention.
  const h = source.convention === 'lattice' ? source : new BlochHamiltonian(source.spec, source.params, { convention: 'lattice' });
  const n = h.size, dim = h.dim;
  let p: Float64Array;
  let origin: 'given' | 'orbital parities';
  if (options.inversion !== undefined) {
    p = inversionMatrix(options.inversion, n);
    origin = 'given';
  } else {
    const found = detectOrbitalParities(h);
    if (found === null) throw new ModelError('inversion', 'no inversion operator given, and the model has no orbital parities (some H_ab(k) is neither even nor odd in k); pass inversion: P with H(-k) = P H(k) P^dagger (lattice convention)');
    p = found;
    origin = 'orbital parities';
  }
  const a = new Float64Array(2 * n * n), b = new Float64Array(2 * n * n);
  for (const probe of PROBES) {
    const k = probe.slice(0, dim);
    h.fill(k, a);
    h.fill(k.map((x) => -x), b);
    const err = conjugationError(n, p, a, b);
    const scale = Math.max(1, ...Array.from(a, Math.abs));
    if (err > 1e-8 * scale) throw new ModelError('inversion', `H(-k) != P H(k) P^dagger at k = ${formatK(k)} (largest difference ${err.toExponential(2)}): not an inversion symmetry of this model`);
  }
  const sampler = new FrameSampler(h, group);
  const m = sampler.m;
  const frame = new Float64Array(sampler.frameLength);
  const proj = new Float64Array(2 * m * m);
  const vals = new Float64Array(m);
  const solver = new HermitianEigensolver(m);
  const parities: { k: number[]; delta: number }[] = [];
  const warnings: string[] = [];
  let product = 1;
  const weakProducts = [1, 1, 1];
  for (let t = 0; t < 1 << dim; t++) {
    const k = Array.from({ length: dim }, (_, i) => ((t >> i) & 1 ? Math.PI : 0));
    sampler.sample(k, frame, 0);
    // P projected on the occupied frame: V^dagger P V (Hermitian when P is).
    for (let i = 0; i < m; i++) {
      for (let j = 0; j < m; j++) {
        let re = 0, im = 0;
        for (let x = 0; x < n; x++) {
          let yr = 0, yi = 0;
          for (let y = 0; y < n; y++) {
            const pr = p[2 * (x * n + y)], pi = p[2 * (x * n + y) + 1];
            const vr = frame[2 * n * j + 2 * y], vi = frame[2 * n * j + 2 * y + 1];
            yr += pr * vr - pi * vi;
            yi += pr * vi + pi * vr;
          }
          const ur = frame[2 * n * i + 2 * x], ui = -frame[2 * n * i + 2 * x + 1];
          re += ur * yr - ui * yi;
          im += ur * yi + ui * yr;
        }
        proj[2 * (i * m + j)] = re;
        proj[2 * (i * m + j) + 1] = im;
      }
    }
    solver.solve(proj, vals);
    let negative = 0;
    for (let i = 0; i < m; i++) {
      if (Math.abs(Math.abs(vals[i]) - 1) > 1e-6) {
        throw new ModelError('inversion', `the occupied bands at k = ${formatK(k)} are not inversion eigenstates (projected eigenvalue ${vals[i].toFixed(6)}): P does not commute with H there, or the group is cut inside a degenerate level`);
      }
      if (vals[i] < 0) negative++;
    }
    if (negative % 2 === 1) warnings.push(`an odd number (${negative}) of occupied states at k = ${formatK(k)} have parity -1: they are not Kramers pairs, so the model does not look time-reversal symmetric`);
    const delta = (negative / 2) % 2 === 0 ? 1 : -1;
    parities.push({ k: k.map((x) => x / (2 * Math.PI)), delta });
    product *= delta;
    for (let i = 0; i < dim; i++) if ((t >> i) & 1) weakProducts[i] *= delta;
  }
  const cert = certifyGap(h, group, { axes: Array.from({ length: dim }, (_, i) => i), origin: new Array<number>(dim).fill(0) }, { tolerance: options.gapTolerance });
  const checks: Z2Checks = certificateChecks(cert, group, [1 << dim], 'the Z2 index');
  checks.warnings.push(...warnings);
  const ok = cert.verdict === 'gapped' && warnings.length === 0;
  checks.certified = ok;
  const nu = (x: number) => (ok ? (x < 0 ? 1 : 0) : null);
  const base = { kind: 'z2' as const, method: 'parity' as const, bands: [group.lo, group.hi] as [number, number], parities, inversion: origin, checks };
  if (dim === 2) return { ...base, z2: nu(product) };
  return { ...base, z2: nu(product), weak: weakProducts.map(nu) };
}

/** Z2 index (2D) or strong and weak indices (3D) of a time-reversal-symmetric band group. */
export function z2Index(source: TopologySource, options: Z2Options = {}): Z2Result {
  const h = compileSource(source, options);
  if (h.dim !== 2 && h.dim !== 3) throw new ModelError('periodic', `Z2 indices are computed for 2D and 3D models. Value: ${h.dim}`);
  const group = bandGroup(options.bands, h.size);
  const method = options.method ?? 'flow';
  if (method === 'flow') return z2Flow(h, group, options);
  if (method === 'parity') return z2Parity(h, group, options);
  throw new ModelError('method', `expected "flow" or "parity". Value: ${valueText(method)}`);
}

export interface SpinChernResult {
  kind: 'spin-chern';
  /** (C_up - C_down)/2, null when either block's Chern number is undefined. */
  spinChern: number | null;
  /** Z2 = spin Chern number mod 2. */
  z2: number | null;
  up: ChernResult;
  down: ChernResult;
  checks: TopologyChecks;
}

/** The model restricted to one spin species (terms within it only). */
function spinBlock(spec: ModelSpec, spin: 'up' | 'down'): ModelSpec {
  const keep = new Set(spec.orbitals.filter((o) => o.spin === spin).map((o) => o.label));
  return {
    ...spec,
    name: `${spec.name} (spin ${spin})`,
    orbitals: spec.orbitals.filter((o) => keep.has(o.label)),
    terms: spec.terms.filter((t) => keep.has(t.from) && keep.has(t.to)),
  };
}

/**
 * Spin Chern number of the lowest bands when S_z is conserved: every orbital carries a spin tag and
 * no term couples up to down (checked numerically on H(k)).
 */
export function spinChern(source: TopologySource, options: ChernOptions = {}): SpinChernResult {
  const h = compileSource(source, options);
  const spec = h.spec;
  const untagged = spec.orbitals.findIndex((o) => o.spin === undefined);
  if (untagged >= 0) throw new ModelError(`orbitals[${untagged}].spin`, `the spin Chern number needs every orbital tagged "up" or "down". Value: undefined (orbital ${valueText(spec.orbitals[untagged].label)})`);
  const n = h.size;
  const mat = new Float64Array(2 * n * n);
  for (const probe of PROBES) {
    const k = probe.slice(0, h.dim);
    h.fill(k, mat);
    const scale = Math.max(1e-300, ...Array.from(mat, Math.abs));
    for (let a = 0; a < n; a++) {
      for (let b = 0; b < n; b++) {
        if (spec.orbitals[a].spin === spec.orbitals[b].spin) continue;
        const v = Math.hypot(mat[2 * (a * n + b)], mat[2 * (a * n + b) + 1]);
        if (v > 1e-12 * scale) {
          throw new ModelError('model', `S_z is not conserved: H couples ${spec.orbitals[a].label} and ${spec.orbitals[b].label} (|H| = ${v.toExponential(2)} at k = ${formatK(k)}), so the spin Chern number is not defined; use the Z2 flow instead`);
        }
      }
    }
  }
  const group = bandGroup(options.bands, n);
  if (group.lo !== 0) throw new ModelError('bands', `the spin Chern number is for the lowest bands (an occupied group). Value: ${valueText(options.bands)}`);
  // How many of the occupied bands each spin holds: count block eigenvalues below the gap at one k.
  const k0 = new Array<number>(h.dim).fill(0.1234);
  h.fill(k0, mat);
  const full = new Float64Array(n);
  new HermitianEigensolver(n).solve(mat, full);
  const fermi = (full[group.hi] + full[group.hi + 1]) / 2;
  const blocks = (['up', 'down'] as const).map((spin) => {
    const sub = spinBlock(spec, spin);
    const hs = new BlochHamiltonian(sub, h.params, { convention: h.convention });
    const ns = hs.size;
    const m2 = new Float64Array(2 * ns * ns);
    hs.fill(k0, m2);
    const e = new Float64Array(ns);
    new HermitianEigensolver(ns).solve(m2, e);
    const occupied = e.filter((x) => x < fermi).length;
    return { hs, occupied, ns };
  });
  const [up, down] = blocks.map(({ hs, occupied, ns }, i): ChernResult => {
    if (occupied === 0 || occupied === ns) {
      // A spin species with all its bands empty (or all filled) contributes no Chern number.
      const note = `spin ${i === 0 ? 'up' : 'down'} has ${occupied === 0 ? 'no' : 'all its'} bands below the gap: its Chern number is 0`;
      return { kind: 'chern', chern: 0, bands: [0, occupied - 1], plane: { axes: [0, 1] }, total: 0, checks: { minGap: null, warnings: [note] } };
    }
    return chernNumber(hs, { ...options, params: undefined, bands: occupied });
  });
  const checks: TopologyChecks = {
    minGap: Math.min(up.checks.minGap ?? Infinity, down.checks.minGap ?? Infinity),
    warnings: [...up.checks.warnings.map((w) => `spin up: ${w}`), ...down.checks.warnings.map((w) => `spin down: ${w}`)],
  };
  const cUp = up.chern, cDown = down.chern;
  const gapless = up.checks.gapless || down.checks.gapless;
  if (gapless) checks.gapless = true;
  const s = cUp === null || cDown === null ? null : (cUp - cDown) / 2;
  if (s !== null && !Number.isInteger(s)) checks.warnings.push(`C_up = ${cUp} and C_down = ${cDown} do not cancel: time reversal is broken, and the spin Chern number is a half-integer`);
  return { kind: 'spin-chern', spinChern: s, z2: s === null ? null : Math.abs(Math.round(s)) % 2, up, down, checks };
}
