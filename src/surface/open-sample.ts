/** The open sample a bulk–boundary count is made on (a chain, ribbon or slab), and the invariant asked for. */
import { BlochHamiltonian } from '../bloch/hamiltonian.js';
import { ModelError, valueText } from '../model/errors.js';
import { validateModel } from '../model/validate.js';
import type { BoundaryInvariant, BulkBoundaryOptions } from './boundary-result.js';
import { wholeNumber } from './common.js';
import { principalLayers, type PrincipalLayers } from './layers.js';
import { openSlab } from './slab.js';

/** The open sample a count is made on: its Hamiltonian, layer masks, and the cut it was opened along. */
export interface OpenSample {
  h: BlochHamiltonian;
  layers: PrincipalLayers;
  width: number;
  edgeLayers: number;
  /** Orbitals of the first (bottom) and last (top) boundary layers. */
  onFirst: Uint8Array;
  onLast: Uint8Array;
}

/** The plain sample along the cut (or the one given), checked, with its boundary layers. */
export function openSample(h: BlochHamiltonian, options: BulkBoundaryOptions, defaultWidth: number): OpenSample {
  const { spec, layers } = options.ribbon === undefined
    ? openSlab(h, options.cut, options.width ?? defaultWidth)
    : { spec: validateModel(options.ribbon), layers: principalLayers(h, options.cut) };
  const what = ['a finite chain (no periodic direction)', 'a ribbon (one periodic direction)', 'a slab (two periodic directions)'][h.dim - 1];
  if (spec.periodic !== h.dim - 1) throw new ModelError('ribbon', `expected ${what}. Value: "${spec.name}" with ${spec.periodic}`);
  const layerOf = spec.orbitals.map((o) => o.layer);
  if (layerOf.some((l) => l === undefined)) throw new ModelError('ribbon', `every orbital needs its layer (0 .. width-1), as the ribbon builder sets. Value: "${spec.name}"`);
  const width = Math.max(...(layerOf as number[])) + 1;
  const edgeLayers = options.edgeLayers === undefined ? Math.max(2, Math.floor(width / 10)) : wholeNumber(options.edgeLayers, 'edgeLayers', 1, Math.max(1, Math.floor(width / 2)));
  return {
    h: new BlochHamiltonian(spec, h.params),
    layers,
    width,
    edgeLayers,
    onFirst: Uint8Array.from(layerOf as number[], (l) => (l < edgeLayers ? 1 : 0)),
    onLast: Uint8Array.from(layerOf as number[], (l) => (l >= width - edgeLayers ? 1 : 0)),
  };
}

const INVARIANTS: BoundaryInvariant[][] = [[], ['winding', 'majorana'], ['chern', 'z2'], ['z2', 'weyl']];

/** The invariant asked for, checked against the dimension. */
export function checkedInvariant(h: BlochHamiltonian, given: unknown): BoundaryInvariant | undefined {
  if (given === undefined) return undefined;
  const allowed = INVARIANTS[h.dim];
  if (!allowed.includes(given as BoundaryInvariant)) throw new ModelError('invariant', `expected ${allowed.map((x) => `"${x}"`).join(' or ')} for a ${h.dim}D model. Value: ${valueText(given)}`);
  return given as BoundaryInvariant;
}

/** Decay lengths the sample must span: below this, end or surface modes of the two sides may hybridise out of the gap. */
export const DECAY_LENGTHS = 4;

/**
 * Refuse to judge a sample too thin for its boundary modes: a state in the gap (distance `delta`
 * from the energy to the bulk bands) decays into the bulk over at most about D / delta planes,
 * D >= ||dH/dk_perp|| (the compiled model's bound along the cut's Miller indices): H(k) - E stays
 * invertible for |Im k_perp| < delta / D, so no evanescent state decays more slowly (the
 * Combes–Thomas estimate, to first order in Im k). Returns the warning, or null when the sample
 * spans DECAY_LENGTHS of them.
 */
export function thinSample(h: BlochHamiltonian, sample: OpenSample, delta: number, what: string): string | null {
  const decay = h.variationBound(sample.layers.miller.map(Math.abs), false) / delta;
  if (sample.width >= DECAY_LENGTHS * decay) return null;
  return `the ${what} (${sample.width} planes) spans fewer than ${DECAY_LENGTHS} decay lengths of its boundary modes (up to ${decay.toPrecision(3)} planes each: D / delta, the Combes–Thomas bound, with the gap ${delta.toPrecision(3)} from the energy): its two sides may hybridise, so no verdict; raise width to at least ${Math.ceil(DECAY_LENGTHS * decay)}`;
}
