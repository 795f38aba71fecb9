/**
 * Principal layers of a crystal cut along a lattice plane: the blocks H00(k_par) (one layer) and
 * H01(k_par) (a layer and the next) of the half-infinite sample that the surface Green's function
 * (decimation.ts) and the surface spectra are built from.
 *
 * The cut is a lattice plane given by Miller indices m (relatively prime integers over the periodic
 * directions; an index i stands for e_i, the ribbon builder's "open a_i"): cell n lies in plane
 * m·n. A unimodular integer basis A_1 .. A_d is chosen with A_1 .. A_{d-1} in the plane (they span
 * the surface lattice; k_par is reduced along them) and m·A_d = 1 (the stacking step). A principal
 * layer is `thickness` consecutive planes, thickness = the largest |m·R| over the model's terms, so
 * that hoppings reach only the next layer: H is block tridiagonal in principal layers.
 *
 * Orbital q of the layer is plane l = floor(q / size) of it, orbital q mod size. The Bloch phases
 * are in the 'lattice' convention (no orbital positions): spectral functions do not depend on it.
 */
import type { BlochHamiltonian, Hoppings } from '../bloch/hamiltonian.js';
import { ModelError, valueText } from '../model/errors.js';

/** A cut: the index of a periodic direction, or Miller indices over the periodic directions. */
export type CutSpec = number | number[];

export interface PrincipalLayers {
  /** The Miller indices of the cut (an index i given as e_i). */
  miller: number[];
  /**
   * The new lattice basis in units of the old lattice vectors, rows A_1 .. A_d: the first d-1 span
   * the surface, the last (m·A_d = 1) steps from one plane to the next, into the bulk of the
   * 'bottom' termination.
   */
  basis: number[][];
  /** Lattice planes per principal layer: the longest reach of a hopping across the cut. */
  thickness: number;
  /** Orbitals of a principal layer: thickness x the model's orbitals. */
  size: number;
  /** Periodic directions along the surface: the length of k_par. */
  surfaceDim: number;
  /** Cartesian surface lattice vectors (sum_j A_ij a_j, i < d). */
  surfaceVectors: number[][];
  /** Fill H00 (<0|H|0>) and H01 (<0|H|1>, layer 1 one step along A_d) at reduced k_par, split re/im. */
  fill(kPar: ArrayLike<number>, h00: SplitMatrix, h01: SplitMatrix): void;
}

/** An n x n complex matrix as separate real and imaginary parts, row-major. */
export interface SplitMatrix {
  re: Float64Array;
  im: Float64Array;
}

export function splitMatrix(n: number): SplitMatrix {
  return { re: new Float64Array(n * n), im: new Float64Array(n * n) };
}

const gcd = (a: number, b: number): number => (b === 0 ? Math.abs(a) : gcd(b, a % b));

/** The cut as Miller indices over `dim` periodic directions; the error names `field` and the value. */
export function resolveCut(cut: unknown, dim: number, field = 'cut'): number[] {
  if (dim < 1) throw new ModelError(field, `a surface needs a periodic model; this one has no periodic direction`);
  if (typeof cut === 'number') {
    if (!Number.isInteger(cut) || cut < 0 || cut >= dim) throw new ModelError(field, `expected a periodic direction from 0 to ${dim - 1}, or Miller indices. Value: ${valueText(cut)}`);
    return Array.from({ length: dim }, (_, i) => (i === cut ? 1 : 0));
  }
  if (!Array.isArray(cut) || cut.length !== dim || !cut.every((x) => Number.isInteger(x))) {
    throw new ModelError(field, `expected a periodic direction (0 to ${dim - 1}) or ${dim} integer Miller indices. Value: ${valueText(cut)}`);
  }
  const g = (cut as number[]).reduce((a, b) => gcd(a, b), 0);
  if (g !== 1) {
    throw new ModelError(field, g === 0
      ? `the Miller indices are all zero: no lattice plane. Value: ${valueText(cut)}`
      : `the Miller indices have the common factor ${g}: not a primitive lattice direction (divide by ${g}). Value: ${valueText(cut)}`);
  }
  return [...(cut as number[])];
}

/**
 * A unimodular integer basis (rows, in old lattice units) with the first d-1 rows in the plane
 * m·n = 0 and m·row_d = 1: column operations reduce m to e_d while the same operations on the
 * identity give the basis (as columns, transposed at the end).
 */
export function planeBasis(m: readonly number[]): number[][] {
  const d = m.length;
  const v = [...m];
  const u = Array.from({ length: d }, (_, i) => Array.from({ length: d }, (_, j) => (i === j ? 1 : 0)));
  const colOp = (target: number, source: number, q: number): void => {
    v[target] -= q * v[source];
    for (let i = 0; i < d; i++) u[i][target] -= q * u[i][source];
  };
  for (;;) {
    const nonzero = v.map((x, i) => [Math.abs(x), i]).filter(([a]) => a > 0).sort((a, b) => a[0] - b[0]);
    if (nonzero.length === 1) break;
    const p = nonzero[0][1];
    for (const [, i] of nonzero.slice(1)) colOp(i, p, Math.trunc(v[i] / v[p]));
  }
  const p = v.findIndex((x) => x !== 0);
  const sign = v[p];
  // The unit column goes last, the others keep their order (a permutation keeps the basis
  // unimodular; an index cut e_i keeps the other directions in order, as the ribbon builder does).
  const order = [...Array.from({ length: d }, (_, i) => i).filter((i) => i !== p), p];
  return order.map((col, r) => Array.from({ length: d }, (_, i) => u[i][col] * (r === d - 1 ? sign : 1) + 0));
}

/** Inverse of a unimodular integer matrix (exact, by the adjugate; small d). */
function inverseUnimodular(a: number[][]): number[][] {
  const d = a.length;
  if (d === 1) return [[a[0][0]]];
  if (d === 2) {
    const det = a[0][0] * a[1][1] - a[0][1] * a[1][0];
    return [[a[1][1] / det, -a[0][1] / det], [-a[1][0] / det, a[0][0] / det]];
  }
  const c = (i: number, j: number): number => {
    const r = [0, 1, 2].filter((x) => x !== i), k = [0, 1, 2].filter((x) => x !== j);
    return (a[r[0]][k[0]] * a[r[1]][k[1]] - a[r[0]][k[1]] * a[r[1]][k[0]]) * ((i + j) % 2 === 0 ? 1 : -1);
  };
  const det = a[0][0] * c(0, 0) + a[0][1] * c(0, 1) + a[0][2] * c(0, 2);
  return [0, 1, 2].map((i) => [0, 1, 2].map((j) => c(j, i) / det + 0));
}

/**
 * The principal layers of `h` cut along `cut` (field name `field` in errors). A model with no term
 * across the cut has no half-infinite bulk to attach: an error naming the field.
 */
export function principalLayers(h: BlochHamiltonian, cut: CutSpec, field = 'cut'): PrincipalLayers {
  const d = h.dim;
  const miller = resolveCut(cut, d, field);
  const basis = planeBasis(miller);
  const inv = inverseUnimodular(basis);
  const hop: Hoppings = h.hoppings();
  const norb = h.size;
  const count = hop.count;
  // Each term in the new basis: plane step L = m·R and surface cell c (first d-1 coordinates).
  const steps = new Int32Array(count);
  const surface = new Float64Array(count * (d - 1));
  let thickness = 0;
  for (let t = 0; t < count; t++) {
    const r = Array.from({ length: d }, (_, j) => hop.cells[t * hop.cellDim + j]);
    let step = 0;
    for (let j = 0; j < d; j++) step += miller[j] * r[j];
    steps[t] = step;
    // R = sum_i c_i A_i, so c = R A^{-1}.
    for (let i = 0; i < d - 1; i++) {
      let ci = 0;
      for (let j = 0; j < d; j++) ci += r[j] * inv[j][i];
      surface[t * (d - 1) + i] = Math.round(ci);
    }
    thickness = Math.max(thickness, Math.abs(step));
  }
  if (thickness === 0) {
    throw new ModelError(field, `"${h.spec.name}" has no hopping across the lattice planes ${valueText(miller)} (every term stays in its plane), so the planes are decoupled and there is no bulk behind a surface. Value: ${valueText(cut)}`);
  }
  const size = thickness * norb;
  const vectors = h.spec.vectors;
  const surfaceVectors = basis.slice(0, d - 1).map((row) => vectors[0].map((_, c) => row.reduce((s, x, j) => s + x * vectors[j][c], 0)));
  const onsite = new Uint8Array(count);
  for (let t = 0; t < count; t++) {
    let zero = true;
    for (let j = 0; j < hop.cellDim; j++) if (hop.cells[t * hop.cellDim + j] !== 0) zero = false;
    onsite[t] = hop.from[t] === hop.to[t] && zero ? 1 : 0;
  }
  const { from, to, re, im } = hop;

  const fill = (kPar: ArrayLike<number>, h00: SplitMatrix, h01: SplitMatrix): void => {
    h00.re.fill(0); h00.im.fill(0); h01.re.fill(0); h01.im.fill(0);
    for (let t = 0; t < count; t++) {
      let phi = 0;
      for (let i = 0; i < d - 1; i++) phi -= kPar[i] * surface[t * (d - 1) + i];
      const c = Math.cos(phi), s = Math.sin(phi);
      // <R,b|H|0,a> = amp e^{-i k·c} in the surface Bloch basis.
      const ar = re[t] * c - im[t] * s, ai = re[t] * s + im[t] * c;
      const a = from[t], b = to[t], step = steps[t];
      for (let l = 0; l < thickness; l++) {
        const target = l + step;
        const layer = Math.floor(target / thickness);
        const q = (target - layer * thickness) * norb + b; // row: (plane, orbital b)
        const p = l * norb + a; // column: (plane l, orbital a) of layer 0
        if (layer === 0) {
          h00.re[q * size + p] += ar; h00.im[q * size + p] += ai;
          if (!onsite[t]) { h00.re[p * size + q] += ar; h00.im[p * size + q] -= ai; }
        } else if (layer === 1) {
          // <1,q|H|0,p> = amp: H01 = <0|H|1> holds its conjugate at (p, q).
          h01.re[p * size + q] += ar; h01.im[p * size + q] -= ai;
        } else {
          // <-1,q|H|0,p> = amp is, one layer up, <0,q|H|1,p>.
          h01.re[q * size + p] += ar; h01.im[q * size + p] += ai;
        }
      }
    }
  };
  return { miller, basis, thickness, size, surfaceDim: d - 1, surfaceVectors, fill };
}
