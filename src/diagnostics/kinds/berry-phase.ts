/** The Berry (Zak) phase of a band group around a closed loop, with its Wannier centres. */
import { count, denseBytes, groupSize, solveSeconds } from '../../cost.js';
import { berryPhase as phaseAroundLoop, type BerryPhaseOptions, type BerryPhaseResult } from '../../topology/berry.js';
import { optionNames, type Diagnostic } from '../diagnostic.js';

export const berryPhase: Diagnostic<BerryPhaseOptions, BerryPhaseResult> = {
  kind: 'berry-phase',
  options: optionNames<BerryPhaseOptions>({ bands: true, gapTolerance: true, loop: true, wraps: true, points: true }),
  run: phaseAroundLoop,
  cost(request, n) {
    const points = count(request.points, Array.isArray(request.loop) ? request.loop.length : 256);
    return { bytes: denseBytes(n) + 4 * 16 * n * groupSize(request, n), seconds: points * solveSeconds(n) };
  },
  sizeFields: () => ['points'],
  headline: ['phase', 'polarization'],
};
