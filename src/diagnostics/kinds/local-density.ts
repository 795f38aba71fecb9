/** The local density of states of a finite sample at one energy, by cell (kernel polynomial method or dense). */
import { localDensity as densityAtEnergy, localDensityCost, type LocalDensityOptions, type LocalDensityResult } from '../../realspace/ldos.js';
import { optionNames, type Diagnostic } from '../diagnostic.js';
import { SAMPLE_FIELDS, termCount } from './realspace-fields.js';

export const localDensity: Diagnostic<LocalDensityOptions, LocalDensityResult> = {
  kind: 'local-density',
  options: optionNames<LocalDensityOptions>({ ...SAMPLE_FIELDS, energy: true, order: true, cells: true, probes: true, method: true }),
  run: densityAtEnergy,
  cost: (request, n) => localDensityCost(n, termCount(request), request as unknown as LocalDensityOptions),
  sizeFields: () => ['sizes', 'order'],
  headline: ['energy'],
};
