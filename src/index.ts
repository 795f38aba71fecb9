/**
 * chernel's public API: exactly what a notebook cell sees.
 */
export { MODEL_FORMAT, MODEL_VERSION } from './model/spec.js';
export type { Amplitude, ComplexAmplitude, ModelSpec, OrbitalSpec, ParameterSpec, ParameterValues, TermSpec } from './model/spec.js';
export { ModelError } from './model/errors.js';
export { validateModel } from './model/validate.js';
export { resolveParameters } from './model/expressions.js';
export { lattice, LatticeBuilder, type SpinMatrix } from './model/builder.js';
export { BlochHamiltonian, blochHamiltonian, type BlochConvention, type BlochOptions } from './bloch/hamiltonian.js';
export { type CMatrix, cmatrix } from './linalg/cmatrix.js';
export { HermitianEigensolver, eigh } from './linalg/eigh.js';
export { InterruptedError, checkInterrupt, installInterruptFlag } from './interrupt.js';
