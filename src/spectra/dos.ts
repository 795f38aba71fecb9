/**
 * Density of states per unit cell, normalised so that it integrates to the number of bands.
 *
 * `'linear'` (default): the bands are interpolated linearly on simplices of a uniform k-grid
 * (segments in 1D, two triangles per cell in 2D, six tetrahedra per cell in 3D, all sharing the
 * cell's main diagonal) and the number of states below E is integrated exactly on each simplex; the
 * density reported for a bin is that count's increase across the bin divided by its width. No
 * broadening, so van Hove singularities keep their shape (Blöchl, Jepsen, Andersen, PRB 49, 16223
 * (1994), without their correction term).
 * `'gaussian'`: every state broadened by a normalised Gaussian of standard deviation `width`,
 * evaluated at the bin centres.
 */
import { checkInterrupt } from '../interrupt.js';
import { ModelError, valueText } from '../model/errors.js';
import { BandSampler, compileSource, type SourceOptions, type SpectrumChecks, type SpectrumSource } from './common.js';
import { gridEnergies, resolveGrid } from './grid.js';

export interface DosOptions extends SourceOptions {
  /** k-points per direction (default 2000 / 200 / 40 in 1D / 2D / 3D). */
  grid?: number | number[];
  method?: 'linear' | 'gaussian';
  /** Gaussian standard deviation (energy units; default 2% of the band range). */
  width?: number;
  /** Energy bins (default: the band range plus 5% each side, 400 bins). */
  energies?: { from: number; to: number; count: number };
}

export interface DosResult {
  kind: 'dos';
  method: 'linear' | 'gaussian';
  /** Gaussian width used (null for 'linear'). */
  width: number | null;
  /** Bin centres. */
  energy: Float64Array;
  /** States per unit cell per unit energy, one value per bin. */
  density: Float64Array;
  /** Bin width. */
  binWidth: number;
  bandCount: number;
  /** Lowest and highest band energy on the grid. */
  bandRange: [number, number];
  checks: SpectrumChecks;
}

const DOS_GRID = [1, 2000, 200, 40];

/** Density of states of a periodic model on a k-grid. */
export function densityOfStates(source: SpectrumSource, options: DosOptions = {}): DosResult {
  const method = options.method ?? 'linear';
  if (method !== 'linear' && method !== 'gaussian') throw new ModelError('method', `expected "linear" or "gaussian". Value: ${valueText(method)}`);
  const sampler = new BandSampler(compileSource(source, options));
  const nb = sampler.bandCount;
  const dim = sampler.dim;
  if (method === 'linear' && dim > 3) throw new ModelError('method', `"linear" supports 1 to 3 periodic directions. Value: ${dim}`);
  const grid = resolveGrid(options.grid, dim, 'grid', DOS_GRID);
  const energies = gridEnergies(sampler, grid);
  let lo = Infinity, hi = -Infinity;
  for (const e of energies) { lo = Math.min(lo, e); hi = Math.max(hi, e); }
  const span = Math.max(hi - lo, 1e-9 * Math.max(1, Math.abs(hi)));
  const width = method === 'gaussian' ? options.width ?? 0.02 * span : null;
  if (width !== null && !(width > 0 && Number.isFinite(width))) throw new ModelError('width', `expected a positive number. Value: ${valueText(width)}`);
  const pad = width !== null ? Math.max(0.05 * span, 5 * width) : 0.05 * span;
  const bins = options.energies ?? { from: lo - pad, to: hi + pad, count: 400 };
  if (!(Number.isFinite(bins.from) && Number.isFinite(bins.to) && bins.from < bins.to)) throw new ModelError('energies', `expected finite from < to. Value: ${valueText(bins)}`);
  if (!Number.isInteger(bins.count) || bins.count < 1 || bins.count > 1_000_000) throw new ModelError('energies.count', `expected a whole number from 1 to 1000000. Value: ${valueText(bins.count)}`);
  const binWidth = (bins.to - bins.from) / bins.count;
  const energy = new Float64Array(bins.count);
  for (let j = 0; j < bins.count; j++) energy[j] = bins.from + (j + 0.5) * binWidth;
  const density = method === 'linear'
    ? linearDensity(energies, grid, nb, bins.from, binWidth, bins.count)
    : gaussianDensity(energies, nb, energy, width!);
  const checks: SpectrumChecks = { minGap: null, grid, warnings: [] };
  if (bins.from > lo || bins.to < hi) checks.warnings.push(`the energy window [${bins.from}, ${bins.to}] cuts the bands [${lo}, ${hi}]: the density integrates to less than ${nb}`);
  return { kind: 'dos', method, width, energy, density, binWidth, bandCount: nb, bandRange: [lo, hi], checks };
}

function gaussianDensity(energies: Float64Array, nb: number, centres: Float64Array, width: number): Float64Array {
  const density = new Float64Array(centres.length);
  const points = energies.length / nb;
  const from = centres[0], step = centres.length > 1 ? centres[1] - centres[0] : 1;
  const norm = 1 / (points * width * Math.sqrt(2 * Math.PI));
  const reach = 8 * width;
  for (let p = 0; p < energies.length; p++) {
    if (p % (nb * 1024) === 0) checkInterrupt();
    const e = energies[p];
    const j0 = Math.max(0, Math.ceil((e - reach - from) / step));
    const j1 = Math.min(centres.length - 1, Math.floor((e + reach - from) / step));
    for (let j = j0; j <= j1; j++) {
      const x = (centres[j] - e) / width;
      density[j] += norm * Math.exp(-0.5 * x * x);
    }
  }
  return density;
}

/** Fraction of a simplex's states below E, for sorted corner energies e (length dim + 1). */
function fractionBelow(E: number, e: Float64Array, dim: number): number {
  if (E <= e[0]) return 0;
  if (E >= e[dim]) return 1;
  if (dim === 1) return (E - e[0]) / (e[1] - e[0]);
  if (dim === 2) {
    if (E < e[1]) return ((E - e[0]) ** 2) / ((e[1] - e[0]) * (e[2] - e[0]));
    return 1 - ((e[2] - E) ** 2) / ((e[2] - e[0]) * (e[2] - e[1]));
  }
  const [e1, e2, e3, e4] = e;
  if (E < e2) return ((E - e1) ** 3) / ((e2 - e1) * (e3 - e1) * (e4 - e1));
  if (E < e3) {
    const x = E - e2;
    return ((e2 - e1) ** 2 + 3 * (e2 - e1) * x + 3 * x * x - ((e3 - e1 + e4 - e2) / ((e3 - e2) * (e4 - e2))) * x ** 3) / ((e3 - e1) * (e4 - e1));
  }
  return 1 - ((e4 - E) ** 3) / ((e4 - e1) * (e4 - e2) * (e4 - e3));
}

/** Simplices of the unit cell: one per permutation of the axes, walking 0 -> +e_p0 -> +e_p1 ... */
function cellSimplices(dim: number): number[][][] {
  const perms: number[][] = [];
  const permute = (rest: number[], acc: number[]) => {
    if (rest.length === 0) perms.push(acc);
    rest.forEach((r, i) => permute([...rest.slice(0, i), ...rest.slice(i + 1)], [...acc, r]));
  };
  permute(Array.from({ length: dim }, (_, i) => i), []);
  return perms.map((perm) => {
    const corner = new Array<number>(dim).fill(0);
    const vertices = [[...corner]];
    for (const axis of perm) { corner[axis] = 1; vertices.push([...corner]); }
    return vertices;
  });
}

function linearDensity(energies: Float64Array, grid: number[], nb: number, from: number, binWidth: number, count: number): Float64Array {
  const dim = grid.length;
  const cells = grid.reduce((a, b) => a * b, 1);
  const simplices = cellSimplices(dim);
  const weight = 1 / (cells * simplices.length);
  const strides = grid.map((_, i) => grid.slice(i + 1).reduce((a, b) => a * b, 1));
  // cumulative[j]: states below edge j, built as exact partial counts plus a step for whole simplices.
  const cumulative = new Float64Array(count + 1);
  const steps = new Float64Array(count + 2);
  const corners = new Int32Array(simplices.length * (dim + 1));
  const e = new Float64Array(dim + 1);
  const j = new Array<number>(dim);
  const row = grid[dim - 1];
  for (let c = 0; c < cells; c++) {
    if (c % row === 0) checkInterrupt();
    let rest = c;
    for (let i = dim - 1; i >= 0; i--) { j[i] = rest % grid[i]; rest = (rest - j[i]) / grid[i]; }
    simplices.forEach((vertices, s) => vertices.forEach((v, m) => {
      let q = 0;
      for (let i = 0; i < dim; i++) q += ((j[i] + v[i]) % grid[i]) * strides[i];
      corners[s * (dim + 1) + m] = q;
    }));
    for (let s = 0; s < simplices.length; s++) {
      for (let band = 0; band < nb; band++) {
        for (let m = 0; m <= dim; m++) e[m] = energies[corners[s * (dim + 1) + m] * nb + band];
        e.sort();
        // Edges at or above the top corner see the whole simplex: one step, summed at the end.
        const first = Math.max(0, Math.ceil((e[0] - from) / binWidth));
        const full = Math.min(count + 1, Math.max(first, Math.ceil((e[dim] - from) / binWidth)));
        for (let edge = first; edge < full; edge++) cumulative[edge] += weight * fractionBelow(from + edge * binWidth, e, dim);
        steps[full] += weight;
      }
    }
  }
  const density = new Float64Array(count);
  let below = 0;
  for (let edge = 0; edge <= count; edge++) {
    below += steps[edge];
    cumulative[edge] += below;
  }
  for (let b = 0; b < count; b++) density[b] = (cumulative[b + 1] - cumulative[b]) / binWidth;
  return density;
}
