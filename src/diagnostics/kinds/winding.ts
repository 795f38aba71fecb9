/** The winding number of a chiral (sublattice-symmetric) one-dimensional model. */
import { count, denseBytes, groupSize, solveSeconds } from '../../cost.js';
import { windingNumber, type WindingOptions, type WindingResult } from '../../topology/chiral.js';
import { optionNames, pointOutcome, type SweptDiagnostic } from '../diagnostic.js';

export const winding: SweptDiagnostic<WindingOptions, WindingResult> = {
  kind: 'winding',
  options: optionNames<WindingOptions>({ gapTolerance: true, sublattice: true, points: true }),
  run: windingNumber,
  cost(request, n) {
    const points = count(request.points, 256);
    return { bytes: denseBytes(n) + 4 * 16 * n * groupSize(request, n), seconds: points * solveSeconds(n) };
  },
  sizeFields: () => ['points'],
  sweep: (r) => pointOutcome(r.winding, r),
  headline: ['winding'],
};
