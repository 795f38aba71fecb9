/**
 * Slabs: a 3D model finite along the stacking direction of a cut (`width` lattice planes, hard-wall
 * surfaces), periodic along the surface; its spectrum over a path of the 2D surface zone with the
 * weight of every state on every layer (the ribbon's 3D counterpart; a 2D model gives a ribbon the
 * same way). Built with the model builders: a supercell onto the cut's basis (layers.ts) when the
 * cut is not a lattice direction, then `ribbon` along the stacking direction, so layer l is plane l
 * (0: the 'bottom' surface of the surface spectra, width-1: the 'top').
 */
import { BlochHamiltonian } from '../bloch/hamiltonian.js';
import { checkInterrupt } from '../interrupt.js';
import { ribbon } from '../model/builders/open.js';
import { supercell } from '../model/builders/supercell.js';
import { ModelError, valueText } from '../model/errors.js';
import type { ModelSpec } from '../model/spec.js';
import { BandSampler } from '../spectra/common.js';
import type { KPath, PathSpec } from '../spectra/path.js';
import { cutInfo, type CutInfo } from './common.js';
import { planeBasis, principalLayers, resolveCut, type CutSpec, type PrincipalLayers } from './layers.js';
import { surfacePath } from './spectrum.js';

export interface SlabSpectrumOptions {
  /** The surface: a periodic direction to cut open, or Miller indices of the lattice planes. */
  cut: CutSpec;
  /** Lattice planes in the slab (default 20). */
  width?: number;
  /** 3D: k-points per path segment (default 40); 2D: across the edge zone (default 201). */
  nk?: number;
  /** 3D: path through the surface zone (default its customary path). */
  path?: PathSpec;
}

export interface SlabSpectrumResult {
  kind: 'slab-spectrum';
  /** The name of the slab model. */
  name: string;
  cut: CutInfo;
  width: number;
  path: KPath;
  bandCount: number;
  /** Ascending energies, bandCount per k (k-major). */
  energies: Float64Array;
  /** Weight of state (p, band) on layer l at ((p * bandCount + band) * width + l); each state's weights sum to 1. */
  layerWeights: Float64Array;
  checks: { warnings: string[] };
}

/**
 * The model cut open along `cut` with `width` planes: the slab (or ribbon) model, with `layer` on
 * every orbital, and the principal layers of the cut it was made from.
 */
export function openSlab(h: BlochHamiltonian, cut: CutSpec, width: number, field = 'width'): { spec: ModelSpec; layers: PrincipalLayers } {
  const layers = principalLayers(h, cut);
  if (typeof width !== 'number' || !Number.isInteger(width) || width < 2 || width > 100000) throw new ModelError(field, `expected a whole number of lattice planes from 2 to 100000. Value: ${valueText(width)}`);
  const d = h.dim;
  const miller = resolveCut(cut, d);
  const index = typeof cut === 'number' ? cut : miller.filter((x) => x !== 0).length === 1 && miller.includes(1) ? miller.indexOf(1) : -1;
  // A lattice direction opens as it is; any other plane needs the cut's basis as a supercell first.
  const base = index >= 0 ? h.spec : supercell(h.spec, planeBasis(miller), { name: `${h.spec.name} (planes ${valueText(miller)})` });
  const spec = ribbon(base, index >= 0 ? index : d - 1, width, { name: `${h.spec.name} ${d === 3 ? 'slab' : 'ribbon'} (${width} planes ${valueText(miller)})` });
  return { spec, layers };
}

/** Spectrum of a slab (3D) or ribbon (2D) along a cut, with the weight of every state on every layer. */
export function slabSpectrum(h: BlochHamiltonian, options: SlabSpectrumOptions): SlabSpectrumResult {
  if (options === null || typeof options !== 'object') throw new ModelError('options', `expected {cut, width, ...}. Value: ${valueText(options)}`);
  const width = options.width ?? 20;
  const { spec, layers } = openSlab(h, options.cut, width);
  const slab = new BlochHamiltonian(spec, h.params);
  const path = surfacePath(layers, options.nk, options.path);
  const sampler = new BandSampler(slab);
  const nb = sampler.bandCount;
  const layerOf = Int32Array.from(spec.orbitals, (o) => o.layer ?? 0);
  const energies = new Float64Array(path.count * nb);
  const layerWeights = new Float64Array(path.count * nb * width);
  const k = new Float64Array(path.dim);
  const v = sampler.vectors;
  for (let p = 0; p < path.count; p++) {
    checkInterrupt();
    for (let i = 0; i < path.dim; i++) k[i] = 2 * Math.PI * path.fractions[p * path.dim + i];
    energies.set(sampler.solveWithVectors(k), p * nb);
    for (let row = 0; row < nb; row++) {
      const l = layerOf[row];
      for (let b = 0; b < nb; b++) layerWeights[(p * nb + b) * width + l] += v[2 * (row * nb + b)] ** 2 + v[2 * (row * nb + b) + 1] ** 2;
    }
  }
  return { kind: 'slab-spectrum', name: spec.name, cut: cutInfo(layers), width, path, bandCount: nb, energies, layerWeights, checks: { warnings: [] } };
}

/** Memory and time of a slab spectrum before it runs (n: the model's orbitals, dim: its periodic directions). */
export function slabSpectrumCost(n: number, options: Partial<SlabSpectrumOptions>, dim = 3): { bytes: number; seconds: number } {
  const width = typeof options.width === 'number' && options.width >= 1 ? options.width : 20;
  const nk = typeof options.nk === 'number' && options.nk >= 1 ? options.nk : dim === 3 ? 40 : 201;
  const points = dim === 3 ? 4 * nk : nk;
  const big = n * width;
  return { bytes: 8 * 16 * big * big + points * big * (width + 1) * 8, seconds: points * (4e-6 + 1.5e-7 * big ** 2 + 4e-9 * big ** 3) };
}
