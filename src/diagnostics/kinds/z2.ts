/** The Z2 index of a time-reversal-symmetric band group: by Wannier-centre flow or by Fu–Kane parities. */
import { autoGridCost, gridCost, gridCounts, groupSize } from '../../cost.js';
import { z2Index, type Z2Options, type Z2Result } from '../../topology/z2.js';
import { optionNames, pointOutcome, type SweptDiagnostic } from '../diagnostic.js';

export const z2: SweptDiagnostic<Z2Options, Z2Result> = {
  kind: 'z2',
  options: optionNames<Z2Options>({ bands: true, gapTolerance: true, method: true, grid: true, maxGrid: true, inversion: true }),
  run: z2Index,
  cost(request, n, dim) {
    const m = groupSize(request, n);
    const planes = dim === 3 ? 6 : 1;
    const auto = request.grid === 'auto' || request.grid === undefined;
    const [along, across] = auto ? [16, 8] : gridCounts(request.grid, 2, 64);
    const cost = auto ? autoGridCost(n, m, request, [16, 9], (g) => [g, g / 2 + 1], 24 * m) : gridCost(n, m, [along, across + 1], 24 * m);
    return { bytes: cost.bytes, seconds: planes * cost.seconds };
  },
  sweep: (r) => pointOutcome(r.z2, r),
  headline: ['z2'],
};
