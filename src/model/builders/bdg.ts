/**
 * Bogoliubov–de Gennes doubling of a normal-state model with a pairing term.
 *
 * Nambu basis (stated once): Psi_k = (c_{k,1..n}, c^dagger_{-k,1..n}); each normal orbital `a` gives
 * a particle orbital `a.e` (nambu 'particle') and a hole orbital `a.h` (nambu 'hole'), particles
 * first. The many-body Hamiltonian is
 *   H = 1/2 sum_k Psi_k^dagger H_BdG(k) Psi_k + const,
 *   H_BdG(k) = [[H(k) - mu, D(k)], [D(k)^dagger, -H(-k)^T + mu]],
 * i.e. the factor 1/2 is in front of the sum and NOT inside the matrix: H_BdG's particle block is the
 * normal-state H(k) itself, and its spectrum comes in pairs (E at k, -E at -k).
 *
 * A pairing term {from: a, to: b, cell: R, amplitude: Delta} is the many-body term
 *   Delta c^dagger_{R,b} c^dagger_{0,a} + h.c.,
 * which puts D_{b a}(R) = Delta and, by Fermi statistics, D_{a b}(-R) = -Delta (both are added).
 * In k: D(k)_{ba} += Delta e^{-ik·R}, D(k)_{ab} -= Delta e^{ik·R}; so D(k)^T = -D(-k). A pairing
 * term on one orbital in one cell (a == b, R == 0) vanishes and is refused. Spin is not rotated:
 * the hole of `A.up` is the hole of that same orbital (no (c_dn^dagger, -c_up^dagger) reordering).
 */
import { conjugateAmplitude, negateAmplitude } from '../amplitude.js';
import { ModelError, valueText } from '../errors.js';
import { compileAmplitude } from '../expressions.js';
import type { Amplitude, ModelSpec, OrbitalSpec, ParameterSpec, TermSpec } from '../spec.js';
import { TermSet } from '../terms.js';
import { validateModel } from '../validate.js';

export interface BogoliubovOptions {
  /** Pairing terms, see above. */
  pairing: TermSpec[];
  /** Chemical potential subtracted from the particle block (and added to the hole block). */
  chemicalPotential?: Amplitude;
  /** Extra parameters the pairing or chemical potential use (e.g. Delta, mu). */
  parameters?: Record<string, ParameterSpec>;
  name?: string;
}

export const PARTICLE_SUFFIX = '.e';
export const HOLE_SUFFIX = '.h';

export function bogoliubov(model: ModelSpec, options: BogoliubovOptions): ModelSpec {
  const spec = validateModel(model);
  if (spec.orbitals.some((o) => o.nambu !== undefined)) throw new ModelError('bdg.model', `"${spec.name}" is already in Nambu form`);
  const parameters = { ...spec.parameters, ...(options.parameters ?? {}) };
  const names = new Set(Object.keys(parameters));
  const labels = new Set(spec.orbitals.map((o) => o.label));
  const e = (label: string): string => label + PARTICLE_SUFFIX;
  const h = (label: string): string => label + HOLE_SUFFIX;

  const orbitals: OrbitalSpec[] = [
    ...spec.orbitals.map((o): OrbitalSpec => ({ ...o, label: e(o.label), nambu: 'particle' })),
    ...spec.orbitals.map((o): OrbitalSpec => ({ ...o, label: h(o.label), nambu: 'hole' })),
  ];
  const set = new TermSet();
  for (const t of spec.terms) {
    set.add(e(t.from), e(t.to), t.cell, t.amplitude);
    // Hole block -H(-k)^T: <R, b, h| H_BdG |0, a, h> = -conj(t).
    set.add(h(t.from), h(t.to), t.cell, negateAmplitude(conjugateAmplitude(t.amplitude)));
  }
  const zero = new Array<number>(spec.periodic).fill(0);
  if (options.chemicalPotential !== undefined) {
    compileAmplitude(options.chemicalPotential, 'bdg.chemicalPotential', names);
    for (const o of spec.orbitals) {
      set.add(e(o.label), e(o.label), zero, negateAmplitude(options.chemicalPotential));
      set.add(h(o.label), h(o.label), zero, options.chemicalPotential);
    }
  }
  if (!Array.isArray(options.pairing)) throw new ModelError('bdg.pairing', `expected an array of pairing terms. Value: ${valueText(options.pairing)}`);
  options.pairing.forEach((p, n) => {
    const field = `bdg.pairing[${n}]`;
    if (p === null || typeof p !== 'object') throw new ModelError(field, `expected {from, to, cell, amplitude}. Value: ${valueText(p)}`);
    if (!labels.has(p.from)) throw new ModelError(`${field}.from`, `unknown orbital ${valueText(p.from)}`);
    if (!labels.has(p.to)) throw new ModelError(`${field}.to`, `unknown orbital ${valueText(p.to)}`);
    if (!Array.isArray(p.cell) || p.cell.length !== spec.periodic || !p.cell.every((c) => Number.isInteger(c))) {
      throw new ModelError(`${field}.cell`, `expected ${spec.periodic} integers. Value: ${valueText(p.cell)}`);
    }
    if (p.from === p.to && p.cell.every((c) => c === 0)) throw new ModelError(field, `pairing an orbital with itself in the same cell vanishes (Pauli). Value: ${valueText(p)}`);
    compileAmplitude(p.amplitude, `${field}.amplitude`, names);
    set.add(h(p.from), e(p.to), p.cell, p.amplitude);
    set.add(h(p.to), e(p.from), p.cell.map((c) => -c), negateAmplitude(p.amplitude));
  });
  return validateModel({
    ...spec,
    name: options.name ?? `${spec.name} (BdG)`,
    orbitals,
    parameters,
    terms: set.list(),
  });
}
