/** The Chern number of a band group on a plane of the zone (Fukui–Hatsugai–Suzuki). */
import { autoGridCost, gridCost, gridCounts, groupSize, type CostEstimate } from '../../cost.js';
import { chernNumber, type ChernOptions, type ChernResult } from '../../topology/chern.js';
import { optionNames, pointOutcome, type SweptDiagnostic, type RequestFields } from '../diagnostic.js';

/** A Chern-type sum: refined until certain on 'auto' (the default), else the grid given. */
export function chernGridCost(request: RequestFields, n: number): CostEstimate {
  const m = groupSize(request, n);
  const fermiSweep = Array.isArray(request.mu);
  if (request.grid === 'auto' || (request.grid === undefined && !fermiSweep)) return autoGridCost(n, m, request, [16, 16], (g) => [g, g], 16);
  return gridCost(n, m, gridCounts(request.grid, 2, fermiSweep ? 128 : 16), 16);
}

export const chern: SweptDiagnostic<ChernOptions, ChernResult> = {
  kind: 'chern',
  options: optionNames<ChernOptions>({ bands: true, gapTolerance: true, grid: true, plane: true, maxGrid: true }),
  nested: { plane: ['normal', 'at'] },
  run: chernNumber,
  cost: chernGridCost,
  sweep: (r) => pointOutcome(r.chern, r),
  headline: ['chern'],
};
