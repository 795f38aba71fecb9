/** The local Chern marker of a finite sample, by cell (Bianco & Resta 2011): dense or by Chebyshev expansion. */
import { chernMarker, chernMarkerCost, type ChernMarkerOptions } from '../../realspace/chern-marker.js';
import type { LocalMarkerResult } from '../../realspace/marker.js';
import { optionNames, type Diagnostic } from '../diagnostic.js';
import { FERMI_FIELDS, SAMPLE_FIELDS, termCount } from './realspace-fields.js';

export const localMarker: Diagnostic<ChernMarkerOptions, LocalMarkerResult> = {
  kind: 'local-marker',
  options: optionNames<ChernMarkerOptions>({ ...SAMPLE_FIELDS, ...FERMI_FIELDS, method: true, cells: true, order: true }),
  run: chernMarker,
  cost: (request, n) => chernMarkerCost(n, termCount(request), request as unknown as ChernMarkerOptions),
  sizeFields: () => ['sizes', 'order'],
  headline: ['total'],
};
