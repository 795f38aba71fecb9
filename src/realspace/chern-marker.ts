/**
 * The local Chern marker as one diagnostic with two methods: 'dense' (marker.ts: the projector from
 * the eigensolver, every cell at once, small samples) and 'chebyshev' (kpm-marker.ts: chosen cells
 * of large samples, memory linear in the sample). Default rule: dense up to 2000 orbitals in the
 * sample, Chebyshev above. Both give a result of kind 'local-marker' naming its `method`.
 */
import type { BlochHamiltonian } from '../bloch/hamiltonian.js';
import type { CostEstimate } from '../cost.js';
import { ModelError, valueText } from '../model/errors.js';
import { chebyshevMarker, chebyshevMarkerCost, type ChebyshevMarkerOptions } from './kpm-marker.js';
import { localMarker, localMarkerCost, type LocalMarkerOptions, type LocalMarkerResult } from './marker.js';

export interface ChernMarkerOptions extends LocalMarkerOptions, ChebyshevMarkerOptions {
  /** 'dense' or 'chebyshev'; default dense up to 2000 orbitals, Chebyshev above. */
  method?: 'dense' | 'chebyshev';
}

const DENSE_LIMIT = 2000;

function chooseMethod(orbitals: number, options: ChernMarkerOptions): 'dense' | 'chebyshev' {
  const m = options.method;
  if (m !== undefined && m !== 'dense' && m !== 'chebyshev') throw new ModelError('method', `expected "dense" or "chebyshev". Value: ${valueText(m)}`);
  if (m !== undefined) return m;
  const cells = Array.isArray(options.sizes) ? options.sizes.reduce((a, b) => a * (typeof b === 'number' && b > 0 ? b : 1), 1) : 1;
  return cells * orbitals <= DENSE_LIMIT ? 'dense' : 'chebyshev';
}

export function chernMarkerCost(orbitals: number, terms: number, options: ChernMarkerOptions): CostEstimate {
  return chooseMethod(orbitals, options) === 'dense' ? localMarkerCost(orbitals, options) : chebyshevMarkerCost(orbitals, terms, options);
}

export function chernMarker(h: BlochHamiltonian, options: ChernMarkerOptions): LocalMarkerResult {
  if (chooseMethod(h.size, options) === 'dense') {
    if (options.order !== undefined) throw new ModelError('order', `the dense method has no expansion order. Value: ${valueText(options.order)}`);
    return localMarker(h, options);
  }
  if (options.gapTolerance !== undefined) throw new ModelError('gapTolerance', `the Chebyshev method has no gap tolerance (it reports the local density at E_F). Value: ${valueText(options.gapTolerance)}`);
  return chebyshevMarker(h, options);
}
