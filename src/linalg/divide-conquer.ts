/**
 * Eigenvalues and eigenvectors of a real symmetric tridiagonal matrix by divide and conquer
 * (J. J. M. Cuppen, Numer. Math. 36, 177 (1981)): tear the matrix in two by a rank-one term, solve
 * the halves, and merge through the secular equation 1 + rho sum_j z_j^2 / (d_j - x) = 0.
 * Deflation of tiny z_j and of close poles as in J. J. Dongarra & D. C. Sorensen, SIAM J. Sci.
 * Stat. Comput. 8, s139 (1987); each root kept as (pole, offset) so that d_j - lambda is accurate,
 * and the eigenvectors from the recomputed vector z-hat of Gu & Eisenstat (SIAM J. Matrix Anal.
 * Appl. 16, 172 (1995)), which makes them numerically orthogonal however close the roots are.
 * The secular root finder is the two-pole rational ("middle way") iteration of R.-C. Li (LAPACK
 * Working Note 89, 1994), safeguarded by bisection. Small blocks go to implicit QL.
 *
 * Most of the work is the product of the halves' eigenvectors with the merge's eigenvectors, a
 * real matrix product (about 4/3 n^3 flops in all, less after deflation, against about 3 n^3 for
 * QL with rotations accumulated), run by a WebAssembly SIMD kernel (`simd.ts`).
 */
import { checkInterrupt } from '../interrupt.js';
import type { SimdKernels } from './simd.js';
import { ascendingOrder, tridiagonalQL } from './tridiagonal.js';

const EPS = 2 ** -52;
/**
 * Blocks up to this size are solved by QL (with the rotations applied as they are made); above it
 * divide and conquer wins (measured: 8 % faster at n = 28, equal at 16..24 where it splits once).
 */
export const LEAF = 24;
const MAX_SECULAR_STEPS = 100;

export class TridiagonalDivideConquer {
  readonly n: number;
  /** Poles (sorted), their z, the sorted-to-original permutation and each column's rows (1 top, 2 both, 3 bottom). */
  private readonly ds: Float64Array;
  private readonly zs: Float64Array;
  private readonly perm: Int32Array;
  private readonly kind: Int8Array;
  /** The merge's eigenvectors of the halves, sorted by pole (s x s). */
  private readonly qc: Float64Array;
  /**
   * The product's operands in the SIMD kernels' memory (from byte `at`): kept columns of the halves' eigenvectors (rows x kept), the matching rows
   * of the merge's eigenvectors (kept x roots, padded to a multiple of 4), and their product.
   */
  private readonly simd: SimdKernels;
  private readonly at: number;
  private readonly pa: Float64Array;
  private readonly pb: Float64Array;
  private readonly pc: Float64Array;
  /** Non-deflated poles: their column in qc, value, z and z-hat; deflated ones: column, sorted by value. */
  private readonly keep: Int32Array;
  private readonly dd: Float64Array;
  private readonly zz: Float64Array;
  private readonly zh: Float64Array;
  private readonly gone: Int32Array;
  /** Roots: origin pole and offset; dm[i k + j] = dd[j] - lambda_i, then the merge's eigenvectors (row i: root i). */
  private readonly org: Int32Array;
  private readonly tau: Float64Array;
  private readonly dm: Float64Array;
  /** Output column of each root and the rows lists for the product. */
  private readonly pos: Int32Array;
  /** The roots whose eigenvectors a merge forms (all but at the last merge, see `columns`). */
  private readonly roots: Int32Array;
  private readonly top: Int32Array;
  private readonly bottom: Int32Array;
  /** Leaf scratch. */
  private readonly ld: Float64Array;
  private readonly le: Float64Array;
  private readonly lz: Float64Array;
  private readonly lorder: Int32Array;
  private readonly cs: Float64Array;
  private readonly sn: Float64Array;

  /** The bytes of SIMD memory a solver of size n uses (from the `at` given to its constructor). */
  static simdBytes(n: number): number {
    return 3 * 8 * n * (n + 4);
  }

  /**
   * `kernels` and `memory` from `simdWorkspace`; `at`: where this solver's part of that memory
   * starts (bytes, a multiple of 16), past whatever its caller keeps there during a solve, with
   * `simdBytes(n)` bytes from there on.
   */
  constructor(n: number, kernels: SimdKernels, memory: ArrayBuffer, at: number) {
    this.n = n;
    this.simd = kernels;
    this.at = at;
    const size = n * (n + 4);
    this.pa = new Float64Array(memory, at, size);
    this.pb = new Float64Array(memory, at + 8 * size, size);
    this.pc = new Float64Array(memory, at + 16 * size, size);
    this.ds = new Float64Array(n);
    this.zs = new Float64Array(n);
    this.perm = new Int32Array(n);
    this.kind = new Int8Array(n);
    this.qc = new Float64Array(n * n);
    this.keep = new Int32Array(n);
    this.dd = new Float64Array(n);
    this.zz = new Float64Array(n);
    this.zh = new Float64Array(n);
    this.gone = new Int32Array(n);
    this.org = new Int32Array(n);
    this.tau = new Float64Array(n);
    this.dm = new Float64Array(n * n);
    this.pos = new Int32Array(n);
    this.roots = new Int32Array(n);
    this.top = new Int32Array(n);
    this.bottom = new Int32Array(n);
    this.ld = new Float64Array(LEAF);
    this.le = new Float64Array(LEAF);
    this.lz = new Float64Array(LEAF * LEAF);
    this.lorder = new Int32Array(LEAF);
    this.cs = new Float64Array(LEAF);
    this.sn = new Float64Array(LEAF);
  }

  /**
   * The tridiagonal with diagonal `d[0..n)` and off-diagonal `e[0..n-1)`: on return `d` holds the
   * eigenvalues ascending and column j of `z` (n x n, row-major) the eigenvector of d[j]; `e` is
   * destroyed. Returns false if a QL block or a secular equation failed to converge.
   */
  solve(d: Float64Array, e: Float64Array, z: Float64Array, columns: ((values: Float64Array) => number) | null = null): boolean {
    this.columns = columns;
    try {
      return this.block(d, e, z, 0, this.n);
    } finally {
      this.columns = null;
    }
  }

  /**
   * With `solve`'s `columns`: asked, once the last merge has placed all the eigenvalues in d (in
   * the output order), how many leading columns of z the caller needs; only those are formed
   * (the last merge's product is most of the work). Null: all.
   */
  private columns: ((values: Float64Array) => number) | null = null;

  private block(d: Float64Array, e: Float64Array, z: Float64Array, o: number, s: number): boolean {
    if (s <= LEAF) return this.leaf(d, e, z, o, s);
    const m = s >> 1;
    // T = diag(T1 - |b| e_last e_last^T, T2 - |b| e_1 e_1^T) + |b| w w^T, w = (e_last, sign(b) e_1).
    const b = e[o + m - 1];
    d[o + m - 1] -= Math.abs(b);
    d[o + m] -= Math.abs(b);
    if (!this.block(d, e, z, o, m) || !this.block(d, e, z, o + m, s - m)) return false;
    return this.merge(d, z, o, s, m, b);
  }

  private leaf(d: Float64Array, e: Float64Array, z: Float64Array, o: number, s: number): boolean {
    const n = this.n;
    const ld = this.ld;
    const le = this.le;
    const lz = this.lz;
    for (let i = 0; i < s; i++) {
      ld[i] = d[o + i];
      le[i] = e[o + i];
    }
    lz.fill(0, 0, s * s);
    for (let i = 0; i < s; i++) lz[i * s + i] = 1;
    if (!tridiagonalQL(s, ld, le, lz, this.cs, this.sn)) return false;
    const order = ascendingOrder(ld, s, this.lorder);
    for (let c = 0; c < s; c++) d[o + c] = ld[order[c]];
    for (let r = 0; r < s; r++) {
      const row = (o + r) * n + o;
      for (let c = 0; c < s; c++) z[row + c] = lz[r * s + order[c]];
    }
    return true;
  }

  /**
   * Merge of two solved halves (rows/columns o..o+m and o+m..o+s of z, eigenvalues ascending in
   * each half of d) coupled by the off-diagonal b. False if a secular equation did not converge.
   */
  private merge(d: Float64Array, z: Float64Array, o: number, s: number, m: number, b: number): boolean {
    // A merge of a large matrix costs s^3: stop between merges when asked.
    if (s >= 256) checkInterrupt();
    const n = this.n;
    const ds = this.ds;
    const zs = this.zs;
    const perm = this.perm;
    const kind = this.kind;
    const qc = this.qc;
    // z = (last row of Q1, sign(b) first row of Q2) / sqrt 2, rho = 2|b|: unit z.
    const rho = 2 * Math.abs(b);
    const r2 = Math.SQRT1_2;
    const lower = b >= 0 ? r2 : -r2;
    // Sort the poles: merge the two ascending halves.
    let p1 = 0;
    let p2 = m;
    for (let p = 0; p < s; p++) {
      const c = p2 >= s || (p1 < m && d[o + p1] <= d[o + p2]) ? p1++ : p2++;
      perm[p] = c;
      ds[p] = d[o + c];
      if (c < m) {
        zs[p] = r2 * z[(o + m - 1) * n + o + c];
        kind[p] = 1;
      } else {
        zs[p] = lower * z[(o + m) * n + o + c];
        kind[p] = 3;
      }
    }
    for (let r = 0; r < s; r++) {
      const row = (o + r) * n + o;
      const out = r * s;
      const mine = r < m ? 1 : 3;
      for (let p = 0; p < s; p++) qc[out + p] = kind[p] === mine ? z[row + perm[p]] : 0;
    }
    let dmax = 0;
    for (let p = 0; p < s; p++) dmax = Math.max(dmax, Math.abs(ds[p]));
    const tol = 8 * EPS * Math.max(dmax, rho);
    // Deflation: a tiny z_p leaves (d_p, column p) an eigenpair; two close poles are rotated so that
    // one z vanishes (Dongarra & Sorensen; LAPACK dlaed2).
    const keep = this.keep;
    const gone = this.gone;
    let k = 0;
    let ngone = 0;
    let pj = -1;
    for (let p = 0; p < s; p++) {
      if (rho * Math.abs(zs[p]) <= tol) {
        ngone = this.deflate(p, ngone);
        continue;
      }
      if (pj < 0) {
        pj = p;
        continue;
      }
      const tau = Math.hypot(zs[p], zs[pj]);
      const c = zs[p] / tau;
      const sn = -zs[pj] / tau;
      if (Math.abs((ds[p] - ds[pj]) * c * sn) <= tol) {
        zs[p] = tau;
        zs[pj] = 0;
        for (let r = 0; r < s; r++) {
          const x = qc[r * s + pj];
          const y = qc[r * s + p];
          qc[r * s + pj] = c * x + sn * y;
          qc[r * s + p] = c * y - sn * x;
        }
        const t = ds[pj] * c * c + ds[p] * sn * sn;
        ds[p] = ds[pj] * sn * sn + ds[p] * c * c;
        ds[pj] = t;
        if (kind[pj] !== kind[p]) kind[p] = 2;
        ngone = this.deflate(pj, ngone);
      } else {
        keep[k++] = pj;
      }
      pj = p;
    }
    if (pj >= 0) keep[k++] = pj;

    const dd = this.dd;
    const zz = this.zz;
    for (let j = 0; j < k; j++) {
      dd[j] = ds[keep[j]];
      zz[j] = zs[keep[j]];
    }
    if (!this.secular(k, rho)) return false;
    // Output order: merge the ascending roots with the ascending deflated values.
    const pos = this.pos;
    const org = this.org;
    const tau = this.tau;
    let gi = 0;
    let out = 0;
    for (let i = 0; i < k; i++) {
      const lambda = dd[org[i]] + tau[i];
      while (gi < ngone && ds[gone[gi]] < lambda) this.placeDeflated(d, z, o, s, gone[gi++], out++);
      d[o + out] = lambda;
      pos[i] = out++;
    }
    while (gi < ngone) this.placeDeflated(d, z, o, s, gone[gi++], out++);
    // The roots whose vectors are formed: all, or at the last merge those the caller needs.
    const wanted = this.columns !== null && s === this.n ? this.columns(d) : s;
    const roots = this.roots;
    let count = 0;
    for (let i = 0; i < k; i++) if (pos[i] < wanted) roots[count++] = i;
    if (count > 0) this.rootVectors(z, o, s, m, k, count);
    return true;
  }

  /** Adds pole p to the deflated ones (kept sorted by value); returns their new count. */
  private deflate(p: number, count: number): number {
    const ds = this.ds;
    const gone = this.gone;
    let j = count;
    while (j > 0 && ds[gone[j - 1]] > ds[p]) {
      gone[j] = gone[j - 1];
      j--;
    }
    gone[j] = p;
    return count + 1;
  }

  private placeDeflated(d: Float64Array, z: Float64Array, o: number, s: number, p: number, out: number): void {
    const n = this.n;
    const qc = this.qc;
    d[o + out] = this.ds[p];
    for (let r = 0; r < s; r++) z[(o + r) * n + o + out] = qc[r * s + p];
  }

  /**
   * Roots of 1 + rho sum_j zz_j^2 / (dd_j - x) (dd ascending, zz nonzero): origins, offsets and dm.
   * False if a root was neither found to working accuracy nor pinned by its bracket.
   */
  private secular(k: number, rho: number): boolean {
    const dd = this.dd;
    const zz = this.zz;
    const org = this.org;
    const tau = this.tau;
    const dm = this.dm;
    const rinv = 1 / rho;
    if (k === 1) {
      org[0] = 0;
      tau[0] = rho * zz[0] * zz[0];
      dm[0] = -tau[0];
      return true;
    }
    let zsq = 0;
    for (let j = 0; j < k; j++) zsq += zz[j] * zz[j];
    for (let i = 0; i < k; i++) {
      const last = i === k - 1;
      // The root of interval i, and the pole it is nearer (the origin of its offset).
      let o: number;
      let lo: number;
      let hi: number;
      let x: number;
      if (last) {
        o = i;
        lo = 0;
        hi = rho * zsq;
        x = 0.5 * hi;
      } else {
        const half = 0.5 * (dd[i + 1] - dd[i]);
        let f = rinv;
        for (let j = 0; j < k; j++) f += (zz[j] * zz[j]) / (dd[j] - dd[i] - half);
        if (f >= 0) {
          o = i;
          lo = 0;
          hi = half;
          x = half;
        } else {
          o = i + 1;
          lo = dd[i] - dd[i + 1] + half;
          hi = 0;
          x = lo;
        }
      }
      const base = dd[o];
      // Poles a and b of the two-pole model: i and i + 1, or, for the last root, k - 2 and k - 1.
      const ia = last ? k - 2 : i;
      const ib = ia + 1;
      let found = false;
      for (let step = 0; step < MAX_SECULAR_STEPS && !found; step++) {
        let psi = 0, dpsi = 0, phi = 0, dphi = 0;
        for (let j = 0; j <= ia; j++) {
          const t = zz[j] / (dd[j] - base - x);
          psi += zz[j] * t;
          dpsi += t * t;
        }
        for (let j = ib; j < k; j++) {
          const t = zz[j] / (dd[j] - base - x);
          phi += zz[j] * t;
          dphi += t * t;
        }
        const w = rinv + psi + phi;
        const dw = dpsi + dphi;
        const err = 8 * (Math.abs(phi) + Math.abs(psi)) + 2 * rinv + Math.abs(x) * dw;
        if (Math.abs(w) <= EPS * err) {
          found = true;
          break;
        }
        if (w < 0) lo = x;
        else hi = x;
        const da = dd[ia] - base - x;
        const db = dd[ib] - base - x;
        let c = w - da * dpsi - db * dphi;
        const a = (da + db) * w - da * db * dw;
        const bb = da * db * w;
        let eta: number;
        if (last) {
          c = Math.abs(c);
          if (c === 0) eta = hi - x;
          else if (a >= 0) eta = (a + Math.sqrt(Math.abs(a * a - 4 * bb * c))) / (2 * c);
          else eta = (2 * bb) / (a - Math.sqrt(Math.abs(a * a - 4 * bb * c)));
        } else if (c === 0) {
          eta = bb / a;
        } else if (a <= 0) {
          eta = (a - Math.sqrt(Math.abs(a * a - 4 * bb * c))) / (2 * c);
        } else {
          eta = (2 * bb) / (a + Math.sqrt(Math.abs(a * a - 4 * bb * c)));
        }
        // w is increasing in x: a step against -w is wrong; take Newton's, and bisect if outside.
        if (w * eta >= 0 || !Number.isFinite(eta)) eta = -w / dw;
        let next = x + eta;
        if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
        found = next === x || hi - lo <= 2 * EPS * Math.max(Math.abs(lo), Math.abs(hi));
        x = next;
      }
      if (!found) return false;
      org[i] = o;
      tau[i] = x;
      const row = i * k;
      for (let j = 0; j < k; j++) dm[row + j] = dd[j] - base - x;
    }
    return true;
  }

  /**
   * The merge's eigenvectors from z-hat (Gu & Eisenstat: the z for which the computed roots are
   * exact), times the halves' eigenvectors; results go to the columns pos[i] of the block of z.
   */
  private rootVectors(z: Float64Array, o: number, s: number, m: number, k: number, count: number): void {
    const dd = this.dd;
    const zz = this.zz;
    const zh = this.zh;
    const dm = this.dm;
    // z-hat_j^2 = -(d_j - lambda_j) prod_{i != j} (d_j - lambda_i) / (d_j - d_i), as ratios (no
    // over- or underflow), row by row of dm.
    for (let j = 0; j < k; j++) zh[j] = dm[j * k + j];
    for (let i = 0; i < k; i++) {
      const row = i * k;
      const di = dd[i];
      for (let j = 0; j < i; j++) zh[j] *= dm[row + j] / (dd[j] - di);
      for (let j = i + 1; j < k; j++) zh[j] *= dm[row + j] / (dd[j] - di);
    }
    for (let j = 0; j < k; j++) {
      const a = Math.sqrt(Math.max(0, -zh[j]));
      zh[j] = zz[j] >= 0 ? a : -a;
    }
    // Row i of dm becomes the merge's eigenvector of root i: z-hat_j / (d_j - lambda_i), normalised.
    for (let c = 0; c < count; c++) {
      const row = this.roots[c] * k;
      let norm = 0;
      for (let j = 0; j < k; j++) {
        const u = zh[j] / dm[row + j];
        dm[row + j] = u;
        norm += u * u;
      }
      const inv = 1 / Math.sqrt(norm);
      for (let j = 0; j < k; j++) dm[row + j] *= inv;
    }
    // A kept column lives in the top rows, the bottom rows, or both: two products, each over the
    // columns present in its rows.
    const keep = this.keep;
    const kind = this.kind;
    const top = this.top;
    const bottom = this.bottom;
    let nt = 0;
    let nb = 0;
    for (let j = 0; j < k; j++) {
      const t = kind[keep[j]];
      if (t !== 3) top[nt++] = j;
      if (t !== 1) bottom[nb++] = j;
    }
    this.product(z, o, s, 0, m, k, count, top, nt);
    this.product(z, o, s, m, s, k, count, bottom, nb);
  }

  /**
   * z[o + r][o + pos[i]] = sum over j in list of qc[r][keep[j]] dm[i][j] for rows r0..r1 and the
   * roots i in roots[0..count): the operands gathered into the SIMD memory, multiplied there, the
   * result scattered to z.
   */
  private product(z: Float64Array, o: number, s: number, r0: number, r1: number, k: number, count: number, list: Int32Array, len: number): void {
    const n = this.n;
    const qc = this.qc;
    const dm = this.dm;
    const keep = this.keep;
    const pos = this.pos;
    const pa = this.pa;
    const pb = this.pb;
    const pc = this.pc;
    const roots = this.roots;
    const rows = r1 - r0;
    const cols = (count + 3) & ~3;
    for (let r = 0; r < rows; r++) {
      const from = (r0 + r) * s;
      for (let p = 0; p < len; p++) pa[r * len + p] = qc[from + keep[list[p]]];
    }
    for (let p = 0; p < len; p++) {
      const j = list[p];
      const to = p * cols;
      for (let c = 0; c < count; c++) pb[to + c] = dm[roots[c] * k + j];
      for (let c = count; c < cols; c++) pb[to + c] = 0;
    }
    this.simd.realProduct(this.at, this.at + 8 * pa.length, this.at + 16 * pa.length, rows, len, cols);
    for (let r = 0; r < rows; r++) {
      const out = (o + r0 + r) * n + o;
      const from = r * cols;
      for (let c = 0; c < count; c++) z[out + pos[roots[c]]] = pc[from + c];
    }
  }
}
