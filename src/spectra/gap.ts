/**
 * Direct gaps over the Brillouin zone and the points where they close (Dirac points in 2D, Weyl
 * points in 3D).
 *
 * The gap of a band group is the smaller of the direct gaps to the band just below and just above
 * it, at the same k. The locator takes the local minima of the gap on a grid as candidates and
 * refines each by Nelder–Mead on gap(k)^2, which near a linear crossing is a smooth quadratic form
 * (the cone |d(k)| is not differentiable at its tip, its square is).
 */
import { checkInterrupt } from '../interrupt.js';
import { ModelError, valueText } from '../model/errors.js';
import { BandSampler, bandGroup, compileSource, groupGap, type BandGroup, type BandSelection, type KPoint, type SourceOptions, type SpectrumChecks, type SpectrumSource } from './common.js';
import { gridEnergies, gridPoint, resolveGrid } from './grid.js';
import { kPointFromReduced, reciprocalVectors } from './lattice.js';

export interface GapOptions extends SourceOptions {
  /** The band group (default: the lower half of the bands). */
  bands?: BandSelection;
  /** k-points per direction (default 256 / 64 / 24 in 1D / 2D / 3D). */
  grid?: number | number[];
  /** Gap below which the bands count as touching (default 1e-6, energy units of the model). */
  tolerance?: number;
}

export interface GapResult {
  kind: 'gap';
  group: BandGroup;
  grid: number[];
  /** Direct gap at every grid point (last direction fastest; k_i = -pi + 2 pi j / n_i). */
  gap: Float64Array;
  minGap: number;
  /** Where the smallest gap on the grid is. */
  at: KPoint;
  checks: SpectrumChecks;
}

export interface GapClosing extends KPoint {
  /** The direct gap at the refined point. */
  gap: number;
  /** Whether the gap there is below the tolerance. */
  closed: boolean;
  /** Nelder–Mead iterations used. */
  iterations: number;
  /** The grid candidate it started from (reduced k, radians). */
  start: number[];
}

export interface GapClosingOptions extends GapOptions {
  /** Most grid minima refined, smallest gap first (default 8). */
  maxCandidates?: number;
}

export interface GapClosingResult {
  kind: 'gap-closings';
  group: BandGroup;
  tolerance: number;
  /** Refined local minima of the gap, smallest gap first, one per distinct k (mod 2 pi). */
  points: GapClosing[];
  /** How points were found, for the record. */
  method: 'grid minima refined by Nelder–Mead on gap^2';
  checks: SpectrumChecks;
}

function tolerance(options: GapOptions): number {
  const tol = options.tolerance ?? 1e-6;
  if (typeof tol !== 'number' || !(tol > 0) || !Number.isFinite(tol)) throw new ModelError('tolerance', `expected a positive number. Value: ${valueText(tol)}`);
  return tol;
}

interface GapMap {
  sampler: BandSampler;
  group: BandGroup;
  grid: number[];
  gap: Float64Array;
  min: number;
  argmin: number;
}

function gapMap(source: SpectrumSource, options: GapOptions): GapMap {
  const sampler = new BandSampler(compileSource(source, options));
  const nb = sampler.bandCount;
  const group = bandGroup(options.bands, nb);
  const grid = resolveGrid(options.grid, sampler.dim);
  const energies = gridEnergies(sampler, grid);
  const total = energies.length / nb;
  const gap = new Float64Array(total);
  let min = Infinity, argmin = 0;
  for (let p = 0; p < total; p++) {
    gap[p] = groupGap(energies, p * nb, group, nb);
    if (gap[p] < min) { min = gap[p]; argmin = p; }
  }
  return { sampler, group, grid, gap, min, argmin };
}

/** The direct gap of a band group over a k-grid, with its minimum and where it is. */
export function directGap(source: SpectrumSource, options: GapOptions = {}): GapResult {
  const tol = tolerance(options);
  const { sampler, group, grid, gap, min, argmin } = gapMap(source, options);
  const reciprocal = reciprocalVectors(sampler.hamiltonian.spec.vectors, sampler.dim);
  const at = kPointFromReduced(gridPoint(grid, argmin, new Float64Array(grid.length)), reciprocal);
  const checks: SpectrumChecks = { minGap: min, minGapAt: at.fractions, grid, warnings: [] };
  if (min < tol) {
    checks.gapless = true;
    checks.warnings.push(`bands ${group.lo}..${group.hi}: the direct gap closes on the grid (${min.toExponential(2)} at k = [${at.fractions.map((x) => x.toFixed(4)).join(', ')}] reciprocal-lattice units)`);
  }
  return { kind: 'gap', group, grid, gap, minGap: min, at, checks };
}

/** Grid points whose gap is no larger than at any of their 3^d - 1 periodic neighbours. */
function localMinima(gap: Float64Array, grid: number[]): number[] {
  const d = grid.length;
  const strides = grid.map((_, i) => grid.slice(i + 1).reduce((a, b) => a * b, 1));
  const offsets: number[][] = [];
  for (let code = 0; code < 3 ** d; code++) {
    const o = Array.from({ length: d }, (_, i) => (Math.floor(code / 3 ** i) % 3) - 1);
    if (o.some((x) => x !== 0)) offsets.push(o);
  }
  const minima: number[] = [];
  const j = new Array<number>(d);
  for (let p = 0; p < gap.length; p++) {
    let rest = p;
    for (let i = d - 1; i >= 0; i--) { j[i] = rest % grid[i]; rest = (rest - j[i]) / grid[i]; }
    let isMin = true;
    for (const o of offsets) {
      let q = 0;
      for (let i = 0; i < d; i++) q += (((j[i] + o[i]) % grid[i]) + grid[i]) % grid[i] * strides[i];
      if (gap[q] < gap[p]) { isMin = false; break; }
    }
    if (isMin) minima.push(p);
  }
  return minima;
}

/** Wrap reduced k into [-pi, pi). */
function wrap(x: number): number {
  const y = ((x + Math.PI) % (2 * Math.PI) + 2 * Math.PI) % (2 * Math.PI) - Math.PI;
  return y >= Math.PI ? y - 2 * Math.PI : y;
}

/**
 * Find where the gap of a band group closes: grid minima refined to the closing point. Every
 * refined minimum is reported with `closed` telling whether the gap fell below the tolerance, so a
 * nearly closing gap is visible too. Works in any dimension (Weyl points in 3D).
 */
export function findGapClosings(source: SpectrumSource, options: GapClosingOptions = {}): GapClosingResult {
  const tol = tolerance(options);
  const maxCandidates = options.maxCandidates ?? 8;
  if (!Number.isInteger(maxCandidates) || maxCandidates < 1) throw new ModelError('maxCandidates', `expected a positive whole number. Value: ${valueText(maxCandidates)}`);
  const { sampler, group, grid, gap } = gapMap(source, options);
  const nb = sampler.bandCount;
  const d = grid.length;
  const reciprocal = reciprocalVectors(sampler.hamiltonian.spec.vectors, d);
  const minima = localMinima(gap, grid).sort((a, b) => gap[a] - gap[b]);
  const warnings: string[] = [];
  if (minima.length > maxCandidates) {
    warnings.push(`${minima.length} local minima of the gap on the grid, only the ${maxCandidates} smallest refined (raise maxCandidates; many equal minima suggest a nodal line or surface)`);
  }
  const squaredGap = (k: Float64Array): number => {
    const g = groupGap(sampler.solve(k), 0, group, nb);
    return g * g;
  };
  const points: GapClosing[] = [];
  const start = new Float64Array(d);
  for (const p of minima.slice(0, maxCandidates)) {
    checkInterrupt();
    gridPoint(grid, p, start);
    const steps = grid.map((n) => (2 * Math.PI) / n);
    const { x, iterations } = nelderMead(squaredGap, start, steps, 1e-11, 2000);
    const k = Array.from(x, wrap);
    const g = groupGap(sampler.solve(Float64Array.from(k)), 0, group, nb);
    const duplicate = points.find((q) => q.k.every((v, i) => Math.abs(wrap(v - k[i])) < 1e-6));
    if (duplicate !== undefined) {
      if (g < duplicate.gap) Object.assign(duplicate, kPointFromReduced(k, reciprocal), { gap: g, closed: g < tol });
      continue;
    }
    points.push({ ...kPointFromReduced(k, reciprocal), gap: g, closed: g < tol, iterations, start: Array.from(start) });
  }
  points.sort((a, b) => a.gap - b.gap);
  const best = points[0];
  const checks: SpectrumChecks = { minGap: best?.gap ?? null, grid, warnings };
  if (best !== undefined) {
    checks.minGapAt = best.fractions;
    checks.gapless = best.closed;
  }
  return { kind: 'gap-closings', group, tolerance: tol, points, method: 'grid minima refined by Nelder–Mead on gap^2', checks };
}

/**
 * Nelder–Mead minimisation (standard reflection 1, expansion 2, contraction 1/2, shrink 1/2) from
 * `x0` with an initial simplex of `steps` along each axis; stops when the simplex is smaller than
 * `xtol` in every coordinate or after `maxIterations`.
 */
export function nelderMead(
  f: (x: Float64Array) => number,
  x0: ArrayLike<number>,
  steps: ArrayLike<number>,
  xtol: number,
  maxIterations: number,
): { x: Float64Array; value: number; iterations: number } {
  const d = x0.length;
  const simplex = Array.from({ length: d + 1 }, (_, v) => {
    const x = Float64Array.from(x0);
    if (v > 0) x[v - 1] += steps[v - 1];
    return x;
  });
  const values = simplex.map((x) => f(x));
  const centroid = new Float64Array(d), trial = new Float64Array(d), trial2 = new Float64Array(d);
  const order = Array.from({ length: d + 1 }, (_, i) => i);
  let iterations = 0;
  for (; iterations < maxIterations; iterations++) {
    order.sort((a, b) => values[a] - values[b]);
    const best = simplex[order[0]], worst = simplex[order[d]];
    let size = 0;
    for (const x of simplex) for (let i = 0; i < d; i++) size = Math.max(size, Math.abs(x[i] - best[i]));
    if (size < xtol) break;
    centroid.fill(0);
    for (let v = 0; v < d; v++) for (let i = 0; i < d; i++) centroid[i] += simplex[order[v]][i] / d;
    const along = (t: number, out: Float64Array) => {
      for (let i = 0; i < d; i++) out[i] = centroid[i] + t * (worst[i] - centroid[i]);
      return f(out);
    };
    const fr = along(-1, trial);
    if (fr < values[order[0]]) {
      const fe = along(-2, trial2);
      if (fe < fr) { worst.set(trial2); values[order[d]] = fe; } else { worst.set(trial); values[order[d]] = fr; }
    } else if (fr < values[order[d - 1]]) {
      worst.set(trial); values[order[d]] = fr;
    } else {
      const outside = fr < values[order[d]];
      const fc = along(outside ? -0.5 : 0.5, trial2);
      if (fc < (outside ? fr : values[order[d]])) {
        worst.set(trial2); values[order[d]] = fc;
      } else {
        for (let v = 1; v <= d; v++) {
          const x = simplex[order[v]];
          for (let i = 0; i < d; i++) x[i] = best[i] + 0.5 * (x[i] - best[i]);
          values[order[v]] = f(x);
        }
      }
    }
  }
  order.sort((a, b) => values[a] - values[b]);
  return { x: simplex[order[0]], value: values[order[0]], iterations };
}
