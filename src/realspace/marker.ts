/**
 * Local Chern marker (Bianco & Resta, PRB 84, 241106(R) (2011)) per cell of a sample:
 *   C(r) = -4 pi s Im <r| P x Q y P |r> = 4 pi s Im <r| P x P y P |r>
 * summed over the orbitals r of the cell, x and y the reduced lattice coordinates (so no cell area
 * appears: the antisymmetric form scales with the determinant of the lattice vectors), s the
 * orientation (+1, or -1 when a1 x a2 < 0). (The second form holds because P x y P is Hermitian.)
 * With this sign the bulk marker equals the Chern number in this project's convention (checked on
 * the Qi–Wu–Zhang model in the tests). Over a whole open sample the markers sum to 0
 * (Bianco & Resta): Tr(P x P y P) - Tr(P y P x P) = 0 for finite matrices.
 *
 * Dense path (this file): from the occupied frame Psi (n x m), x~ = Psi^dagger x Psi,
 * y~ = Psi^dagger y Psi, Z = x~ y~, and <r|P x P y P|r> = Psi_r Z Psi_r^dagger, for every cell
 * at once in O(n m^2 + m^3). The Chebyshev path for large samples is in kpm-marker.ts.
 * Each cell carries its distance (in cells) from the nearest open edge or periodic seam: the
 * marker approaches C only far from both.
 */
import type { BlochHamiltonian } from '../bloch/hamiltonian.js';
import type { CostEstimate } from '../cost.js';
import { ModelError, valueText } from '../model/errors.js';
import { refuseIfTooLarge } from './budget.js';
import { bottCost, checkTwoDimensional } from './bott.js';
import { checkFermiOptions, occupiedStates, type FermiOptions, type SpectrumAtFermi } from './occupied.js';
import { compressDiagonal, multiplyRect } from './products.js';
import { buildSample, checkSampleOptions, type Boundary, type DisorderDescription, type Sample, type SampleOptions } from './sample.js';

export interface LocalMarkerOptions extends SampleOptions, FermiOptions {
  /** Cells to report (each a list of cell indices); default every cell (a map). */
  cells?: number[][];
}

export interface LocalMarkerResult {
  kind: 'local-marker';
  method: 'dense' | 'chebyshev';
  /** The cells reported, dim indices each, flattened. */
  cells: Int32Array;
  /** The marker of each cell (sum over its orbitals). */
  marker: Float64Array;
  /** Distance in cells of each cell from the nearest open edge or periodic seam. */
  edgeDistance: Int32Array;
  /** Sum of the markers of every cell when all were computed (0 for an open sample), else null. */
  total: number | null;
  fermiEnergy: number;
  orbitals: number;
  sizes: number[];
  boundary: Boundary[];
  disorder: DisorderDescription;
  checks: { warnings: string[] } & Partial<SpectrumAtFermi> & Record<string, unknown>;
}

/** Validates the chosen cells against the sample sizes; null means all cells. */
export function checkCells(cells: unknown, sizes: number[]): number[][] | null {
  if (cells === undefined) return null;
  if (!Array.isArray(cells) || cells.length === 0) throw new ModelError('cells', `expected a nonempty list of cells. Value: ${valueText(cells)}`);
  cells.forEach((c, i) => {
    if (!Array.isArray(c) || c.length !== sizes.length || c.some((x, j) => !Number.isInteger(x) || x < 0 || x >= sizes[j])) {
      throw new ModelError(`cells[${i}]`, `expected ${sizes.length} cell indices within ${valueText(sizes)}. Value: ${valueText(c)}`);
    }
  });
  return cells as number[][];
}

/** Linear index of a cell (direction 0 fastest), as in sample.ts. */
export function cellIndex(cell: ArrayLike<number>, sizes: number[]): number {
  let index = 0, stride = 1;
  for (let j = 0; j < sizes.length; j++) {
    index += cell[j] * stride;
    stride *= sizes[j];
  }
  return index;
}

export function edgeDistance(cell: ArrayLike<number>, sizes: number[]): number {
  let d = Infinity;
  for (let j = 0; j < sizes.length; j++) d = Math.min(d, cell[j], sizes[j] - 1 - cell[j]);
  return d;
}

/** Every cell of the sample, or the chosen ones, flattened. */
export function chosenCells(chosen: number[][] | null, sizes: number[]): Int32Array {
  if (chosen !== null) return Int32Array.from(chosen.flat());
  const count = sizes.reduce((a, b) => a * b, 1);
  const out = new Int32Array(count * sizes.length);
  for (let c = 0; c < count; c++) {
    let rest = c;
    for (let j = 0; j < sizes.length; j++) {
      out[c * sizes.length + j] = rest % sizes[j];
      rest = Math.floor(rest / sizes[j]);
    }
  }
  return out;
}

export function localMarkerCost(orbitals: number, options: Pick<SampleOptions, 'sizes'>): CostEstimate {
  return bottCost(orbitals, options);
}

/** The local Chern marker by the dense projector (small samples; the cross-check of the Chebyshev path). */
export function localMarker(h: BlochHamiltonian, options: LocalMarkerOptions): LocalMarkerResult {
  checkTwoDimensional(h.dim, 'the local Chern marker');
  const checked = checkSampleOptions(options, h.dim);
  checkFermiOptions(options);
  const chosen = checkCells(options.cells, checked.sizes);
  refuseIfTooLarge('the dense local marker', checked.sizes, (sizes) => localMarkerCost(h.size, { sizes }));
  return markerOfSample(buildSample(h, options), options, chosen);
}

export function markerOfSample(sample: Sample, options: FermiOptions, chosen: number[][] | null): LocalMarkerResult {
  const { frame, checks } = occupiedStates(sample, options);
  const n = sample.size, m = checks.occupied, dim = sample.dim;
  const coordinate = (dir: number) => Float64Array.from({ length: n }, (_, i) => sample.positions[i * dim + dir]);
  const x = compressDiagonal(n, m, frame, coordinate(0), null, new Float64Array(2 * m * m));
  const y = compressDiagonal(n, m, frame, coordinate(1), null, new Float64Array(2 * m * m));
  const z = multiplyRect(m, m, m, x, y, new Float64Array(2 * m * m));
  const perCell = new Float64Array(sample.sizes.reduce((a, b) => a * b, 1));
  const t = new Float64Array(2 * m);
  for (let r = 0; r < n; r++) {
    // t = Psi_r Z, then Im(t . conj(Psi_r)).
    multiplyRect(1, m, m, frame.subarray(2 * r * m, 2 * (r + 1) * m), z, t);
    let im = 0;
    for (let j = 0; j < m; j++) {
      const pr = frame[2 * (r * m + j)], pi = frame[2 * (r * m + j) + 1];
      im += t[2 * j + 1] * pr - t[2 * j] * pi;
    }
    perCell[cellIndex(sample.cells.subarray(r * dim, (r + 1) * dim), sample.sizes)] += 4 * Math.PI * sample.orientation * im;
  }
  const cells = chosenCells(chosen, sample.sizes);
  const count = cells.length / dim;
  const marker = new Float64Array(count);
  const distance = new Int32Array(count);
  for (let c = 0; c < count; c++) {
    const cell = cells.subarray(c * dim, (c + 1) * dim);
    marker[c] = perCell[cellIndex(cell, sample.sizes)];
    distance[c] = edgeDistance(cell, sample.sizes);
  }
  const warnings = [...checks.warnings];
  if (checks.gapless) warnings.push('the projector is ambiguous at this Fermi energy: the markers are not given');
  return {
    kind: 'local-marker', method: 'dense', cells, marker: checks.gapless ? marker.fill(NaN) : marker, edgeDistance: distance,
    total: chosen === null && !checks.gapless ? perCell.reduce((a, b) => a + b, 0) : null,
    fermiEnergy: checks.fermiEnergy, orbitals: n, sizes: sample.sizes, boundary: sample.boundary, disorder: sample.disorder,
    checks: { ...checks, warnings },
  };
}
