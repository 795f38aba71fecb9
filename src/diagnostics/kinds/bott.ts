/** The Bott index of a finite (possibly disordered) two-dimensional sample (Loring & Hastings 2010). */
import { bottCost, bottIndex, type BottOptions, type BottResult } from '../../realspace/bott.js';
import { optionNames, type SweptDiagnostic } from '../diagnostic.js';
import { FERMI_FIELDS, SAMPLE_FIELDS } from './realspace-fields.js';

export const bott: SweptDiagnostic<BottOptions, BottResult> = {
  kind: 'bott',
  options: optionNames<BottOptions>({ ...SAMPLE_FIELDS, ...FERMI_FIELDS }),
  run: bottIndex,
  cost: (request, n) => bottCost(n, request as unknown as BottOptions),
  sizeFields: () => ['sizes'],
  sweep: (r) => ({ value: r.bott, gap: r.checks.spectralGap }),
  headline: ['bott'],
};
