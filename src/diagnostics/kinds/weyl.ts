/** Weyl points of a three-dimensional model and their chiralities. */
import { weylPoints, type WeylOptions, type WeylResult } from '../../topology/weyl.js';
import { optionNames, type Diagnostic } from '../diagnostic.js';
import { gapGridCost } from './gap.js';

export const weyl: Diagnostic<WeylOptions, WeylResult> = {
  kind: 'weyl',
  options: optionNames<WeylOptions>({ bands: true, gapTolerance: true, grid: true, radius: true, sphere: true, maxCandidates: true }),
  run: weylPoints,
  cost: gapGridCost,
  headline: ['points', 'total'],
};
