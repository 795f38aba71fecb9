/** The Berry curvature of a band group over a plane of the zone; splits into row parts. */
import { gridCost, gridCounts, groupSize } from '../../cost.js';
import { curvatureMap, type CurvatureOptions, type CurvatureResult } from '../../topology/curvature.js';
import { DEFAULT_SPLIT_GRID, SPLIT_ROWS, type CurvaturePart } from '../../topology/parts.js';
import { optionNames, type SplitDiagnostic } from '../diagnostic.js';

export const curvature: SplitDiagnostic<CurvatureOptions, CurvatureResult | CurvaturePart> = {
  kind: 'curvature',
  options: optionNames<CurvatureOptions>({ bands: true, gapTolerance: true, method: true, grid: true, plane: true, perBand: true, part: true }),
  nested: { plane: ['normal', 'at'], part: ['index', 'count'] },
  // With `part`, one part of the grid (joined by topology/parts.ts).
  run: (h, options): CurvatureResult | CurvaturePart => curvatureMap(h, options),
  cost(request, n) {
    const m = groupSize(request, n);
    return gridCost(n, m, gridCounts(request.grid, 2, DEFAULT_SPLIT_GRID), 8 * (1 + (request.perBand === true ? m : 0)));
  },
  splitRows: SPLIT_ROWS.curvature,
  headline: ['total'],
};
