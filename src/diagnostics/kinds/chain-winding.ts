/** The real-space winding number of a finite chiral chain (Mondragon-Shem, Hughes, Song & Prodan 2014). */
import { chainWinding as windingOfChain, chainWindingCost, type ChainWindingOptions, type ChainWindingResult } from '../../realspace/winding.js';
import { optionNames, type SweptDiagnostic } from '../diagnostic.js';
import { SAMPLE_FIELDS } from './realspace-fields.js';

export const chainWinding: SweptDiagnostic<ChainWindingOptions, ChainWindingResult> = {
  kind: 'chain-winding',
  options: optionNames<ChainWindingOptions>({ ...SAMPLE_FIELDS, sublattice: true, window: true }),
  run: windingOfChain,
  cost: (request, n) => chainWindingCost(n, request as unknown as ChainWindingOptions),
  sizeFields: () => ['sizes'],
  // An open chain's end modes sit at zero energy: no bulk gap is measured here.
  sweep: (r) => ({ value: r.winding, gap: Number.NaN }),
  headline: ['winding'],
};
