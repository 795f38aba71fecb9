/**
 * Reciprocal lattice and high-symmetry points, computed from a model's lattice vectors.
 *
 * Points are given in units of the reciprocal lattice vectors ("fractions"): the Cartesian momentum
 * is sum_i f_i b_i with a_i·b_j = 2 pi delta_ij, and the reduced momentum the engine uses is
 * k_i = 2 pi f_i. Fractions depend only on the metric of the lattice, not on its orientation, so
 * the points below are right however the lattice is rotated.
 */
import { ModelError, valueText } from '../model/errors.js';
import type { ModelSpec } from '../model/spec.js';
import type { KPoint } from './common.js';

/**
 * Reciprocal vectors b_j (Cartesian) of the first `periodic` vectors: a_i·b_j = 2 pi delta_ij with
 * each b_j in the span of the periodic vectors (so a ribbon's b lies along its axis).
 */
export function reciprocalVectors(vectors: number[][], periodic = vectors.length): number[][] {
  const a = vectors.slice(0, periodic);
  const gram = a.map((x) => a.map((y) => dot(x, y)));
  const inv = invert(gram, 'vectors');
  return a.map((_, j) => {
    const b = new Array<number>(a[0]?.length ?? 0).fill(0);
    for (let i = 0; i < periodic; i++) for (let c = 0; c < b.length; c++) b[c] += 2 * Math.PI * inv[j][i] * a[i][c];
    return b;
  });
}

/** Cartesian momentum of fractional coordinates: sum_i f_i b_i. */
export function cartesianMomentum(fractions: ArrayLike<number>, reciprocal: number[][]): number[] {
  const out = new Array<number>(reciprocal[0]?.length ?? 0).fill(0);
  for (let i = 0; i < reciprocal.length; i++) for (let c = 0; c < out.length; c++) out[c] += fractions[i] * reciprocal[i][c];
  return out;
}

/** A momentum in all three forms, from reduced k in radians. */
export function kPointFromReduced(k: ArrayLike<number>, reciprocal: number[][]): KPoint {
  const radians = Array.from(k);
  const fractions = radians.map((x) => x / (2 * Math.PI));
  return { k: radians, fractions, cartesian: cartesianMomentum(fractions, reciprocal) };
}

export type LatticeFamily = 'chain' | 'square' | 'rectangular' | 'hexagonal' | 'oblique' | 'cubic' | 'orthorhombic' | 'triclinic';

export interface HighSymmetryPoints {
  family: LatticeFamily;
  /** Label -> fractions of the reciprocal vectors. */
  points: Record<string, number[]>;
  /** A customary path through them, as labels; '|' marks a jump. */
  path: string[];
}

const TOL = 1e-6;

/**
 * The high-symmetry points of the model's lattice (its periodic vectors), classified from the
 * metric a_i·a_j: chain (Γ, X), square (Γ, X, Y, M), rectangular (Γ, X, Y, S), hexagonal
 * (Γ, M, K, K'), simple cubic (Γ, X, M, R), orthorhombic (Γ, X, Y, Z, R). Other lattices get Γ and
 * the face centres X, Y, Z of the reciprocal cell.
 */
export function highSymmetryPoints(model: Pick<ModelSpec, 'vectors' | 'periodic'>): HighSymmetryPoints {
  const p = model.periodic;
  const a = model.vectors.slice(0, p);
  const len = a.map((v) => Math.sqrt(dot(v, v)));
  const cos = (i: number, j: number) => dot(a[i], a[j]) / (len[i] * len[j]);
  const same = (x: number, y: number) => Math.abs(x - y) <= TOL * Math.max(x, y);
  const G = new Array<number>(p).fill(0);
  if (p === 0) throw new ModelError('periodic', `a model with no periodic direction has no Brillouin zone. Value: ${valueText(p)}`);
  if (p === 1) return { family: 'chain', points: { 'Γ': [0], X: [0.5] }, path: ['X', 'Γ', 'X'] };
  if (p === 2) {
    const c = cos(0, 1);
    if (Math.abs(c) <= TOL) {
      if (same(len[0], len[1])) return { family: 'square', points: { 'Γ': G, X: [0.5, 0], Y: [0, 0.5], M: [0.5, 0.5] }, path: ['Γ', 'X', 'M', 'Γ'] };
      return { family: 'rectangular', points: { 'Γ': G, X: [0.5, 0], Y: [0, 0.5], S: [0.5, 0.5] }, path: ['Γ', 'X', 'S', 'Y', 'Γ'] };
    }
    if (same(len[0], len[1]) && Math.abs(Math.abs(c) - 0.5) <= TOL) {
      // a1·a2 < 0 (120°): b1, b2 at 60°, corner K = (b1 + b2)/3. a1·a2 > 0 (60°): b1, b2 at 120°,
      // corner K = (2 b1 + b2)/3. K' = -K folded back; each is equidistant from Γ and two
      // neighbouring reciprocal lattice points (checked in the tests).
      const points = c < 0
        ? { 'Γ': G, M: [0.5, 0], K: [1 / 3, 1 / 3], "K'": [2 / 3, -1 / 3] }
        : { 'Γ': G, M: [0.5, 0], K: [2 / 3, 1 / 3], "K'": [1 / 3, 2 / 3] };
      return { family: 'hexagonal', points, path: ['Γ', 'M', 'K', 'Γ'] };
    }
    return { family: 'oblique', points: { 'Γ': G, X: [0.5, 0], Y: [0, 0.5] }, path: ['X', 'Γ', 'Y'] };
  }
  const orthogonal = Math.abs(cos(0, 1)) <= TOL && Math.abs(cos(0, 2)) <= TOL && Math.abs(cos(1, 2)) <= TOL;
  if (orthogonal && same(len[0], len[1]) && same(len[1], len[2])) {
    return {
      family: 'cubic',
      points: { 'Γ': G, X: [0.5, 0, 0], M: [0.5, 0.5, 0], R: [0.5, 0.5, 0.5] },
      path: ['Γ', 'X', 'M', 'Γ', 'R', 'X', '|', 'M', 'R'],
    };
  }
  const faces = { X: [0.5, 0, 0], Y: [0, 0.5, 0], Z: [0, 0, 0.5] };
  if (orthogonal) return { family: 'orthorhombic', points: { 'Γ': G, ...faces, R: [0.5, 0.5, 0.5] }, path: ['Γ', 'X', '|', 'Y', 'Γ', 'Z', '|', 'R', 'Γ'] };
  return { family: 'triclinic', points: { 'Γ': G, ...faces }, path: ['X', 'Γ', 'Y', '|', 'Z', 'Γ'] };
}

function dot(x: ArrayLike<number>, y: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < x.length; i++) s += x[i] * y[i];
  return s;
}

/** Inverse of a small symmetric positive-definite matrix by Gauss–Jordan with partial pivoting. */
function invert(m: number[][], field: string): number[][] {
  const n = m.length;
  const a = m.map((row, i) => [...row, ...row.map((_, j) => (i === j ? 1 : 0))]);
  // Relative to the Gram matrix's own scale, so the unit of length does not matter.
  const scale = Math.max(...m.map((row, i) => Math.abs(row[i])));
  for (let col = 0; col < n; col++) {
    let pivot = col;
    for (let r = col + 1; r < n; r++) if (Math.abs(a[r][col]) > Math.abs(a[pivot][col])) pivot = r;
    if (!(Math.abs(a[pivot][col]) > 1e-14 * scale)) {
      throw new ModelError(field, `periodic lattice vectors are linearly dependent. Value: ${valueText(m)}`);
    }
    [a[col], a[pivot]] = [a[pivot], a[col]];
    const d = a[col][col];
    for (let j = 0; j < 2 * n; j++) a[col][j] /= d;
    for (let r = 0; r < n; r++) {
      if (r === col) continue;
      const f = a[r][col];
      for (let j = 0; j < 2 * n; j++) a[r][j] -= f * a[col][j];
    }
  }
  return a.map((row) => row.slice(n));
}
