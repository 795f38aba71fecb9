/** The Hall conductivity of the filled bands, at one Fermi level or a list of them. */
import { hallConductivity, type HallOptions, type HallResult } from '../../topology/hall.js';
import { optionNames, type Diagnostic } from '../diagnostic.js';
import { chernGridCost } from './chern.js';

export const hall: Diagnostic<HallOptions, HallResult> = {
  kind: 'hall',
  options: optionNames<HallOptions>({ bands: true, gapTolerance: true, mu: true, grid: true, plane: true }),
  nested: { plane: ['normal', 'at'] },
  run: hallConductivity,
  cost: chernGridCost,
  headline: ['sigma', 'siemens'],
};
