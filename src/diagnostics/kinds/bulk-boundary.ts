/** Edge modes counted on both edges at an energy in the bulk gap, against the bulk invariant of the same parameters. */
import { bulkBoundary as edgesAgainstBulk, bulkBoundaryCost, type BulkBoundaryOptions, type BulkBoundaryResult } from '../../surface/bulk-boundary.js';
import { optionNames, type Diagnostic } from '../diagnostic.js';

export const bulkBoundary: Diagnostic<BulkBoundaryOptions, BulkBoundaryResult> = {
  kind: 'bulk-boundary',
  options: optionNames<BulkBoundaryOptions>({ cut: true, energy: true, invariant: true, width: true, edgeLayers: true, nk: true, ribbon: true }),
  run: edgesAgainstBulk,
  cost: (request, n) => bulkBoundaryCost(n, request as Partial<BulkBoundaryOptions>),
  sizeFields: () => ['width', 'nk'],
  headline: ['verdict', 'summary'],
};
