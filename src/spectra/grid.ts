/**
 * Uniform k-grids over the Brillouin zone: point j along direction i sits at reduced
 * k_i = -pi + 2 pi j / n_i (so an even n contains Γ and the zone edge). Points are stored with
 * the last direction fastest.
 */
import { checkInterrupt } from '../interrupt.js';
import { ModelError, valueText } from '../model/errors.js';
import type { BandSampler } from './common.js';

const DEFAULT_GRID = [1, 256, 64, 24];

/** Resolve `grid` (one count for every direction, or one per direction) for a `dim`-dimensional zone. */
export function resolveGrid(grid: number | number[] | undefined, dim: number, field = 'grid', defaults = DEFAULT_GRID): number[] {
  if (dim < 1) throw new ModelError('periodic', `a k-grid needs at least one periodic direction. Value: ${dim}`);
  const counts = grid === undefined ? new Array<number>(dim).fill(defaults[dim]) : typeof grid === 'number' ? new Array<number>(dim).fill(grid) : grid;
  if (!Array.isArray(counts) || counts.length !== dim) throw new ModelError(field, `expected a number or ${dim} numbers. Value: ${valueText(grid)}`);
  counts.forEach((n, i) => {
    if (!Number.isInteger(n) || n < 2 || n > 1_000_000) throw new ModelError(dim === 1 && typeof grid === 'number' ? field : `${field}[${i}]`, `expected a whole number of k-points from 2 to 1000000. Value: ${valueText(n)}`);
  });
  return [...counts];
}

/** Reduced k (radians) of grid point `index` into `out`. */
export function gridPoint(grid: number[], index: number, out: Float64Array): Float64Array {
  let rest = index;
  for (let i = grid.length - 1; i >= 0; i--) {
    const j = rest % grid[i];
    rest = (rest - j) / grid[i];
    out[i] = -Math.PI + (2 * Math.PI * j) / grid[i];
  }
  return out;
}

/** Ascending energies at every grid point: `bandCount` per point, points in grid order. */
export function gridEnergies(sampler: BandSampler, grid: number[]): Float64Array {
  const nb = sampler.bandCount;
  const total = grid.reduce((a, b) => a * b, 1);
  const row = grid[grid.length - 1];
  const energies = new Float64Array(total * nb);
  const k = new Float64Array(grid.length);
  for (let p = 0; p < total; p++) {
    if (p % row === 0) checkInterrupt();
    energies.set(sampler.solve(gridPoint(grid, p, k)), p * nb);
  }
  return energies;
}
