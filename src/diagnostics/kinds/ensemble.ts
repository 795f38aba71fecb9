/** A real-space invariant averaged over seeded disordered samples, with its standard error. */
import { disorderEnsemble, ensembleCost, type EnsembleOptions, type EnsembleResult } from '../../realspace/ensemble.js';
import { optionNames, type SweptDiagnostic } from '../diagnostic.js';
import { FERMI_FIELDS, SAMPLE_FIELDS, termCount } from './realspace-fields.js';

export const ensemble: SweptDiagnostic<EnsembleOptions, EnsembleResult> = {
  kind: 'ensemble',
  options: optionNames<EnsembleOptions>({
    ...SAMPLE_FIELDS, ...FERMI_FIELDS, of: true, samples: true, first: true, sublattice: true, window: true, method: true, cells: true, order: true,
  }),
  run: disorderEnsemble,
  cost: (request, n) => ensembleCost(n, termCount(request), request as unknown as EnsembleOptions),
  sizeFields: () => ['samples', 'sizes'],
  // An average is not quantised: a phase map of it is a continuous map (no boundaries to refine),
  // and each point keeps its standard error, and its members for joining blocks computed apart.
  sweep: (r) => ({
    value: r.mean, gap: Number.NaN, standardError: r.standardError,
    members: { first: r.members[0], values: Array.from(r.values, (v) => (Number.isNaN(v) ? null : v)) },
  }),
  quantised: false,
  headline: ['mean', 'standardError', 'count'],
};
