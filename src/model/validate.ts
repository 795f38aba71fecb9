/**
 * Structural validation of a model description. Every error names the field path and the value;
 * amplitudes are checked again, numerically, when parameters are resolved (src/bloch).
 */
import { checkInterrupt } from '../interrupt.js';
import { ModelError, valueText } from './errors.js';
import { numericValue } from './amplitude.js';
import { compileAmplitude, RESERVED_NAMES } from './expressions.js';
import { MODEL_FORMAT, MODEL_VERSION, type ModelSpec } from './spec.js';
import { checkModelFields } from './field-names.js';
import { parameterValueProblem } from './parameters.js';

function isFiniteArray(x: unknown, length: number): x is number[] {
  return Array.isArray(x) && x.length === length && x.every((v) => typeof v === 'number' && Number.isFinite(v));
}

/** Throws ModelError on the first problem; returns the spec (typed) when it is well formed. */
export function validateModel(spec: unknown): ModelSpec {
  if (spec === null || typeof spec !== 'object') throw new ModelError('model', `expected a model description object. Value: ${valueText(spec)}`);
  if (Array.isArray(spec)) throw new ModelError('model', `expected a model description object, not an array. Value: ${valueText(spec)}`);
  checkModelFields(spec as Record<string, unknown>);
  const m = spec as Partial<ModelSpec>;
  if (m.format !== MODEL_FORMAT) throw new ModelError('format', `expected "${MODEL_FORMAT}". Value: ${valueText(m.format)}`);
  if (m.version !== MODEL_VERSION) throw new ModelError('version', `this engine reads version ${MODEL_VERSION}. Value: ${valueText(m.version)}`);
  if (typeof m.name !== 'string') throw new ModelError('name', `expected a string. Value: ${valueText(m.name)}`);
  const periodic = m.periodic;
  if (typeof periodic !== 'number' || !Number.isInteger(periodic) || periodic < 0 || periodic > 3) {
    throw new ModelError('periodic', `expected an integer from 0 to 3. Value: ${valueText(periodic)}`);
  }
  if (!Array.isArray(m.vectors) || m.vectors.length < Math.max(periodic, 1) || m.vectors.length > 3) {
    throw new ModelError('vectors', `expected ${Math.max(periodic, 1)} to 3 basis vectors. Value: ${valueText(m.vectors)}`);
  }
  const space = m.vectors.length;
  m.vectors.forEach((v, i) => {
    if (!isFiniteArray(v, space)) throw new ModelError(`vectors[${i}]`, `expected ${space} finite numbers. Value: ${valueText(v)}`);
  });
  // Relative to the vectors' lengths, so the check does not depend on the unit of length: the
  // volume spanned over the product of lengths is the sine of the angle in 2D (near 0: collinear).
  const lengths = m.vectors.map((v) => Math.hypot(...v));
  if (lengths.some((l) => l === 0)) throw new ModelError(`vectors[${lengths.indexOf(0)}]`, `a basis vector has zero length. Value: ${valueText(m.vectors)}`);
  const skew = Math.abs(determinant(m.vectors)) / lengths.reduce((a, b) => a * b, 1);
  if (skew < 1e-9) throw new ModelError('vectors', `basis vectors are linearly dependent (or nearly: volume / product of lengths = ${skew.toExponential(2)}). Value: ${valueText(m.vectors)}`);

  if (m.parameters === null || typeof m.parameters !== 'object' || Array.isArray(m.parameters)) {
    throw new ModelError('parameters', `expected an object of named parameters. Value: ${valueText(m.parameters)}`);
  }
  for (const [name, p] of Object.entries(m.parameters)) {
    const field = `parameters.${name}`;
    if (!/^[A-Za-z_][A-Za-z0-9_]*$/.test(name)) throw new ModelError(field, `parameter names must be identifiers. Value: ${valueText(name)}`);
    if (name in Object.prototype) throw new ModelError(field, `"${name}" is a name every JavaScript object has; choose another name`);
    if (RESERVED_NAMES.has(name)) throw new ModelError(field, `"${name}" is reserved in expressions; choose another name`);
    if (p === null || typeof p !== 'object' || typeof p.default !== 'number' || !Number.isFinite(p.default)) {
      throw new ModelError(`${field}.default`, `expected a finite number. Value: ${valueText(p?.default)}`);
    }
    if (p.range !== undefined) {
      if (!isFiniteArray(p.range, 2) || !(p.range[0] < p.range[1])) throw new ModelError(`${field}.range`, `expected [low, high] with low < high. Value: ${valueText(p.range)}`);
      const problem = parameterValueProblem(p.default, { range: [p.range[0], p.range[1]] });
      if (problem !== null) throw new ModelError(`${field}.default`, problem);
    }
  }
  const parameterNames = new Set(Object.keys(m.parameters));

  if (!Array.isArray(m.orbitals) || m.orbitals.length === 0) throw new ModelError('orbitals', `expected at least one orbital. Value: ${valueText(m.orbitals)}`);
  const labels = new Set<string>();
  m.orbitals.forEach((o, i) => {
    const field = `orbitals[${i}]`;
    if (o === null || typeof o !== 'object' || typeof o.label !== 'string' || o.label === '') throw new ModelError(`${field}.label`, `expected a non-empty string. Value: ${valueText(o?.label)}`);
    if (labels.has(o.label)) throw new ModelError(`${field}.label`, `duplicate orbital label ${valueText(o.label)}`);
    labels.add(o.label);
    if (!isFiniteArray(o.position, space)) throw new ModelError(`${field}.position`, `expected ${space} finite reduced coordinates. Value: ${valueText(o.position)}`);
    if (o.spin !== undefined && o.spin !== 'up' && o.spin !== 'down') throw new ModelError(`${field}.spin`, `expected "up" or "down". Value: ${valueText(o.spin)}`);
    if (o.nambu !== undefined && o.nambu !== 'particle' && o.nambu !== 'hole') throw new ModelError(`${field}.nambu`, `expected "particle" or "hole". Value: ${valueText(o.nambu)}`);
    if (o.layer !== undefined && !(Number.isInteger(o.layer) && o.layer >= 0)) throw new ModelError(`${field}.layer`, `expected a non-negative integer. Value: ${valueText(o.layer)}`);
  });

  if (!Array.isArray(m.terms)) throw new ModelError('terms', `expected an array. Value: ${valueText(m.terms)}`);
  const seen = new Map<string, number>();
  m.terms.forEach((t, i) => {
    // A model of a million terms takes seconds to check: stop when asked.
    if ((i & 1023) === 1023) checkInterrupt();
    const field = `terms[${i}]`;
    if (t === null || typeof t !== 'object') throw new ModelError(field, `expected a term object. Value: ${valueText(t)}`);
    if (!labels.has(t.from)) throw new ModelError(`${field}.from`, `unknown orbital ${valueText(t.from)}`);
    if (!labels.has(t.to)) throw new ModelError(`${field}.to`, `unknown orbital ${valueText(t.to)}`);
    if (!Array.isArray(t.cell) || t.cell.length !== periodic || !t.cell.every((c) => Number.isInteger(c))) {
      throw new ModelError(`${field}.cell`, `expected ${periodic} integers (one per periodic direction). Value: ${valueText(t.cell)}`);
    }
    compileAmplitude(t.amplitude, `${field}.amplitude`, parameterNames);
    const onsite = t.from === t.to && t.cell.every((c) => c === 0);
    const fixed = numericValue(t.amplitude);
    if (onsite && fixed !== null && fixed[1] !== 0) {
      throw new ModelError(`${field}.amplitude`, `an onsite energy must be real (a non-Hermitian onsite block). Value: ${valueText(t.amplitude)}`);
    }
    const key = `${t.from}|${t.to}|${t.cell.join(',')}`;
    const partner = `${t.to}|${t.from}|${t.cell.map((c) => -c || 0).join(',')}`;
    if (seen.has(key)) throw new ModelError(field, `repeats terms[${seen.get(key)}] (${t.from} -> ${t.to}, cell ${valueText(t.cell)}); combine the amplitudes`);
    if (!onsite && seen.has(partner)) {
      throw new ModelError(field, `is the Hermitian partner of terms[${seen.get(partner)}], which is added automatically; remove one of them`);
    }
    seen.set(key, i);
  });
  return m as ModelSpec;
}

function determinant(v: number[][]): number {
  if (v.length === 1) return v[0][0];
  if (v.length === 2) return v[0][0] * v[1][1] - v[0][1] * v[1][0];
  return (
    v[0][0] * (v[1][1] * v[2][2] - v[1][2] * v[2][1]) -
    v[0][1] * (v[1][0] * v[2][2] - v[1][2] * v[2][0]) +
    v[0][2] * (v[1][0] * v[2][1] - v[1][1] * v[2][0])
  );
}

/**
 * A band selection checked against a model, as the topology and spectra code takes it: a count n
 * (the lowest n bands) or a list of band indices (0 = lowest). Undefined means the lower half
 * (half filling, at least one band). Returns the indices, ascending; a ModelError names `field`
 * and the value when a count or index is out of range, repeated, or not an integer.
 */
export function checkBandSelection(spec: ModelSpec, bands?: number | readonly number[], field = 'bands'): number[] {
  const count = spec.orbitals.length;
  if (bands === undefined) return Array.from({ length: Math.max(1, Math.floor(count / 2)) }, (_, i) => i);
  if (typeof bands === 'number') {
    if (!Number.isInteger(bands) || bands < 1 || bands > count) {
      throw new ModelError(field, `expected a band count from 1 to ${count} (model "${spec.name}" has ${count} bands). Value: ${valueText(bands)}`);
    }
    return Array.from({ length: bands }, (_, i) => i);
  }
  if (!Array.isArray(bands) || bands.length === 0) throw new ModelError(field, `expected a band count or a non-empty list of band indices. Value: ${valueText(bands)}`);
  const seen = new Set<number>();
  bands.forEach((b, i) => {
    if (!Number.isInteger(b) || b < 0 || b >= count) {
      throw new ModelError(`${field}[${i}]`, `band index out of range: model "${spec.name}" has bands 0 to ${count - 1}. Value: ${valueText(b)}`);
    }
    if (seen.has(b)) throw new ModelError(`${field}[${i}]`, `band ${b} is listed twice. Value: ${valueText(bands)}`);
    seen.add(b);
  });
  return [...bands].sort((a, b) => a - b);
}
