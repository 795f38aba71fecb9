/**
 * Supercells: the same crystal described with a larger unit cell. New lattice vectors are integer
 * combinations of the old ones, A'_i = sum_j M_ij a_j; every orbital is copied into each old cell
 * R inside the supercell (label `a@R`), and every term is remapped so that H is unchanged. The bands
 * of the result are those of the original folded into the smaller Brillouin zone.
 */
import { checkModelSize } from '../../cost.js';
import { ModelError, valueText } from '../errors.js';
import type { ModelSpec, TermSpec } from '../spec.js';
import { TermSet } from '../terms.js';
import { validateModel } from '../validate.js';
import { checkIntegerMatrix, copyLabel, SupercellLattice } from './lattice-math.js';

export interface SupercellOptions {
  name?: string;
}

/** The term of the supercell model equivalent to `term` leaving the copy in old cell `cell`. */
export interface RemappedTerm {
  term: TermSpec;
  /** The old cell of the `from` orbital (inside the supercell) and of the `to` orbital (anywhere). */
  fromCell: number[];
  toCell: number[];
}

/**
 * The supercell of `model` with integer matrix `matrix` (periodic x periodic, rows = new vectors in
 * units of the old). Open directions are carried over unchanged.
 */
export function supercell(model: ModelSpec, matrix: number[][], options: SupercellOptions = {}): ModelSpec {
  return supercellDetailed(model, matrix, options).spec;
}

/** The supercell and, for each of its terms, the old cells it connects (used by the flux builder). */
export function supercellDetailed(
  model: ModelSpec,
  matrix: number[][],
  options: SupercellOptions = {},
): { spec: ModelSpec; lattice: SupercellLattice; terms: RemappedTerm[] } {
  const spec = validateModel(model);
  const d = spec.periodic;
  if (d === 0) throw new ModelError('supercell.model', `needs a periodic model; "${spec.name}" has no periodic direction`);
  const m = checkIntegerMatrix(matrix, d, 'supercell.matrix');
  const cells = Math.abs(Math.round(integerDeterminant(m)));
  checkModelSize(cells * spec.orbitals.length, 'supercell.matrix', cells, spec.orbitals.length, 'cells (|det|)');
  const lat = new SupercellLattice(m);

  const vectors = spec.vectors.map((v, i) =>
    i < d ? v.map((_, c) => m[i].reduce((s, mij, j) => s + mij * spec.vectors[j][c], 0)) : [...v],
  );
  const orbitals = lat.cells.flatMap((cell) =>
    spec.orbitals.map((o) => {
      const periodicPart = lat.toNew(o.position.slice(0, d).map((x, j) => x + cell[j]));
      return { ...o, label: copyLabel(o.label, cell), position: [...periodicPart, ...o.position.slice(d)] };
    }),
  );

  const set = new TermSet();
  const remapped: RemappedTerm[] = [];
  for (const cell of lat.cells) {
    for (const t of spec.terms) {
      const target = cell.map((c, j) => c + t.cell[j]);
      const { shift, rest } = lat.split(target);
      const term: TermSpec = { from: copyLabel(t.from, cell), to: copyLabel(t.to, rest), cell: shift, amplitude: t.amplitude };
      remapped.push({ term, fromCell: [...cell], toCell: target });
      set.add(term.from, term.to, term.cell, term.amplitude);
    }
  }
  const out: ModelSpec = {
    ...spec,
    name: options.name ?? `${spec.name} supercell ${valueText(m)}`,
    vectors,
    orbitals,
    terms: set.list(),
  };
  return { spec: validateModel(out), lattice: lat, terms: remapped };
}

/** The determinant of a small integer matrix (the supercell's cell count), before listing its cells. */
function integerDeterminant(m: number[][]): number {
  if (m.length === 1) return m[0][0];
  if (m.length === 2) return m[0][0] * m[1][1] - m[0][1] * m[1][0];
  return m[0][0] * (m[1][1] * m[2][2] - m[1][2] * m[2][1]) - m[0][1] * (m[1][0] * m[2][2] - m[1][2] * m[2][0]) + m[0][2] * (m[1][0] * m[2][1] - m[1][1] * m[2][0]);
}
