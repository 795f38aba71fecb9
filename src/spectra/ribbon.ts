/**
 * Ribbon (and slab, and open-chain) spectra with the weight of every state on each edge.
 *
 * The model is cut open along one periodic direction (`ribbon` builder: `width` cells, hard-wall
 * edges, every orbital tagged with its `layer` 0 .. width-1) and its bands are computed over the
 * remaining periodic momentum. Edge weights: for each state, the summed |amplitude|^2 on the
 * orbitals of the first `edgeLayers` layers (edge "first", layer 0 side) and of the last
 * `edgeLayers` layers (edge "last", layer width-1 side). A state localised on one edge has weight
 * near 1 there; a bulk state about edgeLayers / width on each.
 */
import { BlochHamiltonian } from '../bloch/hamiltonian.js';
import { checkInterrupt } from '../interrupt.js';
import { ribbon } from '../model/builders/open.js';
import { ModelError, valueText } from '../model/errors.js';
import { BandSampler, type SourceOptions, type SpectrumChecks, type SpectrumSource } from './common.js';
import { kPath, type KPath, type PathSpec } from './path.js';

export interface RibbonSpectrumOptions extends SourceOptions {
  /** The periodic direction (index into the model's vectors) to open. */
  direction: number;
  /** Cells kept along it. */
  width: number;
  /**
   * k-points across a ribbon's zone, -pi to pi inclusive through Γ (default 201; an even count is
   * raised by one so that Γ is sampled); per path segment for a slab (default 40).
   */
  nk?: number;
  /** Layers counted as each edge (default: a tenth of the width, at least 1). */
  edgeLayers?: number;
  /** A slab's path through its own zone (default: its customary high-symmetry path). */
  path?: PathSpec;
}

export interface RibbonSpectrumResult {
  kind: 'ribbon';
  /** The name of the opened model, e.g. "QWZ ribbon (20 cells along a2)". */
  name: string;
  direction: number;
  width: number;
  /** Momenta along the remaining periodic directions (a single point with no k for an open chain). */
  path: KPath;
  bandCount: number;
  /** Ascending energies, `bandCount` per k (k-major). */
  energies: Float64Array;
  edges: {
    layers: number;
    definition: string;
    /** Weight of each state on the layer-0 edge, laid out like `energies`. */
    first: Float64Array;
    /** Weight of each state on the layer-(width-1) edge. */
    last: Float64Array;
  };
  checks: SpectrumChecks;
}

/** Cut the model open along `direction` and compute its spectrum with edge weights. */
export function ribbonSpectrum(source: SpectrumSource, options: RibbonSpectrumOptions): RibbonSpectrumResult {
  if (options === null || typeof options !== 'object') throw new ModelError('options', `expected {direction, width, ...}. Value: ${valueText(options)}`);
  const bulk = source instanceof BlochHamiltonian ? source.spec : source;
  const params = options.params ?? (source instanceof BlochHamiltonian ? source.params : {});
  const { direction, width } = options;
  const spec = ribbon(bulk, direction, width);
  const hamiltonian = new BlochHamiltonian(spec, params, { convention: options.convention ?? 'lattice' });
  const edgeLayers = options.edgeLayers ?? Math.max(1, Math.floor(width / 10));
  if (!Number.isInteger(edgeLayers) || edgeLayers < 1 || edgeLayers > width) {
    throw new ModelError('edgeLayers', `expected a whole number from 1 to the width ${width}. Value: ${valueText(edgeLayers)}`);
  }
  const path = ribbonPath(spec.periodic, spec, options);
  const sampler = new BandSampler(hamiltonian);
  const nb = sampler.bandCount;
  const onFirst = new Uint8Array(nb), onLast = new Uint8Array(nb);
  spec.orbitals.forEach((o, i) => {
    const layer = o.layer ?? -1;
    onFirst[i] = layer >= 0 && layer < edgeLayers ? 1 : 0;
    onLast[i] = layer >= width - edgeLayers ? 1 : 0;
  });
  const energies = new Float64Array(path.count * nb);
  const first = new Float64Array(path.count * nb);
  const last = new Float64Array(path.count * nb);
  const k = new Float64Array(path.dim);
  const vectors = sampler.vectors;
  for (let p = 0; p < path.count; p++) {
    checkInterrupt();
    for (let i = 0; i < path.dim; i++) k[i] = 2 * Math.PI * path.fractions[p * path.dim + i];
    energies.set(sampler.solveWithVectors(k), p * nb);
    for (let row = 0; row < nb; row++) {
      if (!onFirst[row] && !onLast[row]) continue;
      for (let n = 0; n < nb; n++) {
        const w = vectors[2 * (row * nb + n)] ** 2 + vectors[2 * (row * nb + n) + 1] ** 2;
        if (onFirst[row]) first[p * nb + n] += w;
        if (onLast[row]) last[p * nb + n] += w;
      }
    }
  }
  const warnings: string[] = [];
  if (2 * edgeLayers > width) warnings.push(`the two edges overlap: ${edgeLayers} edge layers on each side of a ${width}-cell ribbon`);
  return {
    kind: 'ribbon',
    name: spec.name,
    direction,
    width,
    path,
    bandCount: nb,
    energies,
    edges: {
      layers: edgeLayers,
      definition: `weight of each state on the orbitals of the first ${edgeLayers} and the last ${edgeLayers} of the ${width} cells along the open direction a${direction + 1}`,
      first,
      last,
    },
    checks: { minGap: null, warnings },
  };
}

function ribbonPath(periodic: number, spec: Parameters<typeof kPath>[0], options: RibbonSpectrumOptions): KPath {
  const nk = options.nk ?? (periodic >= 2 ? 40 : 201);
  if (!Number.isInteger(nk) || nk < (periodic === 1 ? 2 : 1) || nk > 100000) throw new ModelError('nk', `expected a whole number from 2 to 100000. Value: ${valueText(nk)}`);
  if (periodic === 0) return kPath(spec);
  if (periodic === 1) {
    const edge = [{ label: 'X', k: [-0.5] }, { label: 'Γ', k: [0] }, { label: 'X', k: [0.5] }];
    return kPath(spec, { path: options.path ?? edge, pointsPerSegment: Math.ceil((nk - 1) / 2) });
  }
  return kPath(spec, { path: options.path, pointsPerSegment: nk });
}
