/**
 * Open boundaries: a ribbon (2D) or slab (3D) is finite along one lattice direction, a flake along
 * all of them. Orbital `a` in cell l of an open direction becomes `a@l`; terms that would leave the
 * finite sample are dropped (hard-wall edges, no relaxation). Other edge terminations: take a
 * supercell first so that the desired edge is spanned by lattice vectors.
 *
 * The result's vectors are ordered: the remaining periodic directions (in their old order), then
 * the opened directions, then directions that were open already. Orbital positions stay reduced in
 * that basis, so the coordinate along the opened direction runs from 0 to `width`.
 */
import { checkModelSize } from '../../cost.js';
import { ModelError, valueText } from '../errors.js';
import type { ModelSpec, OrbitalSpec } from '../spec.js';
import { TermSet } from '../terms.js';
import { validateModel } from '../validate.js';
import { copyLabel } from './lattice-math.js';

export interface RibbonOptions {
  name?: string;
}

export interface FlakeOptions {
  name?: string;
  /** Keep only orbitals whose Cartesian position passes this test (a disc, a hexagon, ...). */
  keep?: (position: number[], orbital: OrbitalSpec) => boolean;
}

function checkWidth(width: unknown, field: string): number {
  if (typeof width !== 'number' || !Number.isInteger(width) || width < 1) throw new ModelError(field, `expected a positive integer number of cells. Value: ${valueText(width)}`);
  return width;
}

/** Open the periodic directions `dirs` with `widths` cells each. */
function openDirections(spec: ModelSpec, dirs: number[], widths: number[], name: string, keep?: FlakeOptions['keep'], annotateLayer = false): ModelSpec {
  const d = spec.periodic;
  const stay = Array.from({ length: d }, (_, i) => i).filter((i) => !dirs.includes(i));
  const order = [...stay, ...dirs, ...Array.from({ length: spec.vectors.length - d }, (_, i) => d + i)];
  const vectors = order.map((i) => [...spec.vectors[i]]);

  // Every combination of cells along the opened directions.
  const cells: number[][] = [[]];
  for (const w of widths) {
    const next: number[][] = [];
    for (const c of cells) for (let l = 0; l < w; l++) next.push([...c, l]);
    cells.splice(0, cells.length, ...next);
  }
  const kept = new Set<string>();
  const orbitals: OrbitalSpec[] = [];
  for (const cell of cells) {
    for (const o of spec.orbitals) {
      const position = order.map((i) => o.position[i] + (dirs.includes(i) ? cell[dirs.indexOf(i)] : 0));
      if (keep !== undefined) {
        const cart = vectors[0].map((_, c) => position.reduce((s, x, i) => s + x * vectors[i][c], 0));
        if (!keep(cart, o)) continue;
      }
      const label = copyLabel(o.label, cell);
      kept.add(label);
      const copy: OrbitalSpec = { ...o, label, position };
      if (annotateLayer) copy.layer = cell[0];
      else delete copy.layer;
      orbitals.push(copy);
    }
  }
  if (orbitals.length === 0) throw new ModelError('flake.keep', 'no orbital passes the shape test');

  const set = new TermSet();
  for (const cell of cells) {
    for (const t of spec.terms) {
      const target = dirs.map((i, n) => cell[n] + t.cell[i]);
      if (target.some((l, n) => l < 0 || l >= widths[n])) continue;
      const from = copyLabel(t.from, cell);
      const to = copyLabel(t.to, target);
      if (!kept.has(from) || !kept.has(to)) continue;
      set.add(from, to, stay.map((i) => t.cell[i]), t.amplitude);
    }
  }
  return validateModel({ ...spec, name, periodic: stay.length, vectors, orbitals, terms: set.list() });
}

/**
 * A ribbon (2D) or slab (3D): `width` cells along periodic direction `direction`, periodic along
 * the others. Each orbital carries `layer` = its cell index along the open direction (0 at one
 * edge, width-1 at the other), which spectra use for edge weights.
 */
export function ribbon(model: ModelSpec, direction: number, width: number, options: RibbonOptions = {}): ModelSpec {
  const spec = validateModel(model);
  if (!Number.isInteger(direction) || direction < 0 || direction >= spec.periodic) {
    throw new ModelError('ribbon.direction', `expected a periodic direction from 0 to ${spec.periodic - 1} of "${spec.name}". Value: ${valueText(direction)}`);
  }
  checkWidth(width, 'ribbon.width');
  checkModelSize(width * spec.orbitals.length, 'ribbon.width', width, spec.orbitals.length, 'width');
  return openDirections(spec, [direction], [width], options.name ?? `${spec.name} ribbon (${width} cells along a${direction + 1})`, undefined, true);
}

/** A finite flake: `sizes[i]` cells along each periodic direction i, optionally cut to a shape. */
export function flake(model: ModelSpec, sizes: number[], options: FlakeOptions = {}): ModelSpec {
  const spec = validateModel(model);
  if (!Array.isArray(sizes) || sizes.length !== spec.periodic) {
    throw new ModelError('flake.sizes', `expected ${spec.periodic} cell counts (one per periodic direction of "${spec.name}"). Value: ${valueText(sizes)}`);
  }
  sizes.forEach((s, i) => checkWidth(s, `flake.sizes[${i}]`));
  const cells = sizes.reduce((a, b) => a * b, 1);
  checkModelSize(cells * spec.orbitals.length, 'flake.sizes', cells, spec.orbitals.length, 'cells');
  const dirs = Array.from({ length: spec.periodic }, (_, i) => i);
  return openDirections(spec, dirs, sizes, options.name ?? `${spec.name} flake ${sizes.join('x')}`, options.keep);
}
