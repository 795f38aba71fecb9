/** Hybrid Wannier centres from Wilson loops, as they flow across the zone; splits into parts. */
import { gridCost, gridCounts, groupSize } from '../../cost.js';
import { wannierFlow as flowOfCentres, type WannierFlowOptions, type WannierFlowResult } from '../../topology/wilson.js';
import { DEFAULT_SPLIT_GRID, SPLIT_ROWS, type WannierFlowPart } from '../../topology/parts.js';
import { optionNames, type SplitDiagnostic } from '../diagnostic.js';

export const wannierFlow: SplitDiagnostic<WannierFlowOptions, WannierFlowResult | WannierFlowPart> = {
  kind: 'wannier-flow',
  options: optionNames<WannierFlowOptions>({ bands: true, gapTolerance: true, grid: true, plane: true, part: true }),
  nested: { plane: ['normal', 'at'], part: ['index', 'count'] },
  // With `part`, one part of the grid (joined by topology/parts.ts).
  run: (h, options): WannierFlowResult | WannierFlowPart => flowOfCentres(h, options),
  cost(request, n) {
    const m = groupSize(request, n);
    const [along, across] = gridCounts(request.grid, 2, DEFAULT_SPLIT_GRID);
    return gridCost(n, m, [along, across + 1], 24 * m);
  },
  splitRows: SPLIT_ROWS['wannier-flow'],
  headline: ['winding'],
};
