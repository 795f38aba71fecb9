/**
 * A uniform magnetic field by Peierls phases on a magnetic supercell.
 *
 * Convention (stated once): flux p/q flux quanta per unit cell through the plane of lattice vectors
 * (a_i, a_j), oriented counter-clockwise from a_i to a_j: the product of the hopping amplitudes
 * <x'|H|x> around the boundary of one unit cell, traversed 0 -> a_i -> a_i + a_j -> a_j -> 0, is
 * multiplied by e^{+2 pi i p/q}. With a_i x a_j along +z this is a field along +z for a particle
 * whose hopping picks up e^{+i ∫ A·dl}.
 *
 * Landau gauge in reduced coordinates, A = 2 pi (p/q) x_i dx_j, so a hop from x to x' along the
 * straight line between the orbital positions gets the phase
 *   theta(x, x') = 2 pi (p/q) (x_i + x'_i)/2 (x'_j - x_j).
 * The gauge depends on x_i, so the supercell is q cells long along a_i. Translating by q a_i changes
 * theta by 2 pi p (x'_j - x_j): a gauge transformation, which the supercell basis absorbs
 * (|n, a> = e^{2 pi i p n x_j(a)} |x_a + n q a_i>): a term into supercell n along a_i gets the extra
 * factor e^{-2 pi i p n x'_j}. The result is exactly periodic for any orbital positions.
 */
import { withPhase } from '../amplitude.js';
import { checkModelSize } from '../../cost.js';
import { ModelError, valueText } from '../errors.js';
import type { ModelSpec } from '../spec.js';
import { TermSet } from '../terms.js';
import { validateModel } from '../validate.js';
import { supercellDetailed } from './supercell.js';

export interface FluxOptions {
  /** Flux quanta per unit cell = p / q (q >= 1; p and q need not be coprime, the supercell is q long). */
  p: number;
  q: number;
  /** Lattice directions (i, j) spanning the plane; default [0, 1]. The supercell is along a_i. */
  plane?: [number, number];
  name?: string;
}

export function magneticFlux(model: ModelSpec, options: FluxOptions): ModelSpec {
  const spec = validateModel(model);
  const { p, q } = options;
  if (!Number.isInteger(q) || q < 1) throw new ModelError('flux.q', `expected a positive integer. Value: ${valueText(q)}`);
  if (!Number.isInteger(p)) throw new ModelError('flux.p', `expected an integer. Value: ${valueText(p)}`);
  checkModelSize(q * spec.orbitals.length, 'flux.q', q, spec.orbitals.length, 'q');
  if (spec.periodic < 2) throw new ModelError('flux.model', `needs two periodic directions; "${spec.name}" has ${spec.periodic}`);
  const [i, j] = options.plane ?? [0, 1];
  if (!Number.isInteger(i) || !Number.isInteger(j) || i === j || i < 0 || j < 0 || i >= spec.periodic || j >= spec.periodic) {
    throw new ModelError('flux.plane', `expected two different periodic directions of "${spec.name}". Value: ${valueText(options.plane)}`);
  }
  const d = spec.periodic;
  const matrix = Array.from({ length: d }, (_, r) => Array.from({ length: d }, (_, c) => (r === c ? (r === i ? q : 1) : 0)));
  const { spec: big, terms } = supercellDetailed(spec, matrix, { name: options.name ?? `${spec.name}, flux ${p}/${q}` });
  const position = new Map(spec.orbitals.map((o) => [o.label, o.position]));
  const phi = p / q;

  const set = new TermSet();
  for (const { term, fromCell, toCell } of terms) {
    const t0 = term.from.slice(0, term.from.lastIndexOf('@'));
    const t1 = term.to.slice(0, term.to.lastIndexOf('@'));
    const x = position.get(t0)!.map((r, c) => (c < d ? r + fromCell[c] : r));
    const y = position.get(t1)!.map((r, c) => (c < d ? r + toCell[c] : r));
    const theta = 2 * Math.PI * phi * ((x[i] + y[i]) / 2) * (y[j] - x[j]);
    const gauge = -2 * Math.PI * p * term.cell[i] * y[j];
    set.add(term.from, term.to, term.cell, withPhase(term.amplitude, reduceAngle(theta + gauge)));
  }
  return validateModel({ ...big, terms: set.list() });
}

/** Angle into (-pi, pi], so that saved phases stay small numbers. */
function reduceAngle(a: number): number {
  const r = a - 2 * Math.PI * Math.round(a / (2 * Math.PI));
  return Math.abs(r) < 1e-13 ? 0 : r;
}
