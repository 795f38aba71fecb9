/** Where a band group's gap closes: grid minima refined to the crossing points. */
import { findGapClosings, type GapClosingOptions, type GapClosingResult } from '../../spectra/gap.js';
import { optionNames, type Diagnostic } from '../diagnostic.js';
import { gapGridCost } from './gap.js';

export const gapClosings: Diagnostic<GapClosingOptions, GapClosingResult> = {
  kind: 'gap-closings',
  options: optionNames<GapClosingOptions>({ bands: true, grid: true, tolerance: true, maxCandidates: true }),
  run: findGapClosings,
  cost: gapGridCost,
  headline: ['points'],
};
