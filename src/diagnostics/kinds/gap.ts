/** The direct gap of a band group over a k-grid, and where it is smallest. */
import { gridCost, gridCounts } from '../../cost.js';
import { directGap, type GapOptions, type GapResult } from '../../spectra/gap.js';
import { optionNames, type SweptDiagnostic } from '../diagnostic.js';

/** The grid a gap scan samples when none is given, by periodic dimension (spectra/gap.ts). */
export const gapGridCost = (request: Readonly<Record<string, unknown>>, n: number, dim: number) =>
  gridCost(n, 0, gridCounts(request.grid, dim, [1, 256, 64, 24][dim] ?? 24), 16);

export const gap: SweptDiagnostic<GapOptions, GapResult> = {
  kind: 'gap',
  options: optionNames<GapOptions>({ bands: true, grid: true, tolerance: true }),
  run: directGap,
  cost: gapGridCost,
  // A gap map's value is the gap itself.
  sweep: (r) => ({ value: r.minGap, gap: r.minGap }),
  quantised: false,
  headline: ['minGap', 'at'],
};
