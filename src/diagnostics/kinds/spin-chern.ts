/** The spin Chern number: Chern numbers of the spin-up and spin-down halves of a band group. */
import type { ChernOptions } from '../../topology/chern.js';
import { spinChern as spinChernNumber, type SpinChernResult } from '../../topology/z2.js';
import { optionNames, type Diagnostic } from '../diagnostic.js';
import { chernGridCost } from './chern.js';

export const spinChern: Diagnostic<ChernOptions, SpinChernResult> = {
  kind: 'spin-chern',
  options: optionNames<ChernOptions>({ bands: true, gapTolerance: true, grid: true, plane: true, maxGrid: true }),
  nested: { plane: ['normal', 'at'] },
  run: spinChernNumber,
  cost: chernGridCost,
  headline: ['spinChern', 'z2'],
};
