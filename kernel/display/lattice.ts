/**
 * A few cells of a model's lattice as plain data, for its picture (figures/lattice.ts):
 * sites at their Cartesian positions (the first two coordinates), every hopping as a bond with its
 * amplitude at the given parameter values, and the unit cell. Amplitudes are evaluated by the
 * engine's own compiler, so the picture shows exactly the terms the Hamiltonian uses.
 */
import { compileAmplitude } from '../../src/model/expressions.js';
import { resolveParameters, type ModelSpec } from '../../src/index.js';
import type { LatticeBond, LatticePicture, LatticeSite } from '../../figures/lattice.js';

/** Cells drawn along each periodic direction: the home cell and one on each side (two in 3D). */
function cellRange(periodic: number): number[][] {
  const span = periodic >= 3 ? [0, 1] : [-1, 0, 1];
  let cells: number[][] = [[]];
  for (let d = 0; d < periodic; d++) cells = cells.flatMap((c) => span.map((n) => [...c, n]));
  return cells;
}

const key = (cell: number[]) => cell.join(',');

/** The lattice of `spec` at parameter `values` (defaults for the rest). */
export function latticePicture(spec: ModelSpec, values: Record<string, number> = {}): LatticePicture {
  const params = resolveParameters(spec, values);
  const periodic = spec.periodic;
  const vectors = spec.vectors.map((v) => [v[0] ?? 0, v[1] ?? 0]);
  const cart = (cell: number[], reduced: number[]): [number, number] => {
    let x = 0;
    let y = 0;
    vectors.forEach((v, i) => {
      const f = (cell[i] ?? 0) + (reduced[i] ?? 0);
      x += f * v[0];
      y += f * v[1];
    });
    return [x, y];
  };
  const cells = cellRange(periodic);
  const drawn = new Set(cells.map(key));
  const sites: LatticeSite[] = [];
  for (const cell of cells) {
    spec.orbitals.forEach((o, index) => {
      const [x, y] = cart(cell, o.position);
      sites.push({ x, y, orbital: index, label: o.label, home: cell.every((n) => n === 0) });
    });
  }
  const index = new Map(spec.orbitals.map((o, i) => [o.label, i]));
  const names = new Set(Object.keys(spec.parameters));
  const out = new Float64Array(2);
  const bonds: LatticeBond[] = [];
  const onsite: number[] = spec.orbitals.map(() => 0);
  spec.terms.forEach((term, t) => {
    compileAmplitude(term.amplitude, `terms[${t}].amplitude`, names)(params, out, 0);
    const [re, im] = out;
    const from = index.get(term.from) ?? -1;
    const to = index.get(term.to) ?? -1;
    if (from < 0 || to < 0) return;
    const local = term.cell.every((n) => n === 0);
    if (local && from === to) {
      onsite[from] += re;
      return;
    }
    if (Math.hypot(re, im) < 1e-12) return;
    for (const cell of cells) {
      const target = cell.map((n, i) => n + (term.cell[i] ?? 0));
      if (!drawn.has(key(target))) continue;
      const [x0, y0] = cart(cell, spec.orbitals[from].position);
      const [x1, y1] = cart(target, spec.orbitals[to].position);
      bonds.push({ x0, y0, x1, y1, re, im, term: t, home: cell.every((n) => n === 0) });
    }
  });
  const unitCell: [number, number][] =
    periodic === 0 ? [] : periodic === 1 ? [cart([0], [0]), cart([1], [0])] : [cart([0, 0], [0, 0]), cart([1, 0], [0, 0]), cart([1, 1], [0, 0]), cart([0, 1], [0, 0])];
  return { kind: 'lattice', name: spec.name, periodic, orbitals: spec.orbitals.map((o) => o.label), onsite, sites, bonds, unitCell, checks: { minGap: null, warnings: [] } };
}
