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
import { ModelError, valueText } from '../model/errors.js';
import {
  bandGroup, compileSource, embedding, FrameSampler, orientation2D, resolvePlane, stripProof, uniformLines,
  type Plane, type PlaneSpec, type TopologyOptions, type TopologySource,
} from './common.js';
import { gapTolerance } from './checks.js';
import { determinantInPlace, fraction, overlapMatrix, UnitaryPhases } from './links.js';
import { acrossMomentum, joinWannierFlowParts, resolvePart, type PartSpec, type WannierFlowChecks, type WannierFlowPart, type WannierFlowResult } from './parts.js';

export type { WannierFlowChecks, WannierFlowResult };

/**
 * Wilson loops along one axis of a plane, one column (fixed across-momentum) at a time. Keeps the
 * previous column's frames to measure how far frames move across, so a coarse across-grid is seen.
 */
export class WilsonColumns {
  readonly sampler: FrameSampler;
  /** Momenta along the loop (radians, ascending within [-pi, pi)); the last link closes across the zone edge. */
  readonly along: Float64Array;
  readonly nAlong: number;
  /** The latest Wilson loop, m x m. */
  readonly w: Float64Array;
  /** Its eigenphases (radians) and hybrid Wannier centres in [0, 1), ascending. */
  readonly phases: Float64Array;
  readonly centres: Float64Array;
  /** Smallest link modulus along and across since construction; smallest |eigenvalue| of W. */
  minLinkAlong = Infinity;
  /** Per link along the loop (link j joins along[j] to the next): its smallest modulus since construction. */
  readonly linkAlong: Float64Array;
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

  constructor(sampler: FrameSampler, plane: Plane, along: Float64Array) {
    this.sampler = sampler;
    this.plane = plane;
    this.along = along;
    const nAlong = along.length;
    this.nAlong = nAlong;
    this.linkAlong = new Float64Array(nAlong).fill(Infinity);
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

  private frames(k1: number, out: Float64Array, track: boolean): void {
    const fl = this.sampler.frameLength, N = this.nAlong;
    const [ax1, ax2] = this.plane.axes;
    const k = this.k;
    k[ax1] = k1;
    for (let j = 0; j < N; j++) {
      k[ax2] = this.along[j];
      this.sampler.sample(k, out, j * fl, track);
    }
  }

  /**
   * Take the column at k1 as the previous one, for its frames alone: no loop, no gap tracked
   * (the left neighbour of a part, which the part before it accounts for).
   */
  seed(k1: number): void {
    this.frames(k1, this.prev, false);
    this.hasPrev = true;
  }

  /** The Wilson loop at across-momentum k1 (radians), its phases and sorted centres. */
  column(k1: number): void {
    const s = this.sampler;
    const m = s.m, n = s.n, fl = s.frameLength, N = this.nAlong;
    const cur = this.cur;
    this.frames(k1, cur, true);
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
      if (mod < this.linkAlong[j]) this.linkAlong[j] = mod;
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
  /** Compute only this part of the nAcross + 1 across-points; see parts.ts. */
  part?: PartSpec;
}

export function resolvePair(grid: [number, number] | number | undefined, defaults: [number, number], field = 'grid'): [number, number] {
  const pair = grid === undefined ? defaults : typeof grid === 'number' ? [grid, grid] : grid;
  if (!Array.isArray(pair) || pair.length !== 2) throw new ModelError(field, `expected a number of k-points or [along, across]. Value: ${valueText(grid)}`);
  pair.forEach((x, i) => {
    if (!Number.isInteger(x) || x < 3 || x > 100_000) throw new ModelError(typeof grid === 'number' ? field : `${field}[${i}]`, `expected a whole number of k-points from 3 to 100000. Value: ${valueText(x)}`);
  });
  return [pair[0], pair[1]];
}

/**
 * Hybrid Wannier centres of a band group along one reciprocal direction (Wilson loops along
 * plane.axes[1]) as a function of the other, with the winding of their sum counted. With `part`,
 * the across-points that part holds, to be joined with the other parts by `joinParts` (parts.ts)
 * into exactly the flow computed whole.
 */
export function wannierFlow(source: TopologySource, options: WannierFlowOptions & { part: PartSpec }): WannierFlowPart;
export function wannierFlow(source: TopologySource, options?: WannierFlowOptions & { part?: undefined }): WannierFlowResult;
export function wannierFlow(source: TopologySource, options?: WannierFlowOptions): WannierFlowResult | WannierFlowPart;
export function wannierFlow(source: TopologySource, options: WannierFlowOptions = {}): WannierFlowResult | WannierFlowPart {
  const part = wannierFlowPart(source, options);
  return options.part === undefined ? joinWannierFlowParts([part]) : part;
}

/** The Wilson loops of one part's across-points, with the statistics its checks are built from. */
function wannierFlowPart(source: TopologySource, options: WannierFlowOptions): WannierFlowPart {
  const h = compileSource(source, options);
  const plane = resolvePlane(h.dim, options.plane);
  const group = bandGroup(options.bands, h.size);
  const [nAlong, nAcross] = resolvePair(options.grid, [64, 64]);
  gapTolerance(options.gapTolerance, 0); // a bad tolerance fails here, not in the join
  const { index, count, lo, hi } = resolvePart(options.part, nAcross + 1);
  const sampler = new FrameSampler(h, group);
  const cols = new WilsonColumns(sampler, plane, uniformLines(nAlong));
  const m = sampler.m;
  const centres = new Float64Array((hi - lo) * m);
  const centreSums = new Float64Array(hi - lo);
  const gapMidpoint = new Float64Array(hi - lo);
  // The across links into this part's first column start from the column before it.
  if (lo > 0) cols.seed(acrossMomentum(lo - 1, nAcross));
  for (let i = lo; i < hi; i++) {
    checkInterrupt();
    cols.column(acrossMomentum(i, nAcross));
    centres.set(cols.centres, (i - lo) * m);
    let s = 0;
    for (let j = 0; j < m; j++) s += cols.centres[j];
    centreSums[i - lo] = s;
    gapMidpoint[i - lo] = largestGap(cols.centres).mid;
  }
  return {
    kind: 'wannier-flow-part',
    part: { index, count },
    columns: [lo, hi],
    convention: h.convention,
    bands: [group.lo, group.hi],
    plane: h.dim === 2 ? { axes: plane.axes } : { axes: plane.axes, normal: options.plane!.normal, at: options.plane!.at },
    grid: [nAlong, nAcross],
    orientation: h.dim === 2 ? orientation2D(h.spec) : 1,
    gapTolerance: options.gapTolerance ?? null,
    centres,
    centreSums,
    gapMidpoint,
    minLinkAlong: cols.minLinkAlong,
    minLinkAcross: cols.minLinkAcross,
    gap: sampler.gapRecord(),
    proof: stripProof(h, group, plane, 0, acrossMomentum(Math.max(lo - 1, 0), nAcross), acrossMomentum(hi - 1, nAcross), options.gapTolerance),
  };
}
