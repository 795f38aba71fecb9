/**
 * The dense path of the real-space invariants: the sample's full spectrum (src/linalg/eigh.ts),
 * the Fermi energy, the states below it, and the honesty check that goes with them: the spectral
 * gap of the sample at the Fermi energy.
 *
 * Fermi energy rule (default): half filling, the floor(n/2) lowest states of the n orbitals kept,
 * and E_F in the middle between the highest of them and the next. An explicit E_F outside the
 * sample's spectrum is refused; one on an eigenvalue (within the gap tolerance) makes the
 * projector ambiguous and every invariant built on it null. A nearly closed gap is warned about on
 * periodic samples only: an open sample of a topological phase always has edge states at E_F, and
 * its gap there is their level spacing, which says nothing about the bulk.
 */
import { HermitianEigensolver } from '../linalg/eigh.js';
import { ModelError, valueText } from '../model/errors.js';
import type { Sample } from './sample.js';
import { toDense } from './sparse.js';

export interface FermiOptions {
  /** Fermi energy; default: the middle of the gap at half filling. */
  fermiEnergy?: number;
  /** Distance from E_F below which an eigenvalue counts as on it; default 1e-9 x the spectrum's width. */
  gapTolerance?: number;
}

export interface SpectrumAtFermi {
  fermiEnergy: number;
  /** How E_F was chosen. */
  fermiRule: string;
  /** States below E_F. */
  occupied: number;
  /** Width of the eigenvalue-free interval around E_F (0 when E_F is on an eigenvalue). */
  spectralGap: number;
  /** Lowest and highest eigenvalue of the sample. */
  spectrum: [number, number];
  /** True when an eigenvalue lies within the gap tolerance of E_F: no invariant is given. */
  gapless: boolean;
  warnings: string[];
}

export interface OccupiedStates {
  values: Float64Array;
  /** The occupied frame, n x m (row = orbital, column = state), ascending energies. */
  frame: Float64Array;
  checks: SpectrumAtFermi;
}

/** Checks the Fermi options without a spectrum (before anything is built). */
export function checkFermiOptions(options: FermiOptions): void {
  const e = options.fermiEnergy;
  if (e !== undefined && (typeof e !== 'number' || !Number.isFinite(e))) throw new ModelError('fermiEnergy', `expected a finite number. Value: ${valueText(e)}`);
  const t = options.gapTolerance;
  if (t !== undefined && (typeof t !== 'number' || !(t >= 0) || !Number.isFinite(t))) throw new ModelError('gapTolerance', `expected a nonnegative number. Value: ${valueText(t)}`);
}

/** The Fermi energy and the checks around it, from an ascending spectrum. */
export function spectrumAtFermi(values: Float64Array, options: FermiOptions, periodic: boolean): SpectrumAtFermi {
  const n = values.length;
  const lo = values[0], hi = values[n - 1];
  const width = Math.max(hi - lo, 1e-300);
  const tol = options.gapTolerance ?? 1e-9 * Math.max(width, Math.abs(lo), Math.abs(hi));
  const warnings: string[] = [];
  let fermiEnergy: number, occupied: number, fermiRule: string;
  if (options.fermiEnergy === undefined) {
    occupied = Math.floor(n / 2);
    if (occupied === 0) throw new ModelError('sizes', `a sample of ${n} orbital(s) has no state to fill at half filling`);
    fermiEnergy = (values[occupied - 1] + values[occupied]) / 2;
    fermiRule = `half filling: ${occupied} of ${n} states, E_F midway between them and the next`;
  } else {
    fermiEnergy = options.fermiEnergy;
    if (!(fermiEnergy > lo && fermiEnergy < hi)) {
      throw new ModelError('fermiEnergy', `outside the sample's spectrum [${lo}, ${hi}]: nothing or everything would be filled. Value: ${fermiEnergy}`);
    }
    occupied = 0;
    while (occupied < n && values[occupied] < fermiEnergy) occupied++;
    fermiRule = 'given';
  }
  const below = fermiEnergy - values[occupied - 1];
  const above = values[occupied] - fermiEnergy;
  const gapless = Math.min(below, above) <= tol;
  const spectralGap = gapless ? 0 : values[occupied] - values[occupied - 1];
  if (gapless) warnings.push(`an eigenvalue lies at the Fermi energy ${fermiEnergy} (within ${tol}): the projector is ambiguous and no invariant is given`);
  else if (periodic && spectralGap < 1e-3 * width) {
    warnings.push(`the sample's spectral gap at the Fermi energy is only ${spectralGap.toPrecision(3)} (spectrum width ${width.toPrecision(3)}): the gap is closed or nearly so; the invariant is meaningful only if the states there are localised (a mobility gap)`);
  }
  return { fermiEnergy, fermiRule, occupied, spectralGap, spectrum: [lo, hi], gapless, warnings };
}

/** The sample's spectrum and the states below the Fermi energy (only those are computed). */
export function occupiedStates(sample: Sample, options: FermiOptions): OccupiedStates {
  const n = sample.size;
  const values = new Float64Array(n);
  const periodic = sample.boundary.every((b) => b === 'periodic');
  const rows = new HermitianEigensolver(n).solveLowest(toDense(sample.hamiltonian), values, (spectrum) => spectrumAtFermi(spectrum, options, periodic).occupied);
  const checks = spectrumAtFermi(values, options, periodic);
  const m = checks.occupied;
  const frame = new Float64Array(2 * n * m);
  for (let j = 0; j < m; j++) {
    for (let i = 0; i < n; i++) {
      frame[2 * (i * m + j)] = rows[2 * (j * n + i)];
      frame[2 * (i * m + j) + 1] = rows[2 * (j * n + i) + 1];
    }
  }
  return { values, frame, checks };
}

/** Dense memory of n orbitals: the matrix, its eigenvectors, the solver's scratch and the frames. */
export const denseSampleBytes = (n: number): number => 8 * 16 * n * n;
/** Time of the dense solve with vectors (measured here: 0.21 s at n = 512, 1.1 s at n = 1024). */
export const denseSolveSeconds = (n: number): number => 1.5e-9 * n ** 3 + 1e-6 * n * n;
