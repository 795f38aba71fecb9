/**
 * Wilson loops and hybrid Wannier centres.
 *
 * W(k1) = M(0,1) M(1,2) ... M(N-1,N), M(j,j+1) = <u(k1, k2_j)|u(k1, k2_{j+1})> (m x m), the last
 * link closed through the embedding when the convention is 'orbital'. Hybrid Wannier centres are
 * -arg(eig W)/2pi mod 1 (shared/references.md); with A = i<u|grad u> their sum advances by the
 * Chern number as k1 goes once around the zone.
 */
import { checkInterrupt } from '../interrupt.js';
import { multiply } from '../linalg/cmatrix.js';
import { ModelError, show } from '../model/errors.js';
import {
  bandGroup, compileSource, embedding, FrameSampler, orientation2D, resolvePlane,
  type Plane, type PlaneSpec, type TopologyChecks, type TopologyOptions, type TopologySource,
} from './common.js';
import { determinantInPlace, fraction, overlapMatrix, UnitaryPhases } from './links.js';

/** A link modulus (|det| of a normalised overlap) below this means neighbouring frames differ too much. */
export const COARSE_LINK = 0.9;

/**
 * Wilson loops along one axis of a plane, one column (fixed across-momentum) at a time. Keeps the
 * previous column's frames to measure how far frames move across, so a coarse across-grid is seen.
 */
export class WilsonColumns {
  readonly sampler: FrameSampler;
  readonly nAlong: number;
  /** The latest Wilson loop, m x m. */
  readonly w: Float64Array;
  /** Its eigenphases (radians) and hybrid Wannier centres in [0, 1), ascending. */
  readonly phases: Float64Array;
  readonly centres: Float64Array;
  /** Smallest link modulus along and across since construction; smallest |eigenvalue| of W. */
  minLinkAlong = Infinity;
  minLinkAcross = Infinity;
  minUnitarity = Infinity;
  private readonly plane: Plane;
  private readonly embed: Float64Array | null;
  private cur: Float64Array;
  private prev: Float64Array;
  private hasPrev = false;
  private readonly link: Float64Array;
  private readonly tmp: Float64Array;
  private readonly det: Float64Array;
  private readonly eig: UnitaryPhases;
  private readonly k: Float64Array;

  constructor(sampler: FrameSampler, plane: Plane, nAlong: number) {
    this.sampler = sampler;
    this.plane = plane;
    this.nAlong = nAlong;
    const m = sampler.m;
    this.w = new Float64Array(2 * m * m);
    this.phases = new Float64Array(m);
    this.centres = new Float64Array(m);
    this.embed = embedding(sampler.hamiltonian, plane.axes[1]);
    this.cur = new Float64Array(nAlong * sampler.frameLength);
    this.prev = new Float64Array(nAlong * sampler.frameLength);
    this.link = new Float64Array(2 * m * m);
    this.tmp = new Float64Array(2 * m * m);
    this.det = new Float64Array(2);
    this.eig = new UnitaryPhases(m);
    this.k = Float64Array.from(plane.origin);
  }

  /** Forget the previous column (the next one starts a new sweep). */
  restart(): void {
    this.hasPrev = false;
  }

  private linkModulus(a: Float64Array, aOff: number, b: Float64Array, bOff: number, embed: Float64Array | null): number {
    const s = this.sampler;
    overlapMatrix(s.n, s.m, a, aOff, b, bOff, embed, this.link);
    this.tmp.set(this.link);
    determinantInPlace(s.m, this.tmp, this.det);
    return Math.hypot(this.det[0], this.det[1]);
  }

  /** The Wilson loop at across-momentum k1 (radians), its phases and sorted centres. */
  column(k1: number): void {
    const s = this.sampler;
    const m = s.m, n = s.n, fl = s.frameLength, N = this.nAlong;
    const [ax1, ax2] = this.plane.axes;
    const k = this.k;
    k[ax1] = k1;
    const cur = this.cur;
    for (let j = 0; j < N; j++) {
      k[ax2] = -Math.PI + (2 * Math.PI * j) / N;
      s.sample(k, cur, j * fl);
    }
    const w = this.w;
    w.fill(0);
    for (let i = 0; i < m; i++) w[2 * (i * m + i)] = 1;
    for (let j = 0; j < N; j++) {
      const last = j === N - 1;
      overlapMatrix(n, m, cur, j * fl, cur, last ? 0 : (j + 1) * fl, last ? this.embed : null, this.link);
      this.tmp.set(this.link);
      determinantInPlace(m, this.tmp, this.det);
      const mod = Math.hypot(this.det[0], this.det[1]);
      if (mod < this.minLinkAlong) this.minLinkAlong = mod;
      multiply(m, w, this.link, this.tmp);
      w.set(this.tmp);
    }
    if (this.hasPrev) {
      for (let j = 0; j < N; j++) {
        const mod = this.linkModulus(this.prev, j * fl, cur, j * fl, null);
        if (mod < this.minLinkAcross) this.minLinkAcross = mod;
      }
    }
    const unit = this.eig.solve(w, this.phases);
    if (unit < this.minUnitarity) this.minUnitarity = unit;
    for (let i = 0; i < m; i++) {
      this.centres[i] = fraction(-this.phases[i] / (2 * Math.PI));
    }
    this.centres.sort();
    this.cur = this.prev;
    this.prev = cur;
    this.hasPrev = true;
  }
}

/** Midpoint (in [0, 1)) of the largest gap between neighbouring centres on the circle, and that gap. */
export function largestGap(centres: Float64Array): { mid: number; gap: number } {
  const m = centres.length;
  let best = -1;
  let mid = 0;
  for (let i = 0; i < m; i++) {
    const lo = centres[i];
    const hi = i + 1 < m ? centres[i + 1] : centres[0] + 1;
    if (hi - lo > best) {
      best = hi - lo;
      mid = fraction((lo + hi) / 2);
    }
  }
  return { mid, gap: best };
}

/** Distance travelled from a to b counter-clockwise on the unit circle, in [0, 1). */
function ccw(a: number, b: number): number {
  const d = b - a;
  return d - Math.floor(d);
}

/**
 * Number of centres (at the later momentum) that lie on the shorter arc between the two
 * largest-gap midpoints: each is a centre that jumped over the reference line. With an even number
 * of centres (Kramers pairs) the parity does not depend on which arc is taken, so a midpoint that
 * jumps between 0 and 1 or across a degenerate pair cannot flip it.
 */
export function crossingsBetween(zFrom: number, zTo: number, centres: Float64Array): number {
  const span = ccw(zFrom, zTo);
  const forward = span <= 0.5;
  let count = 0;
  for (let i = 0; i < centres.length; i++) {
    const t = forward ? ccw(zFrom, centres[i]) : ccw(zTo, centres[i]);
    const arc = forward ? span : 1 - span;
    if (t > 0 && t < arc) count++;
  }
  return count;
}

export interface WannierFlowOptions extends TopologyOptions {
  /** [points along the loop, steps across]; default [64, 64]. */
  grid?: [number, number] | number;
  /** For a 3D model: the slice k_normal = at (radians). */
  plane?: PlaneSpec;
}

export interface WannierFlowChecks extends TopologyChecks {
  /** Smallest link modulus along / across; below 0.9 the grid is too coarse in that direction. */
  minLinkAlong: number;
  minLinkAcross: number;
  /** Largest jump of the sum of centres between neighbouring across-points (in units of 1). */
  maxStep: number;
  coarse?: boolean;
}

export interface WannierFlowResult {
  kind: 'wannier-flow';
  convention: 'lattice' | 'orbital';
  bands: [number, number];
  /** Reduced axes: Wilson loops run along axes[1]; the flow is drawn against axes[0]. */
  plane: { axes: [number, number]; normal?: number; at?: number };
  /** Across-momenta k1 (radians), -pi to pi inclusive (nAcross + 1 points). */
  across: Float64Array;
  /** Hybrid Wannier centres in [0, 1), m per across point, ascending within each. */
  centres: Float64Array;
  /** Sum of the centres at each across point, unwrapped to be continuous. */
  sum: Float64Array;
  /** Midpoint of the largest gap between centres at each across point. */
  gapMidpoint: Float64Array;
  /** Net advance of the sum over the zone (the Chern number of the group), null when gapless. */
  winding: number | null;
  checks: WannierFlowChecks;
}

export function resolvePair(grid: [number, number] | number | undefined, defaults: [number, number], field = 'grid'): [number, number] {
  const pair = grid === undefined ? defaults : typeof grid === 'number' ? [grid, grid] : grid;
  if (!Array.isArray(pair) || pair.length !== 2) throw new ModelError(field, `expected a number of k-points or [along, across]. Value: ${show(grid)}`);
  pair.forEach((x, i) => {
    if (!Number.isInteger(x) || x < 3 || x > 100_000) throw new ModelError(typeof grid === 'number' ? field : `${field}[${i}]`, `expected a whole number of k-points from 3 to 100000. Value: ${show(x)}`);
  });
  return [pair[0], pair[1]];
}

/**
 * Hybrid Wannier centres of a band group along one reciprocal direction (Wilson loops along
 * plane.axes[1]) as a function of the other, with the winding of their sum counted.
 */
export function wannierFlow(source: TopologySource, options: WannierFlowOptions = {}): WannierFlowResult {
  const h = compileSource(source, options);
  const plane = resolvePlane(h.dim, options.plane);
  const group = bandGroup(options.bands, h.size);
  const [nAlong, nAcross] = resolvePair(options.grid, [64, 64]);
  const sampler = new FrameSampler(h, group);
  const cols = new WilsonColumns(sampler, plane, nAlong);
  const m = sampler.m;
  const across = new Float64Array(nAcross + 1);
  const centres = new Float64Array((nAcross + 1) * m);
  const sum = new Float64Array(nAcross + 1);
  const gapMidpoint = new Float64Array(nAcross + 1);
  let maxStep = 0;
  for (let i = 0; i <= nAcross; i++) {
    checkInterrupt();
    const k1 = -Math.PI + (2 * Math.PI * i) / nAcross;
    across[i] = k1;
    cols.column(k1);
    centres.set(cols.centres, i * m);
    let s = 0;
    for (let j = 0; j < m; j++) s += cols.centres[j];
    if (i === 0) sum[0] = s;
    else {
      const prevWrapped = sum[i - 1] - Math.floor(sum[i - 1]);
      let d = s - Math.floor(s) - prevWrapped;
      d -= Math.round(d);
      sum[i] = sum[i - 1] + d;
      maxStep = Math.max(maxStep, Math.abs(d));
    }
    gapMidpoint[i] = largestGap(cols.centres).mid;
  }
  const checks = sampler.gapChecks([nAlong, nAcross], options.gapTolerance, 'the Wannier-centre winding') as WannierFlowChecks;
  checks.minLinkAlong = Math.min(1, cols.minLinkAlong);
  checks.minLinkAcross = Math.min(1, cols.minLinkAcross);
  checks.maxStep = maxStep;
  if (!checks.gapless && (checks.minLinkAlong < COARSE_LINK || checks.minLinkAcross < COARSE_LINK || maxStep > 0.25)) {
    checks.coarse = true;
    checks.warnings.push(
      `grid ${nAlong}x${nAcross} is too coarse to trust the flow: smallest link modulus along ${checks.minLinkAlong.toFixed(3)}, ` +
        `across ${checks.minLinkAcross.toFixed(3)} (limit ${COARSE_LINK}), largest step of the summed centres ${maxStep.toFixed(3)} (limit 0.25)`,
    );
  }
  const sign = h.dim === 2 ? orientation2D(h.spec) : 1;
  return {
    kind: 'wannier-flow',
    convention: h.convention,
    bands: [group.lo, group.hi],
    plane: h.dim === 2 ? { axes: plane.axes } : { axes: plane.axes, normal: options.plane!.normal, at: options.plane!.at },
    across,
    centres,
    sum,
    gapMidpoint,
    winding: checks.gapless ? null : sign * Math.round(sum[nAcross] - sum[0]) + 0,
    checks,
  };
}
