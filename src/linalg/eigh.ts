/**
 * Hermitian eigensolver: eigenvalues ascending, eigenvectors as the columns of V.
 *
 * Cyclic complex Jacobi rotations: each rotation is a phase that makes the pivot real followed by
 * a real plane rotation that annihilates it. Accurate to machine precision on clustered and exactly
 * degenerate spectra (no deflation heuristics to get wrong).
 */
import type { CMatrix } from './cmatrix.js';

export class HermitianEigensolver {
  readonly n: number;
  private readonly a: Float64Array;
  private readonly v: Float64Array;
  private readonly order: Int32Array;
  private readonly values: Float64Array;

  constructor(n: number) {
    if (!Number.isInteger(n) || n < 1) throw new RangeError(`eigensolver size must be a positive integer. Value: ${n}`);
    this.n = n;
    this.a = new Float64Array(2 * n * n);
    this.v = new Float64Array(2 * n * n);
    this.order = new Int32Array(n);
    this.values = new Float64Array(n);
  }

  /**
   * Eigenvalues of the Hermitian matrix `h` into `w` (ascending) and, when `vecs` is given, the
   * orthonormal eigenvectors into its columns. Only the upper triangle of `h` is read; `h` is not
   * modified. Returns `w`.
   */
  solve(h: CMatrix, w: Float64Array, vecs?: CMatrix): Float64Array {
    const n = this.n;
    const a = this.a;
    const v = this.v;
    const wantVectors = vecs !== undefined;
    for (let i = 0; i < n; i++) {
      for (let j = i; j < n; j++) {
        const re = h[2 * (i * n + j)], im = h[2 * (i * n + j) + 1];
        a[2 * (i * n + j)] = re;
        a[2 * (i * n + j) + 1] = i === j ? 0 : im;
        a[2 * (j * n + i)] = re;
        a[2 * (j * n + i) + 1] = i === j ? 0 : -im;
      }
    }
    if (wantVectors) {
      v.fill(0);
      for (let i = 0; i < n; i++) v[2 * (i * n + i)] = 1;
    }
    for (let sweep = 0; sweep < 100; sweep++) {
      let off = 0;
      let diag = 0;
      for (let i = 0; i < n; i++) {
        diag += a[2 * (i * n + i)] ** 2;
        for (let j = i + 1; j < n; j++) off += a[2 * (i * n + j)] ** 2 + a[2 * (i * n + j) + 1] ** 2;
      }
      if (off <= 1e-32 * diag || off === 0) break;
      for (let p = 0; p < n - 1; p++) {
        for (let q = p + 1; q < n; q++) this.rotate(p, q, wantVectors);
      }
    }
    const values = this.values;
    const order = this.order;
    for (let i = 0; i < n; i++) {
      values[i] = a[2 * (i * n + i)];
      order[i] = i;
    }
    order.sort((x, y) => values[x] - values[y]);
    for (let i = 0; i < n; i++) w[i] = values[order[i]];
    if (vecs !== undefined) {
      for (let col = 0; col < n; col++) {
        const src = order[col];
        for (let row = 0; row < n; row++) {
          vecs[2 * (row * n + col)] = v[2 * (row * n + src)];
          vecs[2 * (row * n + col) + 1] = v[2 * (row * n + src) + 1];
        }
      }
    }
    return w;
  }

  private rotate(p: number, q: number, wantVectors: boolean): void {
    const n = this.n;
    const a = this.a;
    const pr = a[2 * (p * n + q)], pi = a[2 * (p * n + q) + 1];
    const b = Math.hypot(pr, pi);
    const app = a[2 * (p * n + p)], aqq = a[2 * (q * n + q)];
    if (b === 0 || b <= 1e-300 || Math.abs(b) < 1e-17 * (Math.abs(app) + Math.abs(aqq)) * 1e-2) {
      if (b !== 0 && b < 1e-17 * (Math.abs(app) + Math.abs(aqq)) * 1e-2) {
        a[2 * (p * n + q)] = a[2 * (p * n + q) + 1] = a[2 * (q * n + p)] = a[2 * (q * n + p) + 1] = 0;
      }
      return;
    }
    // Phase e^{-i phi} makes the pivot real; then the real Jacobi rotation (c, s).
    const er = pr / b, ei = -pi / b; // e^{-i phi}
    const theta = (aqq - app) / (2 * b);
    const t = (theta >= 0 ? 1 : -1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
    const c = 1 / Math.sqrt(t * t + 1);
    const s = t * c;
    // U = [[c, s], [-s e^{-i phi}, c e^{-i phi}]] on (p, q). A <- A U (columns).
    const ser = s * er, sei = s * ei, cer = c * er, cei = c * ei;
    for (let k = 0; k < n; k++) {
      const kp = 2 * (k * n + p), kq = 2 * (k * n + q);
      const xr = a[kp], xi = a[kp + 1], yr = a[kq], yi = a[kq + 1];
      a[kp] = c * xr - (yr * ser - yi * sei);
      a[kp + 1] = c * xi - (yr * sei + yi * ser);
      a[kq] = s * xr + (yr * cer - yi * cei);
      a[kq + 1] = s * xi + (yr * cei + yi * cer);
    }
    // A <- U^dagger A (rows): row p = c row p - s e^{i phi} row q; row q = s row p + c e^{i phi} row q.
    for (let k = 0; k < n; k++) {
      const pk = 2 * (p * n + k), qk = 2 * (q * n + k);
      const xr = a[pk], xi = a[pk + 1], yr = a[qk], yi = a[qk + 1];
      a[pk] = c * xr - (yr * ser + yi * sei);
      a[pk + 1] = c * xi - (yi * ser - yr * sei);
      a[qk] = s * xr + (yr * cer + yi * cei);
      a[qk + 1] = s * xi + (yi * cer - yr * cei);
    }
    a[2 * (p * n + q)] = a[2 * (p * n + q) + 1] = a[2 * (q * n + p)] = a[2 * (q * n + p) + 1] = 0;
    a[2 * (p * n + p) + 1] = a[2 * (q * n + q) + 1] = 0;
    if (wantVectors) {
      const v = this.v;
      for (let k = 0; k < n; k++) {
        const kp = 2 * (k * n + p), kq = 2 * (k * n + q);
        const xr = v[kp], xi = v[kp + 1], yr = v[kq], yi = v[kq + 1];
        v[kp] = c * xr - (yr * ser - yi * sei);
        v[kp + 1] = c * xi - (yr * sei + yi * ser);
        v[kq] = s * xr + (yr * cer - yi * cei);
        v[kq + 1] = s * xi + (yr * cei + yi * cer);
      }
    }
  }
}

/** Convenience: eigenvalues (and vectors) of one matrix, allocating. Not for per-k loops. */
export function eigh(n: number, h: CMatrix): { values: Float64Array; vectors: CMatrix } {
  const solver = new HermitianEigensolver(n);
  const values = new Float64Array(n);
  const vectors = new Float64Array(2 * n * n);
  solver.solve(h, values, vectors);
  return { values, vectors };
}
