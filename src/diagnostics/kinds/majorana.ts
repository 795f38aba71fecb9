/** Kitaev's Majorana number of a one-dimensional superconductor, from Pfaffians at k = 0 and pi. */
import { denseBytes, solveSeconds } from '../../cost.js';
import { majoranaNumber, type MajoranaResult } from '../../topology/chiral.js';
import type { TopologyOptions } from '../../topology/common.js';
import { optionNames, pointOutcome, type SweptDiagnostic } from '../diagnostic.js';

type MajoranaOptions = Omit<TopologyOptions, 'bands'>;

export const majorana: SweptDiagnostic<MajoranaOptions, MajoranaResult> = {
  kind: 'majorana',
  options: optionNames<MajoranaOptions>({ gapTolerance: true }),
  run: majoranaNumber,
  cost: (_request, n) => ({ bytes: denseBytes(n), seconds: 4 * solveSeconds(n) }),
  sweep: (r) => pointOutcome(r.majorana, r),
  headline: ['majorana'],
};
