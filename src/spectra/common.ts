/**
 * Shared pieces of the spectra module: what a spectrum is computed from, the `checks` every result
 * carries, band groups, and a per-k band sampler that owns its scratch (no allocation per k).
 */
import { BlochHamiltonian, type BlochConvention } from '../bloch/hamiltonian.js';
import { HermitianEigensolver } from '../linalg/eigh.js';
import { ModelError, valueText } from '../model/errors.js';
import type { ModelSpec, ParameterValues } from '../model/spec.js';

/** A model description, or one already compiled (re-used as is; `params`, if given, are applied to it). */
export type SpectrumSource = ModelSpec | BlochHamiltonian;

/** Options every spectra function accepts. */
export interface SourceOptions {
  params?: ParameterValues;
  /** Bloch convention when compiling a model description; energies do not depend on it. */
  convention?: BlochConvention;
}

/** What a result checked while it was computed (the engine-wide `checks` shape). */
export interface SpectrumChecks {
  /** Smallest direct gap of the chosen band group over the sampled k (null when not measured). */
  minGap: number | null;
  /** Where it occurred, reduced k in units of the reciprocal lattice vectors. */
  minGapAt?: number[];
  /** k-points per periodic direction, for grid-based results. */
  grid?: number[];
  warnings: string[];
  /** True when the sampled gap fell below the stated tolerance. */
  gapless?: boolean;
  /**
   * Integer results: true when the gap was proven over the whole zone (or plane, or line) the
   * integer is defined on, and the integer's own lattice condition held (README, "What a
   * certified integer guarantees"). An integer is never given without a proven gap.
   */
  certified?: boolean;
  /** What the gap certificate (spectra/certify.ts) found. */
  gapProof?: GapProof;
}

/** The gap certificate of a result, as plain data. */
export interface GapProof {
  /** 'gapped': proven; 'gapless': a sample at or below the tolerance; 'unproven': neither within the budget. */
  verdict: 'gapped' | 'gapless' | 'unproven';
  /** Proven lower bound on the gap everywhere (0 unless gapped). */
  lowerBound: number;
  /** Eigenvalue solves the proof took, and its sample lines per direction. */
  samples: number;
  lines: number[];
  reason?: string;
}

/** A momentum in the three forms results report. */
export interface KPoint {
  /** Reduced, radians: k_i = k·a_i (the engine convention). */
  k: number[];
  /** In units of the reciprocal lattice vectors: k_i / 2pi. */
  fractions: number[];
  /** Cartesian: sum_i fractions_i b_i, in inverse units of the model's `vectors`. */
  cartesian: number[];
}

/** Which bands: `n` = the lowest n bands; an array = those band indices (must be contiguous). */
export type BandSelection = number | number[];

/** A contiguous group of bands, lowest index `lo` to highest `hi` inclusive. */
export interface BandGroup {
  lo: number;
  hi: number;
}

export function compileSource(source: SpectrumSource, options: SourceOptions = {}): BlochHamiltonian {
  if (source instanceof BlochHamiltonian) {
    // A compiled model's convention is fixed when it is compiled: a different one asked for is an error, not ignored.
    if (options.convention !== undefined && options.convention !== source.convention) {
      throw new ModelError('convention', `the model was compiled in the "${source.convention}" convention; compile it with {convention: "${options.convention}"} for that one. Value: ${valueText(options.convention)}`);
    }
    if (options.params !== undefined) source.setParameters(options.params);
    return source;
  }
  return new BlochHamiltonian(source, options.params ?? {}, { convention: options.convention ?? 'lattice' });
}

/** Resolve a band selection against `bandCount` bands; the group must leave at least one band out. */
export function bandGroup(selection: BandSelection | undefined, bandCount: number, field = 'bands'): BandGroup {
  if (selection === undefined) {
    if (bandCount < 2) throw new ModelError(field, `a gap needs at least two bands; this model has ${bandCount}`);
    return { lo: 0, hi: Math.floor(bandCount / 2) - 1 };
  }
  if (typeof selection === 'number') {
    if (!Number.isInteger(selection) || selection < 1 || selection >= bandCount) {
      throw new ModelError(field, `expected a whole number of lowest bands from 1 to ${bandCount - 1}. Value: ${valueText(selection)}`);
    }
    return { lo: 0, hi: selection - 1 };
  }
  if (!Array.isArray(selection) || selection.length === 0) throw new ModelError(field, `expected a band count or a non-empty array of band indices. Value: ${valueText(selection)}`);
  const sorted = [...selection].sort((a, b) => a - b);
  sorted.forEach((b, i) => {
    if (!Number.isInteger(b) || b < 0 || b >= bandCount) throw new ModelError(`${field}[${i}]`, `expected a band index from 0 to ${bandCount - 1}. Value: ${valueText(b)}`);
    if (i > 0 && b !== sorted[i - 1] + 1) throw new ModelError(field, `band indices must be contiguous. Value: ${valueText(selection)}`);
  });
  const group = { lo: sorted[0], hi: sorted[sorted.length - 1] };
  if (group.lo === 0 && group.hi === bandCount - 1) throw new ModelError(field, `the group holds every band, so there is no gap to measure. Value: ${valueText(selection)}`);
  return group;
}

/** Direct gap separating the group from the rest at one k, given that k's ascending energies. */
export function groupGap(energies: Float64Array, offset: number, group: BandGroup, bandCount: number): number {
  let gap = Infinity;
  if (group.lo > 0) gap = energies[offset + group.lo] - energies[offset + group.lo - 1];
  if (group.hi < bandCount - 1) gap = Math.min(gap, energies[offset + group.hi + 1] - energies[offset + group.hi]);
  return gap;
}

/** Eigenvalues (and optionally eigenvectors) of H(k), with one set of buffers reused for every k. */
export class BandSampler {
  readonly hamiltonian: BlochHamiltonian;
  readonly bandCount: number;
  readonly dim: number;
  /** Latest eigenvalues, ascending. */
  readonly energies: Float64Array;
  /** Latest eigenvectors as columns (filled only by `solveWithVectors`). */
  readonly vectors: Float64Array;
  private readonly matrix: Float64Array;
  private readonly solver: HermitianEigensolver;

  constructor(hamiltonian: BlochHamiltonian) {
    this.hamiltonian = hamiltonian;
    this.bandCount = hamiltonian.size;
    this.dim = hamiltonian.dim;
    this.energies = new Float64Array(this.bandCount);
    this.vectors = new Float64Array(2 * this.bandCount * this.bandCount);
    this.matrix = new Float64Array(2 * this.bandCount * this.bandCount);
    this.solver = new HermitianEigensolver(this.bandCount);
  }

  /** Energies at reduced k (radians) into `this.energies`. */
  solve(k: ArrayLike<number>): Float64Array {
    this.hamiltonian.fill(k, this.matrix);
    return this.solver.solve(this.matrix, this.energies);
  }

  /** Energies and eigenvectors at reduced k (radians). */
  solveWithVectors(k: ArrayLike<number>): Float64Array {
    this.hamiltonian.fill(k, this.matrix);
    return this.solver.solve(this.matrix, this.energies, this.vectors);
  }
}
