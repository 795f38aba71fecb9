/**
 * The surface spectral function A(k_par, E) = -Im Tr G_surface(k_par, E + i eta) / pi of a
 * half-infinite sample, for both terminations, on a path of the surface zone (a 2D model's edge:
 * k_par from -pi to pi; a 3D model's surface: a path through its 2D zone), with the bulk beside it.
 *
 * G_surface is the Green's function of the outermost principal layer (layers.ts), from the
 * decimation (decimation.ts); the trace runs over that layer's orbitals. The bulk projection is
 * the bulk spectral function of the same decimation: -Im Tr G_bulk / pi of one principal layer of
 * the infinite crystal at the same k_par, i.e. the bulk bands projected onto the surface zone and
 * broadened by the same eta.
 */
import type { BlochHamiltonian } from '../bloch/hamiltonian.js';
import { checkInterrupt } from '../interrupt.js';
import { ModelError, valueText } from '../model/errors.js';
import { kPath, type KPath, type PathSpec } from '../spectra/path.js';
import { bulkRange, checkEnergyWindow, cutInfo, decimationLimits, positiveNumber, wholeNumber, type CutInfo, type DecimationOptions } from './common.js';
import { Decimation } from './decimation.js';
import { principalLayers, splitMatrix, type CutSpec, type PrincipalLayers } from './layers.js';

export interface SurfaceSpectrumOptions extends DecimationOptions {
  /** The surface: a periodic direction to cut open (as `ribbon`), or Miller indices of the lattice planes. */
  cut: CutSpec;
  /** Energy window [from, to] (default: the bulk band range widened by a tenth of the bandwidth each side). */
  energyRange?: [number, number];
  /** Energies sampled across the window, both ends included (default 200). */
  energyCount?: number;
  /** 2D model: k-points across the edge zone, -pi to pi inclusive (default 201). 3D model: per path segment (default 40). */
  nk?: number;
  /** 3D model: path through the surface zone (default its customary path). */
  path?: PathSpec;
}

/** What a decimation grid checked. */
export interface SurfaceChecks {
  warnings: string[];
  /** Decimation steps per solve: the largest and the mean. */
  steps: { max: number; mean: number };
  /** Solves that did not meet the tolerance within maxSteps. */
  unconverged: number;
  /** The bulk band range the energies were checked against (sampled on a uniform grid). */
  bulkRange: [number, number];
}

export interface SurfaceSpectrumResult {
  kind: 'surface-spectrum';
  /** 'edge' for a 2D model, 'surface' for 3D, 'end' for a chain. */
  boundary: 'end' | 'edge' | 'surface';
  cut: CutInfo;
  /** Momenta along the surface zone (fractions of its reciprocal vectors). */
  path: KPath;
  energies: Float64Array;
  eta: number;
  /** -Im Tr G / pi of the surface principal layer, k-major: path.count x energies.length. */
  bottom: Float64Array;
  top: Float64Array;
  /** -Im Tr G_bulk / pi of one principal layer of the infinite crystal, laid out alike. */
  bulk: Float64Array;
  bulkDefinition: string;
  checks: SurfaceChecks;
}

export const BULK_DEFINITION = 'bulk spectral function of the same decimation: -Im Tr G_bulk / pi of one principal layer of the infinite crystal at the same k_par and eta (the bulk bands projected onto the surface zone)';

/**
 * Runs the decimation over `points` k_par (reduced, `dim` each) x `energies`, filling the three
 * weights k-major; returns the step statistics and where the first unconverged solve was.
 */
export function decimationGrid(
  layers: PrincipalLayers, kPar: Float64Array, points: number, energies: Float64Array, eta: number,
  limits: { tolerance: number; maxSteps: number }, out: { bottom: Float64Array; top: Float64Array; bulk: Float64Array },
): { steps: { max: number; mean: number }; unconverged: number; warnings: string[] } {
  const n = layers.size, dim = layers.surfaceDim, ne = energies.length;
  const h00 = splitMatrix(n), h01 = splitMatrix(n);
  const solver = new Decimation(n, limits.tolerance, limits.maxSteps);
  const k = new Float64Array(dim);
  let maxSteps = 0, total = 0, unconverged = 0;
  let first = '';
  for (let p = 0; p < points; p++) {
    checkInterrupt();
    for (let i = 0; i < dim; i++) k[i] = kPar[p * dim + i];
    layers.fill(k, h00, h01);
    for (let e = 0; e < ne; e++) {
      const r = solver.solve(h00, h01, energies[e], eta);
      const at = p * ne + e;
      out.bottom[at] = r.bottom;
      out.top[at] = r.top;
      out.bulk[at] = r.bulk;
      if (r.steps < 0) {
        if (unconverged === 0) first = `k_par = (${Array.from(k, (x) => (x / (2 * Math.PI)).toFixed(4)).join(', ')}) x 2pi, E = ${energies[e].toPrecision(6)}`;
        unconverged++;
        total += limits.maxSteps;
      } else {
        total += r.steps;
        maxSteps = Math.max(maxSteps, r.steps);
      }
    }
  }
  const warnings = unconverged === 0 ? [] : [
    `decimation did not converge at ${unconverged} of ${points * ne} points within maxSteps = ${limits.maxSteps} (tolerance ${limits.tolerance}), first at ${first}: their spectral weights are those of a finite stack of 2^${limits.maxSteps} layers`,
  ];
  return { steps: { max: unconverged > 0 ? limits.maxSteps : maxSteps, mean: total / Math.max(1, points * ne) }, unconverged, warnings };
}

/** The path through the surface zone: -pi..pi for an edge, a labelled path for a surface. */
export function surfacePath(layers: PrincipalLayers, nk: number | undefined, path: PathSpec | undefined): KPath {
  const zone = { vectors: layers.surfaceVectors, periodic: layers.surfaceDim };
  if (layers.surfaceDim === 0) return kPath(zone);
  if (layers.surfaceDim === 1) {
    const count = nk === undefined ? 201 : wholeNumber(nk, 'nk', 3, 100000);
    const edge = [{ label: 'X', k: [-0.5] }, { label: 'Γ', k: [0] }, { label: 'X', k: [0.5] }];
    if (path !== undefined) throw new ModelError('path', `an edge zone is the line -pi..pi; give nk instead of a path. Value: ${valueText(path)}`);
    return kPath(zone, { path: edge, pointsPerSegment: Math.ceil((count - 1) / 2) });
  }
  return kPath(zone, { path, pointsPerSegment: nk === undefined ? 40 : wholeNumber(nk, 'nk', 1, 100000) });
}

/** Surface (or edge) spectral functions of both terminations on a path of the surface zone, with the bulk beside them. */
export function surfaceSpectrum(h: BlochHamiltonian, options: SurfaceSpectrumOptions): SurfaceSpectrumResult {
  if (options === null || typeof options !== 'object') throw new ModelError('options', `expected {cut, ...}. Value: ${valueText(options)}`);
  const layers = principalLayers(h, options.cut);
  const limits = decimationLimits(options);
  const range = bulkRange(h);
  const count = options.energyCount === undefined ? 200 : wholeNumber(options.energyCount, 'energyCount', 1, 100000);
  let lo: number, hi: number;
  if (options.energyRange === undefined) {
    const pad = 0.1 * Math.max(range.max - range.min, 1e-6);
    [lo, hi] = [range.min - pad, range.max + pad];
  } else {
    const w = options.energyRange;
    if (!Array.isArray(w) || w.length !== 2 || !w.every((x) => typeof x === 'number' && Number.isFinite(x)) || !(w[0] <= w[1]) || (w[0] === w[1] && count > 1)) {
      throw new ModelError('energyRange', `expected [from, to] with from < to (equal only for one energy). Value: ${valueText(w)}`);
    }
    [lo, hi] = w;
    checkEnergyWindow(lo, hi, range, 'energyRange', w);
  }
  const energies = new Float64Array(count);
  for (let e = 0; e < count; e++) energies[e] = count === 1 ? lo : lo + ((hi - lo) * e) / (count - 1);
  const step = count > 1 ? (hi - lo) / (count - 1) : 0.01 * Math.max(range.max - range.min, 1e-6);
  const eta = options.eta === undefined ? step : positiveNumber(options.eta, 'eta', 'the broadening eta');
  const path = surfacePath(layers, options.nk, options.path);
  const kPar = path.fractions.map((f) => 2 * Math.PI * f);
  const size = path.count * count;
  const out = { bottom: new Float64Array(size), top: new Float64Array(size), bulk: new Float64Array(size) };
  const run = decimationGrid(layers, kPar, path.count, energies, eta, limits, out);
  return {
    kind: 'surface-spectrum',
    boundary: (['end', 'edge', 'surface'] as const)[layers.surfaceDim],
    cut: cutInfo(layers),
    path,
    energies,
    eta,
    ...out,
    bulkDefinition: BULK_DEFINITION,
    checks: { warnings: run.warnings, steps: run.steps, unconverged: run.unconverged, bulkRange: [range.min, range.max] },
  };
}

/**
 * Memory and time of a surface spectrum before it runs: n the model's orbitals, dim its periodic
 * directions (the registry knows it from the model; 2 if not given). A principal layer of one
 * plane is assumed (the thickness is known only once the terms are read).
 */
export function surfaceSpectrumCost(n: number, options: Partial<SurfaceSpectrumOptions>, dim = 2): { bytes: number; seconds: number } {
  const energies = typeof options.energyCount === 'number' && options.energyCount >= 1 ? options.energyCount : 200;
  const nk = typeof options.nk === 'number' && options.nk >= 1 ? options.nk : dim === 3 ? 40 : 201;
  const points = dim === 3 ? 4 * nk : nk;
  return { bytes: 3 * 8 * points * energies + 40 * 16 * n * n, seconds: points * energies * decimationSeconds(n) };
}

/**
 * One decimation solve on a principal layer of m orbitals: about 30 steps of an inverse and six
 * products, ~8 m^3 complex multiply-adds each; a 4-orbital layer measured near 8 us on the bench machine.
 */
export function decimationSeconds(m: number): number {
  return 2e-6 + 1e-7 * m ** 3;
}
