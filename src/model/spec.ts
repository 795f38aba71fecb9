/**
 * The declarative model description: plain JSON, versioned, no closures, so it travels to Web
 * Workers, saved widget state and cluster shards unchanged.
 */

export const MODEL_FORMAT = 'chernel.model';
export const MODEL_VERSION = 1;

/** A number, a complex number, or a mathjs expression of the model's parameters ("t2*exp(i*phi)"). */
export type Amplitude = number | ComplexAmplitude | string;
export interface ComplexAmplitude {
  re: number | string;
  im: number | string;
}

export interface OrbitalSpec {
  label: string;
  /** Reduced coordinates in the model's `vectors` basis (length = number of vectors). */
  position: number[];
  spin?: 'up' | 'down';
  nambu?: 'particle' | 'hole';
  /**
   * On a ribbon or slab: the index (0 .. width-1) of the cell along the open direction this
   * orbital came from, so spectra can weigh states by edge. Set by the ribbon builder.
   */
  layer?: number;
}

export interface ParameterSpec {
  default: number;
  /** Inclusive range a value must lie in; what a widget's slider spans. */
  range?: [number, number];
  unit?: string;
  doc?: string;
}

/**
 * The matrix element <cell, to| H |0, from> = amplitude. The Hermitian partner is implied; an onsite
 * term (from == to, cell all zero) is counted once and must be real.
 */
export interface TermSpec {
  from: string;
  to: string;
  cell: number[];
  amplitude: Amplitude;
}

export interface ModelSpec {
  format: typeof MODEL_FORMAT;
  version: typeof MODEL_VERSION;
  name: string;
  /** Number of periodic directions, 0 (flake) to 3. */
  periodic: number;
  /** Cartesian basis vectors; the first `periodic` are the lattice translations. */
  vectors: number[][];
  orbitals: OrbitalSpec[];
  parameters: Record<string, ParameterSpec>;
  terms: TermSpec[];
  /** Free-form provenance, e.g. the citation of a catalogue model. */
  doc?: string;
}

/** Parameter values by name. */
export type ParameterValues = Record<string, number>;
