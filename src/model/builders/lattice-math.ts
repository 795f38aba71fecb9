/**
 * Small integer-lattice helpers shared by the model builders: exact inverses of integer matrices,
 * decomposition of a cell into supercell translation + cell inside the supercell.
 */
import { ModelError, valueText } from '../errors.js';

/** Label of an orbital copied into cell `cell` of a larger model: `a@1,0`. */
export function copyLabel(label: string, cell: readonly number[]): string {
  return `${label}@${cell.join(',')}`;
}

export function determinant(m: number[][]): number {
  const n = m.length;
  if (n === 1) return m[0][0];
  if (n === 2) return m[0][0] * m[1][1] - m[0][1] * m[1][0];
  return (
    m[0][0] * (m[1][1] * m[2][2] - m[1][2] * m[2][1]) -
    m[0][1] * (m[1][0] * m[2][2] - m[1][2] * m[2][0]) +
    m[0][2] * (m[1][0] * m[2][1] - m[1][1] * m[2][0])
  );
}

/** The adjugate of an integer matrix, so that inverse = adjugate / det stays exact. */
function adjugate(m: number[][]): number[][] {
  const n = m.length;
  if (n === 1) return [[1]];
  if (n === 2) return [[m[1][1], -m[0][1]], [-m[1][0], m[0][0]]];
  const c = (i: number, j: number): number => {
    const r = [0, 1, 2].filter((x) => x !== i);
    const k = [0, 1, 2].filter((x) => x !== j);
    return (m[r[0]][k[0]] * m[r[1]][k[1]] - m[r[0]][k[1]] * m[r[1]][k[0]]) * ((i + j) % 2 === 0 ? 1 : -1);
  };
  return [0, 1, 2].map((i) => [0, 1, 2].map((j) => c(j, i)));
}

/** Checks an integer supercell matrix (rows = new vectors in units of the old ones). */
export function checkIntegerMatrix(m: unknown, dim: number, field: string): number[][] {
  if (!Array.isArray(m) || m.length !== dim || !m.every((r) => Array.isArray(r) && r.length === dim && r.every((x) => Number.isInteger(x)))) {
    throw new ModelError(field, `expected a ${dim} x ${dim} integer matrix (one row per new lattice vector). Value: ${valueText(m)}`);
  }
  const rows = m as number[][];
  if (determinant(rows) === 0) throw new ModelError(field, `the matrix is singular (its rows are linearly dependent). Value: ${valueText(m)}`);
  return rows.map((r) => [...r]);
}

/**
 * The lattice of a supercell with integer matrix M: the old cells inside it and a map from any old
 * cell R to (S, index) with R = S M + cells[index].
 */
export class SupercellLattice {
  readonly matrix: number[][];
  readonly cells: number[][];
  private readonly det: number;
  private readonly adj: number[][];
  private readonly lookup = new Map<string, number>();

  constructor(matrix: number[][]) {
    this.matrix = matrix;
    this.det = determinant(matrix);
    this.adj = adjugate(matrix);
    const dim = matrix.length;
    // Bounding box of the supercell's corners, in old cell coordinates.
    const lo = new Array<number>(dim).fill(0);
    const hi = new Array<number>(dim).fill(0);
    for (let mask = 0; mask < 1 << dim; mask++) {
      for (let j = 0; j < dim; j++) {
        let x = 0;
        for (let i = 0; i < dim; i++) if (mask & (1 << i)) x += matrix[i][j];
        lo[j] = Math.min(lo[j], x);
        hi[j] = Math.max(hi[j], x);
      }
    }
    this.cells = [];
    const r = new Array<number>(dim).fill(0);
    const visit = (j: number): void => {
      if (j === dim) {
        if (this.split(r).shift.every((s) => s === 0)) {
          this.lookup.set(r.join(','), this.cells.length);
          this.cells.push([...r]);
        }
        return;
      }
      for (let x = lo[j]; x <= hi[j]; x++) {
        r[j] = x;
        visit(j + 1);
      }
    };
    visit(0);
    if (this.cells.length !== Math.abs(this.det)) throw new Error(`supercell enumeration found ${this.cells.length} cells, expected ${Math.abs(this.det)}`);
  }

  /** R = shift M + rest with rest inside the supercell (fractional coordinates in [0, 1)). */
  split(r: readonly number[]): { shift: number[]; rest: number[] } {
    const dim = r.length;
    const shift = new Array<number>(dim);
    for (let j = 0; j < dim; j++) {
      let num = 0; // (R adj)_j, exact integer; fractional coordinate = num / det
      for (let i = 0; i < dim; i++) num += r[i] * this.adj[i][j];
      shift[j] = Math.floor(num / this.det);
    }
    const rest = r.map((x, j) => {
      let y = x;
      for (let i = 0; i < dim; i++) y -= shift[i] * this.matrix[i][j];
      return y;
    });
    return { shift, rest };
  }

  indexOf(rest: readonly number[]): number {
    const i = this.lookup.get(rest.join(','));
    if (i === undefined) throw new Error(`cell ${rest.join(',')} is not inside the supercell`);
    return i;
  }

  /** Reduced coordinates x (old basis) in the new basis: x M^{-1}. */
  toNew(x: readonly number[]): number[] {
    const dim = x.length;
    return Array.from({ length: dim }, (_, j) => {
      let s = 0;
      for (let i = 0; i < dim; i++) s += x[i] * this.adj[i][j];
      return s / this.det;
    });
  }
}
