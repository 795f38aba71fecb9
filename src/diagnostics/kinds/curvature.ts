/** The Berry curvature of a band group over a plane of the zone; splits into row parts. */
import { gridCost, gridCounts, groupSize } from '../../cost.js';
import { curvatureMap, type CurvatureOptions, type CurvatureResult } from '../../topology/curvature.js';
import type { CurvaturePart } from '../../topology/parts.js';
import { optionNames, type SplitDiagnostic, type RequestFields } from '../diagnostic.js';

/** The engine's default grid of the grid kinds that split (topology/curvature.ts, wilson.ts). */
export const DEFAULT_SPLIT_GRID = 64;

/** The rows a split grid request has: the smaller grid count (the default when not given). */
export function gridRows(request: RequestFields): number {
  const grid = request.grid;
  if (typeof grid === 'number') return grid;
  if (Array.isArray(grid) && grid.every((n) => typeof n === 'number')) return Math.min(...(grid as number[]));
  return DEFAULT_SPLIT_GRID;
}

export const curvature: SplitDiagnostic<CurvatureOptions, CurvatureResult | CurvaturePart> = {
  kind: 'curvature',
  title: 'Berry curvature',
  options: optionNames<CurvatureOptions>({ bands: true, gapTolerance: true, method: true, grid: true, plane: true, perBand: true, part: true }),
  nested: { plane: ['normal', 'at'], part: ['index', 'count'] },
  // With `part`, one part of the grid (joined by topology/parts.ts).
  run: (h, options): CurvatureResult | CurvaturePart => curvatureMap(h, options),
  cost(request, n) {
    const m = groupSize(request, n);
    return gridCost(n, m, gridCounts(request.grid, 2, DEFAULT_SPLIT_GRID), 8 * (1 + (request.perBand === true ? m : 0)));
  },
  splitRows: gridRows,
  headline: ['total'],
};
