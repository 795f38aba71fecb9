/**
 * Berry-curvature maps over a Brillouin-zone plane.
 *
 * 'lattice': the Fukui–Hatsugai–Suzuki flux of each plaquette divided by its area; gauge invariant,
 * and the map sums to exactly 2pi times an integer (the Chern number) on any gapped grid.
 * 'kubo': the velocity-operator formula at each grid point,
 *   Omega_n = -2 Im sum_{m != n} <n|d1 H|m><m|d2 H|n> / (E_n - E_m)^2,
 * smooth, for drawing; for a group the sum runs over m outside the group (terms inside cancel, so
 * degeneracies within the group do no harm).
 * Both are densities in reduced momenta (per rad^2), oriented like the Chern number (sign flipped
 * when a1 x a2 < 0), and in the Bloch convention the result names: the local curvature depends on it.
 */
import type { BlochHamiltonian } from '../bloch/hamiltonian.js';
import { checkInterrupt } from '../interrupt.js';
import { adjointTimes, multiply } from '../linalg/cmatrix.js';
import { ModelError, valueText } from '../model/errors.js';
import { planeFlux } from './chern.js';
import { gapTolerance } from './checks.js';
import {
  bandGroup, compileSource, FrameSampler, orientation2D, resolvePlane, stripProof, uniformLines,
  type BandGroup, type PlaneSpec, type TopologyOptions, type TopologySource,
} from './common.js';
import { gridMomentum, joinCurvatureParts, resolvePart, type CurvatureChecks, type CurvatureMethod, type CurvaturePart, type CurvatureResult, type PartSpec } from './parts.js';

export type { CurvatureChecks, CurvatureMethod, CurvatureResult };
import { resolvePair } from './wilson.js';

export interface CurvatureOptions extends TopologyOptions {
  method?: CurvatureMethod;
  /** k-points per direction, one number or two; default 64. */
  grid?: number | [number, number];
  plane?: PlaneSpec;
  /** Also return each band of the group on its own. */
  perBand?: boolean;
  /** Compute only this part of the map's rows (along the second axis); see parts.ts. */
  part?: PartSpec;
}

/** Kubo-formula curvature of every band and of a group, at one k; preallocated. */
export class KuboCurvature {
  readonly h: BlochHamiltonian;
  readonly sampler: FrameSampler;
  /** Per band at the latest k. */
  readonly perBand: Float64Array;
  private readonly d1: Float64Array;
  private readonly d2: Float64Array;
  private readonly tmp: Float64Array;
  private readonly x1: Float64Array;
  private readonly x2: Float64Array;
  /** Smallest energy difference met inside a band pair used (for per-band reliability). */
  minSplitting = Infinity;

  constructor(sampler: FrameSampler) {
    this.sampler = sampler;
    this.h = sampler.hamiltonian;
    const n = this.h.size;
    this.perBand = new Float64Array(n);
    this.d1 = new Float64Array(2 * n * n);
    this.d2 = new Float64Array(2 * n * n);
    this.tmp = new Float64Array(2 * n * n);
    this.x1 = new Float64Array(2 * n * n);
    this.x2 = new Float64Array(2 * n * n);
  }

  /**
   * At k (full reduced vector), with derivatives along axes ax1, ax2: fills `perBand` for the
   * bands in `which` (all pairs) and returns the group's curvature (pairs leaving the group only).
   */
  at(k: ArrayLike<number>, ax1: number, ax2: number, group: BandGroup, which: BandGroup | null): number {
    const n = this.h.size;
    const e = this.sampler.sample(k);
    const v = this.sampler.vectors;
    this.h.fillDerivative(k, ax1, this.d1);
    multiply(n, this.d1, v, this.tmp);
    adjointTimes(n, v, this.tmp, this.x1);
    this.h.fillDerivative(k, ax2, this.d2);
    multiply(n, this.d2, v, this.tmp);
    adjointTimes(n, v, this.tmp, this.x2);
    const x1 = this.x1, x2 = this.x2;
    const term = (a: number, b: number): number => {
      // Im(<a|d1H|b><b|d2H|a>) / (E_a - E_b)^2
      const pr = x1[2 * (a * n + b)], pi = x1[2 * (a * n + b) + 1];
      const qr = x2[2 * (b * n + a)], qi = x2[2 * (b * n + a) + 1];
      const de = e[a] - e[b];
      return (pr * qi + pi * qr) / (de * de);
    };
    let group_ = 0;
    for (let a = group.lo; a <= group.hi; a++) {
      for (let b = 0; b < n; b++) if (b < group.lo || b > group.hi) group_ += term(a, b);
    }
    if (which !== null) {
      for (let a = which.lo; a <= which.hi; a++) {
        let s = 0;
        for (let b = 0; b < n; b++) {
          if (b === a) continue;
          const de = Math.abs(e[a] - e[b]);
          if (de < this.minSplitting) this.minSplitting = de;
          s += term(a, b);
        }
        this.perBand[a] = -2 * s;
      }
    }
    return -2 * group_;
  }
}

/**
 * A Berry-curvature map of a band group (and optionally of each band in it) over a plane. With
 * `part`, the rows of the map that part holds, to be joined with the other parts by `joinParts`
 * (parts.ts) into exactly the map computed whole.
 */
export function curvatureMap(source: TopologySource, options: CurvatureOptions & { part: PartSpec }): CurvaturePart;
export function curvatureMap(source: TopologySource, options?: CurvatureOptions & { part?: undefined }): CurvatureResult;
export function curvatureMap(source: TopologySource, options?: CurvatureOptions): CurvatureResult | CurvaturePart;
export function curvatureMap(source: TopologySource, options: CurvatureOptions = {}): CurvatureResult | CurvaturePart {
  const part = curvaturePart(source, options);
  return options.part === undefined ? joinCurvatureParts([part]) : part;
}

/** The rows of a curvature map one part holds, with the statistics its checks are built from. */
function curvaturePart(source: TopologySource, options: CurvatureOptions): CurvaturePart {
  const h = compileSource(source, options);
  const plane = resolvePlane(h.dim, options.plane);
  const group = bandGroup(options.bands, h.size);
  const method = options.method ?? 'lattice';
  if (method !== 'lattice' && method !== 'kubo') throw new ModelError('method', `expected "lattice" or "kubo". Value: ${valueText(method)}`);
  const [n1, n2] = resolvePair(options.grid as [number, number] | number | undefined, [64, 64]);
  gapTolerance(options.gapTolerance, 0); // a bad tolerance fails here, not in the join
  const { index, count, lo, hi } = resolvePart(options.part, n2);
  const rows = hi - lo;
  const sign = h.dim === 2 ? orientation2D(h.spec) : 1;
  const cell = ((2 * Math.PI) / n1) * ((2 * Math.PI) / n2);
  const sampler = new FrameSampler(h, group);
  const values = new Float64Array(rows * n1);
  const m = group.hi - group.lo + 1;
  const perBand = options.perBand ? new Float64Array(m * rows * n1) : undefined;
  const stats: Pick<CurvaturePart, 'maxPlaquettePhase' | 'bandGaps' | 'minSplitting'> = {};

  if (method === 'lattice') {
    const lines: [Float64Array, Float64Array] = [uniformLines(n1), uniformLines(n2)];
    stats.maxPlaquettePhase = planeFlux(sampler, plane, lines, values, [lo, hi]).maxPhase;
    if (perBand !== undefined) {
      const one = new Float64Array(rows * n1);
      stats.bandGaps = [];
      for (let j = 0; j < m; j++) {
        const band = new FrameSampler(h, { lo: group.lo + j, hi: group.lo + j });
        const f = planeFlux(band, plane, lines, one, [lo, hi]);
        perBand.set(one, j * rows * n1);
        stats.maxPlaquettePhase = Math.max(stats.maxPlaquettePhase, f.maxPhase);
        stats.bandGaps.push(band.gapRecord());
      }
    }
  } else {
    const kubo = new KuboCurvature(sampler);
    const k = Float64Array.from(plane.origin);
    const [ax1, ax2] = plane.axes;
    for (let b = lo; b < hi; b++) {
      checkInterrupt();
      k[ax2] = gridMomentum(b, n2, 0);
      for (let a = 0; a < n1; a++) {
        k[ax1] = gridMomentum(a, n1, 0);
        const at = (b - lo) * n1 + a;
        values[at] = kubo.at(k, ax1, ax2, group, perBand !== undefined ? group : null);
        if (perBand !== undefined) for (let j = 0; j < m; j++) perBand[j * rows * n1 + at] = kubo.perBand[group.lo + j];
      }
    }
    if (perBand !== undefined) stats.minSplitting = kubo.minSplitting;
  }
  for (let i = 0; i < values.length; i++) {
    if (method === 'lattice') values[i] /= cell;
    values[i] *= sign;
  }
  if (perBand !== undefined) for (let i = 0; i < perBand.length; i++) perBand[i] *= (method === 'lattice' ? sign / cell : sign);
  return {
    kind: 'curvature-part',
    part: { index, count },
    rows: [lo, hi],
    method,
    convention: h.convention,
    bands: [group.lo, group.hi],
    plane: h.dim === 2 ? { axes: plane.axes } : { axes: plane.axes, normal: options.plane!.normal, at: options.plane!.at },
    grid: [n1, n2],
    gapTolerance: options.gapTolerance ?? null,
    values,
    ...(perBand !== undefined ? { perBand } : {}),
    gap: sampler.gapRecord(),
    ...stats,
    // The rows held span k2 from row lo to row hi (plaquettes reach up to the next row).
    proof: stripProof(h, group, plane, 1, -Math.PI + (2 * Math.PI * lo) / n2, -Math.PI + (2 * Math.PI * hi) / n2, options.gapTolerance),
  };
}
