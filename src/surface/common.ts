/**
 * Pieces the surface diagnostics share: the option checks (broadening, decimation limits, energies
 * against the bulk spectrum), the bulk band range, and the result's description of the cut.
 */
import type { BlochHamiltonian } from '../bloch/hamiltonian.js';
import { checkInterrupt } from '../interrupt.js';
import { ModelError, valueText } from '../model/errors.js';
import { BandSampler } from '../spectra/common.js';
import { DECIMATION_MAX_STEPS, DECIMATION_TOLERANCE } from './decimation.js';
import type { PrincipalLayers } from './layers.js';

/** Options of the decimation every surface diagnostic accepts. */
export interface DecimationOptions {
  /** Broadening eta > 0 of omega = E + i eta (energy units of the model). */
  eta?: number;
  /** The iteration stops when every renormalised coupling is below this times the energy scale (default 1e-8: the neglected coupling then changes the weights by about 1e-16 of their largest value). */
  tolerance?: number;
  /** Most decimation steps (default 60, i.e. 2^60 layers). */
  maxSteps?: number;
}

/** The cut as a result reports it. */
export interface CutInfo {
  /** Miller indices of the lattice planes parallel to the surface. */
  miller: number[];
  /** New lattice basis (rows, units of the old vectors): surface vectors, then the stacking step. */
  basis: number[][];
  /** Lattice planes per principal layer. */
  thickness: number;
  /** What the two terminations are. */
  terminations: { bottom: string; top: string };
}

export function cutInfo(layers: PrincipalLayers): CutInfo {
  const d = layers.basis.length;
  const step = `A${d} = ${valueText(layers.basis[d - 1])}`;
  return {
    miller: layers.miller,
    basis: layers.basis,
    thickness: layers.thickness,
    terminations: {
      bottom: `the sample fills the planes from the surface on along +A${d} (${step}, old lattice units): a ribbon's layer-0 edge`,
      top: `the sample fills the planes from the surface on along -A${d}: a ribbon's last edge`,
    },
  };
}

export function positiveNumber(value: unknown, field: string, what: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || !(value > 0)) throw new ModelError(field, `${what} must be a finite number > 0. Value: ${valueText(value)}`);
  return value;
}

export function wholeNumber(value: unknown, field: string, lo: number, hi: number): number {
  if (typeof value !== 'number' || !Number.isInteger(value) || value < lo || value > hi) throw new ModelError(field, `expected a whole number from ${lo} to ${hi}. Value: ${valueText(value)}`);
  return value;
}

export function decimationLimits(options: DecimationOptions): { tolerance: number; maxSteps: number } {
  const tolerance = options.tolerance === undefined ? DECIMATION_TOLERANCE : positiveNumber(options.tolerance, 'tolerance', 'the decimation tolerance');
  if (tolerance >= 1) throw new ModelError('tolerance', `expected a relative tolerance below 1. Value: ${valueText(tolerance)}`);
  const maxSteps = options.maxSteps === undefined ? DECIMATION_MAX_STEPS : wholeNumber(options.maxSteps, 'maxSteps', 1, 200);
  return { tolerance, maxSteps };
}

/** Lowest and highest bulk energy over a uniform grid (8 per direction in 3D, 32 in 2D, 128 in 1D). */
export function bulkRange(h: BlochHamiltonian): { min: number; max: number } {
  const sampler = new BandSampler(h);
  const per = [1, 128, 32, 8][h.dim] ?? 8;
  const total = per ** h.dim;
  const k = new Float64Array(h.dim);
  let min = Infinity, max = -Infinity;
  for (let p = 0; p < total; p++) {
    if (p % 256 === 0) checkInterrupt();
    let rest = p;
    for (let i = 0; i < h.dim; i++) { k[i] = -Math.PI + (2 * Math.PI * (rest % per)) / per; rest = Math.floor(rest / per); }
    const e = sampler.solve(k);
    min = Math.min(min, e[0]);
    max = Math.max(max, e[e.length - 1]);
  }
  return { min, max };
}

/**
 * Refuses an energy (or window) that cannot meet the spectrum: entirely outside the bulk band
 * range widened by a quarter of the bandwidth on each side (surface states can sit a little
 * outside the bulk bands; nothing sits far outside).
 */
export function checkEnergyWindow(lo: number, hi: number, range: { min: number; max: number }, field: string, value: unknown): void {
  const pad = 0.25 * Math.max(range.max - range.min, 1e-12);
  if (hi < range.min - pad || lo > range.max + pad) {
    throw new ModelError(field, `lies outside the spectrum: the bulk bands span [${range.min.toPrecision(4)}, ${range.max.toPrecision(4)}] and nothing can be seen beyond a quarter bandwidth from them. Value: ${valueText(value)}`);
  }
}

/** Reduced k_par of the surface zone from bulk reduced k: k_par_i = sum_j A_ij k_j, folded into [-pi, pi). */
export function projectToSurface(layers: PrincipalLayers, k: ArrayLike<number>): number[] {
  return layers.basis.slice(0, layers.surfaceDim).map((row) => {
    const x = row.reduce((s, a, j) => s + a * k[j], 0);
    return x - 2 * Math.PI * Math.floor((x + Math.PI) / (2 * Math.PI));
  });
}
