/** The spin Bott index of a finite time-reversal-symmetric sample (Huang & Liu 2018). */
import { bottCost } from '../../realspace/bott.js';
import { spinBottIndex, type SpinBottOptions, type SpinBottResult } from '../../realspace/spin-bott.js';
import { optionNames, type SweptDiagnostic } from '../diagnostic.js';
import { FERMI_FIELDS, SAMPLE_FIELDS } from './realspace-fields.js';

export const spinBott: SweptDiagnostic<SpinBottOptions, SpinBottResult> = {
  kind: 'spin-bott',
  options: optionNames<SpinBottOptions>({ ...SAMPLE_FIELDS, ...FERMI_FIELDS }),
  run: spinBottIndex,
  cost: (request, n) => bottCost(n, request as unknown as SpinBottOptions),
  sizeFields: () => ['sizes'],
  sweep: (r) => ({ value: r.spinBott, gap: r.checks.spectralGap }),
  headline: ['spinBott'],
};
