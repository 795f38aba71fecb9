/**
 * The bulk gap a boundary count is made in: each bulk band's range over a set of momenta (the
 * whole zone, or a plane or line of it), and the energy checked against them.
 */
import type { BlochHamiltonian } from '../bloch/hamiltonian.js';
import { checkInterrupt } from '../interrupt.js';
import { ModelError, valueText } from '../model/errors.js';
import { BandSampler } from '../spectra/common.js';

export interface BandRanges { lo: Float64Array; hi: Float64Array }

/** For each bulk band, its lowest and highest energy over `count` momenta (`kAt(p, out)` writes the p-th). */
export function bandRanges(h: BlochHamiltonian, count: number, kAt: (p: number, out: Float64Array) => void): BandRanges {
  const sampler = new BandSampler(h);
  const n = h.size;
  const lo = new Float64Array(n).fill(Infinity), hi = new Float64Array(n).fill(-Infinity);
  const k = new Float64Array(h.dim);
  for (let p = 0; p < count; p++) {
    if (p % 256 === 0) checkInterrupt();
    kAt(p, k);
    const e = sampler.solve(k);
    for (let i = 0; i < n; i++) { lo[i] = Math.min(lo[i], e[i]); hi[i] = Math.max(hi[i], e[i]); }
  }
  return { lo, hi };
}

/** Points per direction of the zone grid the bulk gap is sampled on, by dimension (1D, 2D, 3D). */
export const GAP_GRID = [0, 512, 64, 16];

/** Each bulk band's range over a uniform grid of the whole zone (GAP_GRID points per direction). */
export function zoneBandRanges(h: BlochHamiltonian): BandRanges & { grid: number[] } {
  const per = GAP_GRID[h.dim];
  const ranges = bandRanges(h, per ** h.dim, (p, k) => {
    let rest = p;
    for (let i = 0; i < h.dim; i++) { k[i] = -Math.PI + (2 * Math.PI * (rest % per)) / per; rest = Math.floor(rest / per); }
  });
  return { ...ranges, grid: Array(h.dim).fill(per) };
}

/**
 * The energy of the count (default: the middle of the gap between the lower and the upper half of
 * the bands) and the bulk gap it lies in; an energy in a band or outside them is an error naming
 * `energy` and the value.
 */
export function energyInGap(ranges: BandRanges, given: unknown): { energy: number; below: number; gap: [number, number] } {
  const { lo, hi } = ranges;
  const n = lo.length;
  let energy: number;
  if (given === undefined) {
    const m = Math.floor(n / 2);
    if (n < 2 || lo[m] - hi[m - 1] <= 1e-9 * Math.max(1, hi[n - 1] - lo[0])) throw new ModelError('energy', `the bulk has no gap between bands ${m - 1} and ${m} (they overlap on [${lo[m].toPrecision(4)}, ${hi[m - 1].toPrecision(4)}]); give an energy inside a gap`);
    energy = (hi[m - 1] + lo[m]) / 2;
  } else {
    if (typeof given !== 'number' || !Number.isFinite(given)) throw new ModelError('energy', `expected a finite number. Value: ${valueText(given)}`);
    energy = given;
  }
  const below = hi.filter((x) => x < energy).length;
  const inBand = Array.from(lo).findIndex((l, i) => l <= energy && energy <= hi[i]);
  if (below === 0 || below === n || inBand >= 0) {
    const where = inBand >= 0 ? `bulk band ${inBand} spans [${lo[inBand].toPrecision(4)}, ${hi[inBand].toPrecision(4)}]` : `the bulk bands span [${lo[0].toPrecision(4)}, ${hi[n - 1].toPrecision(4)}]`;
    throw new ModelError('energy', `is not inside a bulk gap: ${where}. Value: ${valueText(energy)}`);
  }
  // A gap at rounding level (a closing the grid hits exactly) is no gap.
  if (lo[below] - hi[below - 1] <= 1e-9 * Math.max(1, hi[n - 1] - lo[0])) throw new ModelError('energy', `is not inside a bulk gap: bands ${below - 1} and ${below} touch at ${energy.toPrecision(4)} (the bulk is gapless there). Value: ${valueText(energy)}`);
  return { energy, below, gap: [hi[below - 1], lo[below]] };
}
