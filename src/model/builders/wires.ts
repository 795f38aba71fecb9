/**
 * Coupled-wire arrays: copies of a one-dimensional chain side by side, wire w at w * spacing, with
 * couplings between neighbouring wires. The stack is built as a 2D lattice with one wire per cell
 * (a_1 along the chain, a_2 = spacing across); `boundary: 'periodic'` then takes a supercell of
 * `wires` wires (still 2D), `'open'` a ribbon of `wires` wires (1D, each orbital's `layer` is its
 * wire index).
 */
import { ModelError, valueText } from '../errors.js';
import type { ModelSpec, ParameterSpec, TermSpec } from '../spec.js';
import { TermSet } from '../terms.js';
import { validateModel } from '../validate.js';
import { ribbon } from './open.js';
import { supercell } from './supercell.js';

export interface CoupledWireArrayOptions {
  /** Number of wires in the result (its unit cell when periodic, the sample when open). Default 1. */
  wires?: number;
  /**
   * Inter-wire couplings: {from, to, cell: [along, across], amplitude} is the matrix element from
   * orbital `from` of wire w (chain cell 0) to orbital `to` of wire w + across (chain cell along).
   */
  couplings: TermSpec[];
  boundary?: 'periodic' | 'open';
  /** Cartesian vector from one wire to the next; default perpendicular to the chain, length 1. */
  spacing?: number[];
  /** Extra parameters the couplings use. */
  parameters?: Record<string, ParameterSpec>;
  name?: string;
}

export function coupledWireArray(chain: ModelSpec, options: CoupledWireArrayOptions): ModelSpec {
  const spec = validateModel(chain);
  if (spec.periodic !== 1) throw new ModelError('wires.chain', `expected a one-dimensional chain (periodic = 1). Value: ${spec.periodic}`);
  const wires = options.wires ?? 1;
  if (!Number.isInteger(wires) || wires < 1) throw new ModelError('wires.wires', `expected a positive integer. Value: ${valueText(wires)}`);
  const boundary = options.boundary ?? 'periodic';
  if (boundary !== 'periodic' && boundary !== 'open') throw new ModelError('wires.boundary', `expected "periodic" or "open". Value: ${valueText(boundary)}`);

  // Embed the chain in two dimensions: its own vector first, the stacking vector second.
  const a = spec.vectors[0];
  const along = a.length === 1 ? [a[0], 0] : a.slice(0, 2);
  const spacing = options.spacing ?? (spec.vectors.length > 1 ? spec.vectors[1].slice(0, 2) : [0 - along[1] / Math.hypot(...along), along[0] / Math.hypot(...along)] /* 0 - x: no -0 in saved models */);
  if (spec.vectors.length > 2 || !Array.isArray(spacing) || spacing.length !== 2) {
    throw new ModelError('wires.spacing', `expected a 2-component vector (the chain must live in 1 or 2 dimensions). Value: ${valueText(spacing)}`);
  }
  const set = new TermSet();
  for (const t of spec.terms) set.add(t.from, t.to, [t.cell[0], 0], t.amplitude);
  const labels = new Set(spec.orbitals.map((o) => o.label));
  if (!Array.isArray(options.couplings)) throw new ModelError('wires.couplings', `expected an array of terms. Value: ${valueText(options.couplings)}`);
  options.couplings.forEach((c, n) => {
    const field = `wires.couplings[${n}]`;
    if (!labels.has(c?.from)) throw new ModelError(`${field}.from`, `unknown orbital ${valueText(c?.from)}`);
    if (!labels.has(c.to)) throw new ModelError(`${field}.to`, `unknown orbital ${valueText(c.to)}`);
    if (!Array.isArray(c.cell) || c.cell.length !== 2 || !c.cell.every((x) => Number.isInteger(x))) {
      throw new ModelError(`${field}.cell`, `expected [along, across] integers. Value: ${valueText(c.cell)}`);
    }
    set.add(c.from, c.to, c.cell, c.amplitude);
  });
  const plane = validateModel({
    ...spec,
    name: options.name ?? `${spec.name} wire stack`,
    periodic: 2,
    vectors: [along, spacing],
    orbitals: spec.orbitals.map((o) => ({ ...o, position: [o.position[0], o.position[1] ?? 0] })),
    parameters: { ...spec.parameters, ...(options.parameters ?? {}) },
    terms: set.list(),
  });
  if (boundary === 'open') return ribbon(plane, 1, wires, { name: plane.name });
  return wires === 1 ? plane : supercell(plane, [[1, 0], [0, wires]], { name: plane.name });
}
