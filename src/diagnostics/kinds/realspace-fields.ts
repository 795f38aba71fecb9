/** The options every real-space kind takes: the sample (src/realspace/sample.ts) and, for an occupied projector, the Fermi level. */
import type { Exact } from '../../model/field-names.js';
import type { FermiOptions } from '../../realspace/occupied.js';
import type { SampleOptions } from '../../realspace/sample.js';

export const SAMPLE_FIELDS = {
  sizes: true, boundary: true, onsiteDisorder: true, bondDisorder: true, parameterDisorder: true, vacancies: true, displacement: true, decayLength: true, seed: true,
} as const satisfies Exact<SampleOptions>;

export const FERMI_FIELDS = { fermiEnergy: true, gapTolerance: true } as const satisfies Exact<FermiOptions>;

/** The model's term count, for costs that scale with the sparse Hamiltonian. */
export const termCount = (request: Readonly<Record<string, unknown>>): number => {
  const model = request.model as { terms?: unknown[] } | undefined;
  return Array.isArray(model?.terms) ? model.terms.length : 1;
};
