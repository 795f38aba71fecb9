/** Band energies along a path of high-symmetry points. */
import { denseBytes, pathPoints, solveSeconds } from '../../cost.js';
import { bandStructure, type BandsOptions, type BandsResult } from '../../spectra/bands.js';
import { optionNames, type Diagnostic } from '../diagnostic.js';

export const bands: Diagnostic<BandsOptions, BandsResult> = {
  kind: 'bands',
  options: optionNames<BandsOptions>({ bands: true, tolerance: true, path: true, pointsPerSegment: true }),
  run: bandStructure,
  cost(request, n) {
    const p = pathPoints(request, 60);
    return { bytes: denseBytes(n) + p * n * 16, seconds: p * solveSeconds(n) };
  },
  sizeFields: () => ['pointsPerSegment'],
  headline: ['bandCount'],
};
