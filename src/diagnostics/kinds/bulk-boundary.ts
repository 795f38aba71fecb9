/** Boundary modes counted on both ends (1D), edges (2D) or surfaces (3D) of an open sample, against the bulk invariant of the same parameters. */
import { bulkBoundary as boundaryAgainstBulk, bulkBoundaryCost, type BulkBoundaryOptions, type BulkBoundaryResult } from '../../surface/bulk-boundary.js';
import { optionNames, type Diagnostic } from '../diagnostic.js';

export const bulkBoundary: Diagnostic<BulkBoundaryOptions, BulkBoundaryResult> = {
  kind: 'bulk-boundary',
  options: optionNames<BulkBoundaryOptions>({ cut: true, energy: true, invariant: true, width: true, edgeLayers: true, nk: true, sublattice: true, ribbon: true }),
  run: boundaryAgainstBulk,
  cost: (request, n, dim) => bulkBoundaryCost(n, request as Partial<BulkBoundaryOptions>, dim),
  sizeFields: () => ['width', 'nk'],
  headline: ['verdict', 'summary'],
};
