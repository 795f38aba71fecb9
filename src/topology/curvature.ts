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
import { ModelError, show } from '../model/errors.js';
import { planeFlux, COARSE_PLAQUETTE_PHASE } from './chern.js';
import {
  bandGroup, compileSource, FrameSampler, orientation2D, resolvePlane,
  type BandGroup, type PlaneSpec, type TopologyChecks, type TopologyOptions, type TopologySource,
} from './common.js';
import { resolvePair } from './wilson.js';

export type CurvatureMethod = 'lattice' | 'kubo';

export interface CurvatureOptions extends TopologyOptions {
  method?: CurvatureMethod;
  /** k-points per direction, one number or two; default 64. */
  grid?: number | [number, number];
  plane?: PlaneSpec;
  /** Also return each band of the group on its own. */
  perBand?: boolean;
}

export interface CurvatureChecks extends TopologyChecks {
  maxPlaquettePhase?: number;
  coarse?: boolean;
}

export interface CurvatureResult {
  kind: 'curvature';
  method: CurvatureMethod;
  convention: 'lattice' | 'orbital';
  bands: [number, number];
  plane: { axes: [number, number]; normal?: number; at?: number };
  /** [n1, n2]; values[b * n1 + a] belongs to k1[a], k2[b]. */
  grid: [number, number];
  /** Momenta of the samples (radians): plaquette centres ('lattice') or grid points ('kubo'). */
  k1: Float64Array;
  k2: Float64Array;
  /** Curvature of the group (per rad^2). */
  values: Float64Array;
  /** With perBand: band-major, one map per band of the group (band lo first). */
  perBand?: Float64Array;
  /** (1/2pi) sum of values times the cell area: the Chern number ('lattice': an integer exactly); null when gapless. */
  total: number | null;
  checks: CurvatureChecks;
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

/** A Berry-curvature map of a band group (and optionally of each band in it) over a plane. */
export function curvatureMap(source: TopologySource, options: CurvatureOptions = {}): CurvatureResult {
  const h = compileSource(source, options);
  const plane = resolvePlane(h.dim, options.plane);
  const group = bandGroup(options.bands, h.size);
  const method = options.method ?? 'lattice';
  if (method !== 'lattice' && method !== 'kubo') throw new ModelError('method', `expected "lattice" or "kubo". Value: ${show(method)}`);
  const [n1, n2] = resolvePair(options.grid as [number, number] | number | undefined, [64, 64]);
  const sign = h.dim === 2 ? orientation2D(h.spec) : 1;
  const cell = ((2 * Math.PI) / n1) * ((2 * Math.PI) / n2);
  const sampler = new FrameSampler(h, group);
  const values = new Float64Array(n1 * n2);
  const m = group.hi - group.lo + 1;
  const perBand = options.perBand ? new Float64Array(m * n1 * n2) : undefined;
  const half = method === 'lattice' ? 0.5 : 0;
  const k1 = Float64Array.from({ length: n1 }, (_, a) => -Math.PI + (2 * Math.PI * (a + half)) / n1);
  const k2 = Float64Array.from({ length: n2 }, (_, b) => -Math.PI + (2 * Math.PI * (b + half)) / n2);
  let checks: CurvatureChecks;

  if (method === 'lattice') {
    const flux = planeFlux(sampler, plane, n1, n2, values);
    checks = sampler.gapChecks([n1, n2], options.gapTolerance, 'the curvature of the group');
    checks.maxPlaquettePhase = flux.maxPhase;
    if (perBand !== undefined) {
      const one = new Float64Array(n1 * n2);
      for (let j = 0; j < m; j++) {
        const band = new FrameSampler(h, { lo: group.lo + j, hi: group.lo + j });
        const f = planeFlux(band, plane, n1, n2, one);
        perBand.set(one, j * n1 * n2);
        checks.maxPlaquettePhase = Math.max(checks.maxPlaquettePhase, f.maxPhase);
        const c = band.gapChecks([n1, n2], options.gapTolerance, `the curvature of band ${group.lo + j}`);
        if (c.gapless) checks.warnings.push(...c.warnings);
      }
    }
  } else {
    const kubo = new KuboCurvature(sampler);
    const k = Float64Array.from(plane.origin);
    const [ax1, ax2] = plane.axes;
    for (let b = 0; b < n2; b++) {
      checkInterrupt();
      k[ax2] = k2[b];
      for (let a = 0; a < n1; a++) {
        k[ax1] = k1[a];
        values[b * n1 + a] = kubo.at(k, ax1, ax2, group, perBand !== undefined ? group : null);
        if (perBand !== undefined) for (let j = 0; j < m; j++) perBand[j * n1 * n2 + b * n1 + a] = kubo.perBand[group.lo + j];
      }
    }
    checks = sampler.gapChecks([n1, n2], options.gapTolerance, 'the curvature of the group');
    if (perBand !== undefined && m > 1 && kubo.minSplitting <= sampler.tolerance(options.gapTolerance)) {
      checks.warnings.push(`bands inside the group touch (splitting ${kubo.minSplitting.toExponential(2)}): their separate curvatures diverge there; the group total is unaffected`);
    }
  }
  let total = 0;
  for (let i = 0; i < values.length; i++) {
    if (method === 'lattice') values[i] /= cell;
    values[i] *= sign;
    total += values[i];
  }
  if (perBand !== undefined) for (let i = 0; i < perBand.length; i++) perBand[i] *= (method === 'lattice' ? sign / cell : sign);
  total *= cell / (2 * Math.PI);
  if (!checks.gapless && (checks.maxPlaquettePhase ?? 0) > COARSE_PLAQUETTE_PHASE) {
    checks.coarse = true;
    checks.warnings.push(`grid ${n1}x${n2} is coarse: largest plaquette phase ${checks.maxPlaquettePhase!.toFixed(3)} rad (limit pi/2)`);
  }
  return {
    kind: 'curvature',
    method,
    convention: h.convention,
    bands: [group.lo, group.hi],
    plane: h.dim === 2 ? { axes: plane.axes } : { axes: plane.axes, normal: options.plane!.normal, at: options.plane!.at },
    grid: [n1, n2],
    k1,
    k2,
    values,
    ...(perBand !== undefined ? { perBand } : {}),
    total: checks.gapless ? null : total,
    checks,
  };
}

