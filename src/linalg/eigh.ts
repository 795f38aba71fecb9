/**
 * Hermitian eigensolver: eigenvalues ascending, eigenvectors as the columns of V.
 *
 * n = 1 and n = 2 in closed form. Larger n:
 * 1. Householder reduction to tridiagonal form; its complex Hermitian matrix-vector product and
 *    rank-2 update run as WebAssembly SIMD kernels (`simd.ts`, about 2.5x scalar JavaScript).
 * 2. A diagonal phase transform makes the off-diagonal real.
 * 3. The real tridiagonal's eigenvectors: implicit QL with Wilkinson shifts (rotations accumulated
 *    in a real matrix) up to n = 24, divide and conquer above (`divide-conquer.ts`; measured
 *    1.3x faster than QL at n = 64, 6x at n = 256).
 * 4. The phases, then the reflectors, applied to the eigenvectors, two reflectors per pass (SIMD).
 * Eigenvalues only: the root-free QR sweep on the squared off-diagonal instead of step 3-4.
 * Normwise backward stable: residuals and orthonormality are of order eps ||H||, also on clustered
 * and exactly degenerate spectra. Inputs of any magnitude are scaled by a power of two (exact).
 */
import { checkInterrupt } from '../interrupt.js';
import type { CMatrix } from './cmatrix.js';
import { LEAF, TridiagonalDivideConquer } from './divide-conquer.js';
import { simdWorkspace, type SimdKernels } from './simd.js';
import { ascendingOrder, tridiagonalEigenvalues, tridiagonalQL } from './tridiagonal.js';

/** Inside [SAFE_MIN, SAFE_MAX] no square or sum of squares over- or underflows harmfully. */
const SAFE_MIN = 2 ** -300;
const SAFE_MAX = 2 ** 300;
/**
 * Eigenvectors per block in the back-transformation (the block stays in cache across reflectors;
 * 32 beats 16 by 5-8 % at n = 256 to 1800, and 48 or 64 gain nothing more, measured).
 */
const BACK_BLOCK = 32;

/** A power of two near `big` (exact to scale by); clamped so that its reciprocal is finite. */
/** Columns between interrupt checks (minus one, a mask): small matrices never check. */
const INTERRUPT_STRIDE = 63;

function powerOfTwoNear(big: number): number {
  const k = Math.max(-1000, Math.min(1000, Math.round(Math.log2(big))));
  return 2 ** k;
}

function checkArray(name: string, x: ArrayLike<number>, offset: number, needed: number): void {
  if (!Number.isInteger(offset) || offset < 0) {
    throw new RangeError(`${name} offset must be a nonnegative integer. Value: ${offset}`);
  }
  if (x.length < offset + needed) {
    throw new RangeError(`${name} must hold ${needed} entries from offset ${offset}. Value: length ${x.length}`);
  }
}

export class HermitianEigensolver {
  readonly n: number;
  /**
   * Working copy of the upper triangle; after the reduction, row k holds reflector k. It and y are
   * views on the SIMD kernels' memory (shared with other users, ours during a call).
   */
  private readonly a: Float64Array;
  /** Reflector k is I - beta[k] u u^dagger (beta 0: no reflector). */
  private readonly beta: Float64Array;
  /** Complex subdiagonal of the tridiagonal form, and the diagonal phases D. */
  private readonly off: Float64Array;
  private readonly phase: Float64Array;
  private readonly d: Float64Array;
  private readonly e: Float64Array;
  /** Real eigenvectors of the tridiagonal form, one per column, and the QL rotations. */
  private readonly z: Float64Array;
  private readonly cs: Float64Array;
  private readonly sn: Float64Array;
  /** The eigenvectors (one per row) during the back-transformation. */
  private readonly y: Float64Array;
  /**
   * The WebAssembly SIMD kernels, and the byte offsets in their memory of y and of p, the
   * reduction's two complex scratch vectors (a is at 0).
   */
  private readonly simd: SimdKernels;
  private readonly yAt: number;
  private readonly pAt: number;
  /** The reduction's two complex scratch vectors (at pAt). */
  private readonly p: Float64Array;
  private readonly order: Int32Array;
  private readonly divide: TridiagonalDivideConquer | null;

  constructor(n: number) {
    if (!Number.isInteger(n) || n < 1) throw new RangeError(`eigensolver size must be a positive integer. Value: ${n}`);
    this.n = n;
    // a, y and p live in the memory of the SIMD kernels: a at byte 0, y after it, then p.
    this.yAt = 16 * n * n;
    this.pAt = 32 * n * n;
    // Our part of the SIMD memory, then the divide and conquer's (one instance for both).
    const divideAt = this.pAt + 32 * n;
    const { kernels, memory } = simdWorkspace(divideAt + (n > LEAF ? TridiagonalDivideConquer.simdBytes(n) : 0));
    this.simd = kernels;
    this.a = new Float64Array(memory, 0, 2 * n * n);
    this.beta = new Float64Array(n);
    this.off = new Float64Array(2 * n);
    this.phase = new Float64Array(2 * n);
    this.d = new Float64Array(n);
    this.e = new Float64Array(n);
    this.z = new Float64Array(n * n);
    this.cs = new Float64Array(n);
    this.sn = new Float64Array(n);
    this.y = new Float64Array(memory, this.yAt, 2 * n * n);
    this.p = new Float64Array(memory, this.pAt, 4 * n);
    this.order = new Int32Array(n);
    this.divide = n > LEAF ? new TridiagonalDivideConquer(n, kernels, memory, divideAt) : null;
  }

  /**
   * Eigenvalues of the Hermitian matrix `h` into `w` (ascending) and, when `vecs` is given, the
   * orthonormal eigenvectors into its columns. Only the upper triangle of `h` is read (the
   * imaginary part of the diagonal is ignored); `h` is not modified, and `w` or `vecs` may be `h`
   * itself. Without `vecs` a faster iteration runs: its eigenvalues agree with those of a call
   * with `vecs` to O(eps ||H||), not bit for bit. Returns `w`.
   */
  solve(h: CMatrix, w: Float64Array, vecs?: CMatrix): Float64Array {
    return this.solveAt(h, 0, w, 0, vecs ?? null, 0);
  }

  /**
   * Eigenvalues of `h` into `w` (ascending) and the eigenvectors of the `count(w)` lowest only,
   * returned as the rows of a new count x n matrix (row j = eigenvector j): the
   * back-transformation, a third of the solve at n ~ 2000, then runs on those vectors alone (the
   * occupied states of a sample are half of them). The vectors are those `solve` gives.
   */
  solveLowest(h: CMatrix, w: Float64Array, count: (values: Float64Array) => number): CMatrix {
    const n = this.n;
    checkArray('h', h, 0, 2 * n * n);
    checkArray('w', w, 0, n);
    if (n <= 2) {
      const vecs = new Float64Array(2 * n * n);
      this.solveAt(h, 0, w, 0, vecs, 0);
      const m = checkCount(count(w.subarray(0, n)), n);
      const rows = new Float64Array(2 * m * n);
      for (let j = 0; j < m; j++) {
        for (let i = 0; i < n; i++) {
          rows[2 * (j * n + i)] = vecs[2 * (i * n + j)];
          rows[2 * (j * n + i) + 1] = vecs[2 * (i * n + j) + 1];
        }
      }
      return rows;
    }
    let rows = new Float64Array(0);
    this.solveGeneral(h, 0, w, 0, null, 0, (values) => {
      rows = new Float64Array(2 * checkCount(count(values), n) * n);
      return rows;
    });
    return rows;
  }

  /**
   * `solve` on matrices stored at offsets (in doubles) inside larger arrays, e.g. one H(k) of a
   * batch: reads `h[hOffset .. hOffset + 2n^2)`, writes `w[wOffset .. wOffset + n)` and, unless
   * `vecs` is null, `vecs[vecsOffset .. vecsOffset + 2n^2)`. Returns `w`.
   */
  solveAt(h: CMatrix, hOffset: number, w: Float64Array, wOffset: number, vecs: CMatrix | null, vecsOffset = 0): Float64Array {
    const n = this.n;
    checkArray('h', h, hOffset, 2 * n * n);
    checkArray('w', w, wOffset, n);
    if (vecs !== null) checkArray('vecs', vecs, vecsOffset, 2 * n * n);
    if (n === 1) this.solve1(h, hOffset, w, wOffset, vecs, vecsOffset);
    else if (n === 2) this.solve2(h, hOffset, w, wOffset, vecs, vecsOffset);
    else this.solveGeneral(h, hOffset, w, wOffset, vecs, vecsOffset);
    return w;
  }

  private solve1(h: CMatrix, ho: number, w: Float64Array, wo: number, vecs: CMatrix | null, vo: number): void {
    const x = h[ho];
    if (!Number.isFinite(x)) throw nonFinite(1, h, ho);
    w[wo] = x;
    if (vecs !== null) {
      vecs[vo] = 1;
      vecs[vo + 1] = 0;
    }
  }

  /**
   * [[a, b], [conj b, c]] = D R D^dagger with D = diag(1, conj(b)/|b|) and R = [[a, |b|], [|b|, c]]
   * real; R's eigenvalues as in LAPACK's dlaev2 (the smaller one from the determinant, no
   * cancellation), its eigenvectors from the stable tangent of the rotation angle.
   */
  private solve2(h: CMatrix, ho: number, w: Float64Array, wo: number, vecs: CMatrix | null, vo: number): void {
    let a = h[ho];
    let br = h[ho + 2];
    let bi = h[ho + 3];
    let c = h[ho + 6];
    if ((a * 0 + br * 0 + bi * 0 + c * 0) !== 0) throw nonFinite(2, h, ho);
    const big = Math.max(Math.abs(a), Math.abs(c), Math.abs(br), Math.abs(bi));
    let scale = 1;
    if (big !== 0 && (big < SAFE_MIN || big > SAFE_MAX)) {
      scale = powerOfTwoNear(big);
      const inv = 1 / scale;
      a *= inv;
      br *= inv;
      bi *= inv;
      c *= inv;
    }
    const beta = Math.sqrt(br * br + bi * bi);
    const delta = a - c;
    const sum = a + c;
    const rt = Math.sqrt(delta * delta + 4 * beta * beta);
    const acmx = Math.abs(a) > Math.abs(c) ? a : c;
    const acmn = Math.abs(a) > Math.abs(c) ? c : a;
    let lo: number;
    let hi: number;
    if (sum > 0) {
      hi = 0.5 * (sum + rt);
      lo = (acmx / hi) * acmn - (beta / hi) * beta;
    } else if (sum < 0) {
      lo = 0.5 * (sum - rt);
      hi = (acmx / lo) * acmn - (beta / lo) * beta;
    } else {
      hi = 0.5 * rt;
      lo = 0 - hi;
    }
    w[wo] = lo * scale;
    w[wo + 1] = hi * scale;
    if (vecs === null) return;
    const t = rt === 0 ? 0 : (2 * beta) / (Math.abs(delta) + rt);
    const cs = 1 / Math.sqrt(1 + t * t);
    const sn = t * cs;
    // (hi0, hi1) belongs to the larger eigenvalue, (lo0, lo1) is orthogonal to it.
    let hi0 = cs, hi1 = sn, lo0 = -sn, lo1 = cs;
    if (delta < 0) {
      hi0 = sn;
      hi1 = cs;
      lo0 = cs;
      lo1 = -sn;
    }
    const fr = beta === 0 ? 1 : br / beta;
    const fi = beta === 0 ? 0 : -bi / beta;
    vecs[vo] = lo0;
    vecs[vo + 1] = 0;
    vecs[vo + 2] = hi0;
    vecs[vo + 3] = 0;
    vecs[vo + 4] = lo1 * fr;
    vecs[vo + 5] = lo1 * fi;
    vecs[vo + 6] = hi1 * fr;
    vecs[vo + 7] = hi1 * fi;
  }

  /** With `lowest`, the vectors it asks for (once the values are known) go to its rows instead of vecs. */
  private solveGeneral(h: CMatrix, ho: number, w: Float64Array, wo: number, vecs: CMatrix | null, vo: number, lowest: Lowest | null = null): void {
    const withVectors = vecs !== null || lowest !== null;
    const n = this.n;
    const a = this.a;
    // Copy the upper triangle; track the largest entry and any non-finite one (x*0 is NaN only then).
    let big = 0;
    let bad = 0;
    for (let i = 0; i < n; i++) {
      const di = 2 * (i * n + i);
      const x = h[ho + di];
      a[di] = x;
      a[di + 1] = 0;
      bad += x * 0;
      const ax = Math.abs(x);
      if (ax > big) big = ax;
      const end = 2 * (i * n + n);
      for (let j = di + 2; j < end; j++) {
        const y = h[ho + j];
        a[j] = y;
        bad += y * 0;
        const ay = Math.abs(y);
        if (ay > big) big = ay;
      }
    }
    if (bad !== 0) throw nonFinite(n, h, ho);
    if (big === 0) {
      for (let i = 0; i < n; i++) w[wo + i] = 0;
      if (vecs !== null) {
        for (let j = 0; j < 2 * n * n; j++) vecs[vo + j] = 0;
        for (let i = 0; i < n; i++) vecs[vo + 2 * (i * n + i)] = 1;
      }
      if (lowest !== null) {
        const rows = lowest(w.subarray(wo, wo + n));
        for (let j = 0; j < rows.length / (2 * n); j++) rows[2 * (j * n + j)] = 1;
      }
      return;
    }
    let scale = 1;
    if (big < SAFE_MIN || big > SAFE_MAX) {
      scale = powerOfTwoNear(big);
      const inv = 1 / scale;
      for (let i = 0; i < n; i++) {
        for (let j = 2 * (i * n + i); j < 2 * (i * n + n); j++) a[j] *= inv;
      }
    }
    this.reduce(withVectors);
    const d = this.d;
    const e = this.e;
    let converged: boolean;
    // For `lowest`: its vectors' places, asked for as soon as the eigenvalues are known (inside
    // the divide and conquer, which then forms only the columns of z they need).
    let rows: Float64Array | null = null;
    const ask = (values: Float64Array): Float64Array => {
      const order = ascendingOrder(values, n, this.order);
      for (let i = 0; i < n; i++) w[wo + i] = values[order[i]] * scale;
      rows ??= lowest!(w.subarray(wo, wo + n));
      return rows;
    };
    if (!withVectors) {
      converged = tridiagonalEigenvalues(n, d, e);
    } else if (this.divide !== null) {
      converged = this.divide.solve(d, e, this.z, lowest === null ? null : (values) => {
        // The leading columns of z that hold the vectors asked for (order: values ascending).
        const count = ask(values).length / (2 * n);
        let needed = 0;
        for (let c = 0; c < count; c++) needed = Math.max(needed, this.order[c] + 1);
        return needed;
      });
    } else {
      const z = this.z;
      z.fill(0);
      for (let i = 0; i < n; i++) z[i * n + i] = 1;
      converged = tridiagonalQL(n, d, e, z, this.cs, this.sn);
    }
    if (!converged) {
      throw new RangeError(`eigensolver: the tridiagonal iteration did not converge (n = ${n}); is h finite and Hermitian?`);
    }
    const order = ascendingOrder(d, n, this.order);
    for (let i = 0; i < n; i++) w[wo + i] = d[order[i]] * scale;
    if (vecs !== null) {
      this.backTransform(n);
      this.transposeInto(vecs, vo, n);
    } else if (lowest !== null) {
      const out = ask(d);
      const count = out.length / (2 * n);
      this.backTransform(count);
      out.set(this.y.subarray(0, 2 * count * n));
    }
  }

  /**
   * Reflector k from row k of `a` (its part right of the diagonal, already updated): fills
   * beta[k] (0: none needed) and off[k], and leaves u in the row from column k + 1.
   */
  private reflector(k: number): void {
    const n = this.n;
    const a = this.a;
    const off = this.off;
    const base = 2 * k * n;
    // x = column k below the diagonal = conj(row k right of the diagonal).
    let tail = 0;
    for (let j = base + 2 * (k + 2); j < base + 2 * n; j++) tail += a[j] * a[j];
    const x0r = a[base + 2 * (k + 1)];
    const x0i = -a[base + 2 * (k + 1) + 1];
    if (tail === 0) {
      this.beta[k] = 0;
      off[2 * k] = x0r;
      off[2 * k + 1] = x0i;
      return;
    }
    const ax0 = Math.sqrt(x0r * x0r + x0i * x0i);
    const sigma = Math.sqrt(ax0 * ax0 + tail);
    const cr = ax0 === 0 ? 1 : x0r / ax0;
    const ci = ax0 === 0 ? 0 : x0i / ax0;
    // P x = alpha e1 with alpha = -e^{i arg x0} sigma, u = x - alpha e1, P = I - beta u u^dagger.
    off[2 * k] = -cr * sigma;
    off[2 * k + 1] = -ci * sigma;
    this.beta[k] = 1 / (sigma * (sigma + ax0));
    a[base + 2 * (k + 1)] = cr * (ax0 + sigma);
    a[base + 2 * (k + 1) + 1] = ci * (ax0 + sigma);
    for (let j = base + 2 * (k + 2) + 1; j < base + 2 * n; j += 2) a[j] = -a[j];
  }

  /**
   * With p = B u (m entries at byte pAt): q = beta p - (beta/2) Re(u^dagger beta p) u in its place
   * (u^dagger B u is real), as the kernel before rank2Rows did it, lane for lane.
   */
  private prepareQ(uAt: number, pAt: number, m: number, beta: number): void {
    const a = this.a, p = this.p;
    const u0 = uAt / 8, p0 = (pAt - this.pAt) / 8;
    let s0 = 0, s1 = 0;
    for (let j = 0; j < 2 * m; j += 2) {
      const qr = p[p0 + j] * beta, qi = p[p0 + j + 1] * beta;
      p[p0 + j] = qr;
      p[p0 + j + 1] = qi;
      s0 = a[u0 + j] * qr + s0;
      s1 = a[u0 + j + 1] * qi + s1;
    }
    const c = (s0 + s1) * (beta * 0.5);
    for (let j = 0; j < 2 * m; j += 2) {
      p[p0 + j] -= a[u0 + j] * c;
      p[p0 + j + 1] -= a[u0 + j + 1] * c;
    }
  }

  /**
   * Householder reduction of the Hermitian matrix in `a` (upper triangle) to tridiagonal form:
   * fills d (diagonal) and leaves the reflectors in the rows of `a`. With `forVectors`, e gets
   * |subdiagonal| and `phase` the D of T = D T_real D^dagger; without, e gets |subdiagonal|^2.
   */
  private reduce(forVectors: boolean): void {
    const n = this.n;
    const off = this.off;
    const betas = this.beta;
    const stride = 16 * n;
    // p: B u for the current reflector, then q in its place; pNext: B' w for the next one, formed
    // while the current update passes over the rows (rank2Times), when there is a next one.
    let pAt = this.pAt, pNext = this.pAt + stride;
    let ready = false;
    let built = false;
    for (let k = 0; k < n - 2; k++) {
      // One solve of a thousand orbitals takes seconds: stop between columns when asked.
      if ((k & INTERRUPT_STRIDE) === INTERRUPT_STRIDE) checkInterrupt();
      if (!built) this.reflector(k);
      built = false;
      const beta = betas[k];
      if (beta === 0) {
        ready = false;
        continue;
      }
      const block = 16 * ((k + 1) * n + k + 1);
      const u = 16 * (k * n + k + 1);
      const m = n - k - 1;
      const p = pAt + 16 * (k + 1);
      if (!ready) this.simd.hermitianTimes(block, stride, u, p, m);
      this.prepareQ(u, p, m, beta);
      // Row k+1 first: the next reflector is made from it; then the other rows, with the next
      // reflector's product in the same pass when there is one (B <- P B P, SIMD kernels).
      this.simd.rank2Update(block, stride, u, p, 0, 1, m);
      if (k + 1 < n - 2) {
        this.reflector(k + 1);
        built = true;
      }
      ready = built && betas[k + 1] !== 0;
      if (ready) {
        this.simd.rank2Times(block, stride, u, p, 1, m, m, block, pNext + 16 * (k + 1));
        [pAt, pNext] = [pNext, pAt];
      } else {
        this.simd.rank2Update(block, stride, u, p, 1, m, m);
      }
    }
    const a = this.a;
    // The last subdiagonal entry needs no reflector.
    const last = 2 * ((n - 2) * n + n - 1);
    off[2 * (n - 2)] = a[last];
    off[2 * (n - 2) + 1] = -a[last + 1];
    // Real tridiagonal T_real = D^dagger T D: D_{i+1} = D_i alpha_i / |alpha_i|.
    const d = this.d;
    const e = this.e;
    const phase = this.phase;
    phase[0] = 1;
    phase[1] = 0;
    for (let i = 0; i < n; i++) d[i] = a[2 * (i * n + i)];
    if (!forVectors) {
      for (let i = 0; i < n - 1; i++) e[i] = off[2 * i] * off[2 * i] + off[2 * i + 1] * off[2 * i + 1];
      return;
    }
    for (let i = 0; i < n - 1; i++) {
      const xr = off[2 * i];
      const xi = off[2 * i + 1];
      const m = Math.sqrt(xr * xr + xi * xi);
      e[i] = m;
      const pr = phase[2 * i];
      const pi = phase[2 * i + 1];
      if (m === 0) {
        phase[2 * i + 2] = pr;
        phase[2 * i + 3] = pi;
      } else {
        const sr = xr / m;
        const si = xi / m;
        phase[2 * i + 2] = pr * sr - pi * si;
        phase[2 * i + 3] = pr * si + pi * sr;
      }
    }
  }

  /**
   * Eigenvector j of H = Q D z_j with Q = P_0 P_1 ... P_{n-3}, z_j column j of z. The vectors sit in
   * the rows of `y` while the reflectors are applied (blocks of BACK_BLOCK vectors share each
   * reflector pair while it is in cache), then go to the columns of `vecs` in order.
   */
  private backTransform(count: number): void {
    const n = this.n;
    const z = this.z;
    const y = this.y;
    const phase = this.phase;
    const order = this.order;
    for (let col = 0; col < count; col++) {
      const src = order[col];
      const row = 2 * col * n;
      for (let i = 0; i < n; i++) {
        const zi = z[i * n + src];
        y[row + 2 * i] = phase[2 * i] * zi;
        y[row + 2 * i + 1] = phase[2 * i + 1] * zi;
      }
    }
    // Reflector k is row k of a from column k + 1 on; with the diagonal zeroed, row k from column
    // k is the same vector with a leading zero, aligned with reflector k - 1.
    const a = this.a;
    const betas = this.beta;
    for (let i = 0; i < n; i++) a[2 * (i * n + i)] = a[2 * (i * n + i) + 1] = 0;
    for (let c0 = 0; c0 < count; c0 += BACK_BLOCK) {
      if (n > INTERRUPT_STRIDE) checkInterrupt();
      const block = Math.min(count, c0 + BACK_BLOCK) - c0;
      let k = n - 3;
      for (; k >= 1; k -= 2) {
        const u = 16 * (k * n + k);
        this.simd.reflectPair(u, u - 16 * n, this.yAt + 16 * (c0 * n + k), n - k, block, 16 * n, betas[k], betas[k - 1]);
      }
      if (k === 0) this.simd.reflectPair(16, 16, this.yAt + 16 * (c0 * n + 1), n - 1, block, 16 * n, betas[0], 0);
    }
  }

  /** The vectors in the rows of y into the columns of vecs. */
  private transposeInto(vecs: CMatrix, vo: number, n: number): void {
    const y = this.y;
    for (let col = 0; col < n; col++) {
      const row = 2 * col * n;
      for (let i = 0; i < n; i++) {
        vecs[vo + 2 * (i * n + col)] = y[row + 2 * i];
        vecs[vo + 2 * (i * n + col) + 1] = y[row + 2 * i + 1];
      }
    }
  }
}

/** Where `solveLowest` wants its vectors once the eigenvalues are known (count x n, zeroed). */
type Lowest = (values: Float64Array) => Float64Array;

function checkCount(m: number, n: number): number {
  if (!Number.isInteger(m) || m < 0 || m > n) throw new RangeError(`eigensolver: the count of vectors must be an integer from 0 to ${n}. Value: ${m}`);
  return m;
}

function nonFinite(n: number, h: ArrayLike<number>, ho: number): RangeError {
  for (let i = 0; i < n; i++) {
    for (let j = i; j < n; j++) {
      const re = h[ho + 2 * (i * n + j)];
      const im = i === j ? 0 : h[ho + 2 * (i * n + j) + 1];
      if (!Number.isFinite(re) || !Number.isFinite(im)) {
        return new RangeError(`eigensolver: h[${i}][${j}] is not finite. Value: ${re} + ${im}i`);
      }
    }
  }
  return new RangeError('eigensolver: h has a non-finite entry');
}

/** Convenience: eigenvalues (and vectors) of one matrix, allocating. Not for per-k loops. */
export function eigh(n: number, h: CMatrix): { values: Float64Array; vectors: CMatrix } {
  const solver = new HermitianEigensolver(n);
  const values = new Float64Array(n);
  const vectors = new Float64Array(2 * n * n);
  solver.solve(h, values, vectors);
  return { values, vectors };
}
