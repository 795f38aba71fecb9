/**
 * Hermitian eigensolver: eigenvalues ascending, eigenvectors as the columns of V.
 *
 * n = 1 and n = 2 in closed form. Larger n: Householder reduction to tridiagonal form, a diagonal
 * phase transform that makes the off-diagonal real, implicit QL with Wilkinson shifts on the real
 * tridiagonal (rotations accumulated in a real matrix), then the phases and reflectors applied to
 * each eigenvector. Eigenvalues only: the root-free QR sweep on the squared off-diagonal instead.
 * Normwise backward stable: residuals and orthonormality are of order eps ||H||, also on clustered
 * and exactly degenerate spectra. Inputs of any magnitude are scaled by a power of two (exact).
 */
import type { CMatrix } from './cmatrix.js';
import { TridiagonalDivideConquer } from './divide-conquer.js';
import { tridiagonalEigenvalues, tridiagonalQL } from './tridiagonal.js';

/** Inside [SAFE_MIN, SAFE_MAX] no square or sum of squares over- or underflows harmfully. */
const SAFE_MIN = 2 ** -300;
const SAFE_MAX = 2 ** 300;
/**
 * From this size on, the vector path first finds the eigenvalues without vectors and uses them as
 * shifts: fewer sweeps, less work on the eigenvectors (a gain from about n = 32 on, measured).
 */
const KNOWN_SHIFTS_FROM = 32;
/** From this size on, the tridiagonal eigenvectors come from divide and conquer. */
const DIVIDE_FROM = Number(globalThis.process?.env?.DIVIDE_FROM ?? 48);
/** Eigenvectors per block in the back-transformation (the block stays in cache across reflectors). */
const BACK_BLOCK = 16;

/** A power of two near `big` (exact to scale by); clamped so that its reciprocal is finite. */
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
  /** Working copy of the upper triangle; after the reduction, row k holds reflector k. */
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
  /** Complex scratch vector, and the eigenvectors (one per row) during the back-transformation. */
  private readonly p: Float64Array;
  private readonly y: Float64Array;
  private readonly order: Int32Array;
  /** Eigenvalue estimates used as QL shifts (n >= KNOWN_SHIFTS_FROM), and their scratch. */
  private readonly known: Float64Array;
  private readonly e2: Float64Array;
  private readonly divide: TridiagonalDivideConquer | null;

  constructor(n: number) {
    if (!Number.isInteger(n) || n < 1) throw new RangeError(`eigensolver size must be a positive integer. Value: ${n}`);
    this.n = n;
    this.a = new Float64Array(2 * n * n);
    this.beta = new Float64Array(n);
    this.off = new Float64Array(2 * n);
    this.phase = new Float64Array(2 * n);
    this.d = new Float64Array(n);
    this.e = new Float64Array(n);
    this.z = new Float64Array(n * n);
    this.cs = new Float64Array(n);
    this.sn = new Float64Array(n);
    this.p = new Float64Array(2 * n);
    this.y = new Float64Array(2 * n * n);
    this.order = new Int32Array(n);
    this.known = new Float64Array(n);
    this.e2 = new Float64Array(n);
    this.divide = n >= DIVIDE_FROM ? new TridiagonalDivideConquer(n) : null;
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

  private solveGeneral(h: CMatrix, ho: number, w: Float64Array, wo: number, vecs: CMatrix | null, vo: number): void {
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
    this.reduce(vecs !== null);
    const d = this.d;
    const e = this.e;
    let converged: boolean;
    if (vecs === null) {
      converged = tridiagonalEigenvalues(n, d, e);
    } else if (this.divide !== null) {
      converged = this.divide.solve(d, e, this.z);
    } else {
      const z = this.z;
      z.fill(0);
      for (let i = 0; i < n; i++) z[i * n + i] = 1;
      converged = tridiagonalQL(n, d, e, z, this.cs, this.sn, n >= KNOWN_SHIFTS_FROM ? this.knownEigenvalues() : null);
    }
    if (!converged) {
      throw new RangeError(`eigensolver: the tridiagonal iteration did not converge (n = ${n}); is h finite and Hermitian?`);
    }
    // Ascending order by insertion sort (n is small, and QL leaves d nearly ordered in blocks).
    const order = this.order;
    for (let i = 0; i < n; i++) {
      const x = d[i];
      let j = i - 1;
      while (j >= 0 && d[order[j]] > x) {
        order[j + 1] = order[j];
        j--;
      }
      order[j + 1] = i;
    }
    for (let i = 0; i < n; i++) w[wo + i] = d[order[i]] * scale;
    if (vecs !== null) this.backTransform(vecs, vo);
  }

  /**
   * The eigenvalues of the real tridiagonal (d, e), sorted, from the cheap root-free iteration:
   * shifts for the QL iteration with vectors. Null if that iteration failed.
   */
  private knownEigenvalues(): Float64Array | null {
    const n = this.n;
    const known = this.known;
    const e2 = this.e2;
    for (let i = 0; i < n; i++) {
      known[i] = this.d[i];
      e2[i] = this.e[i] * this.e[i];
    }
    if (!tridiagonalEigenvalues(n, known, e2)) return null;
    for (let i = 1; i < n; i++) {
      const x = known[i];
      let j = i - 1;
      while (j >= 0 && known[j] > x) {
        known[j + 1] = known[j];
        j--;
      }
      known[j + 1] = x;
    }
    return known;
  }

  /**
   * Householder reduction of the Hermitian matrix in `a` (upper triangle) to tridiagonal form:
   * fills d (diagonal) and leaves the reflectors in the rows of `a`. With `forVectors`, e gets
   * |subdiagonal| and `phase` the D of T = D T_real D^dagger; without, e gets |subdiagonal|^2.
   */
  private reduce(forVectors: boolean): void {
    const n = this.n;
    const a = this.a;
    const p = this.p;
    const off = this.off;
    const betas = this.beta;
    for (let k = 0; k < n - 2; k++) {
      const base = 2 * k * n;
      // x = column k below the diagonal = conj(row k right of the diagonal).
      let tail = 0;
      for (let j = base + 2 * (k + 2); j < base + 2 * n; j++) tail += a[j] * a[j];
      const x0r = a[base + 2 * (k + 1)];
      const x0i = -a[base + 2 * (k + 1) + 1];
      if (tail === 0) {
        betas[k] = 0;
        off[2 * k] = x0r;
        off[2 * k + 1] = x0i;
        continue;
      }
      const ax0 = Math.sqrt(x0r * x0r + x0i * x0i);
      const sigma = Math.sqrt(ax0 * ax0 + tail);
      const cr = ax0 === 0 ? 1 : x0r / ax0;
      const ci = ax0 === 0 ? 0 : x0i / ax0;
      // P x = alpha e1 with alpha = -e^{i arg x0} sigma, u = x - alpha e1, P = I - beta u u^dagger.
      off[2 * k] = -cr * sigma;
      off[2 * k + 1] = -ci * sigma;
      const beta = 1 / (sigma * (sigma + ax0));
      betas[k] = beta;
      a[base + 2 * (k + 1)] = cr * (ax0 + sigma);
      a[base + 2 * (k + 1) + 1] = ci * (ax0 + sigma);
      for (let j = base + 2 * (k + 2) + 1; j < base + 2 * n; j += 2) a[j] = -a[j];
      // p = beta B u, B the trailing block (upper triangle stored).
      for (let j = 2 * (k + 1); j < 2 * n; j++) p[j] = 0;
      for (let i = k + 1; i < n; i++) {
        const ri = 2 * i * n;
        const uir = a[base + 2 * i];
        const uii = a[base + 2 * i + 1];
        const bii = a[ri + 2 * i];
        let sr = bii * uir;
        let si = bii * uii;
        for (let j = i + 1; j < n; j++) {
          const br = a[ri + 2 * j];
          const bi = a[ri + 2 * j + 1];
          const ujr = a[base + 2 * j];
          const uji = a[base + 2 * j + 1];
          sr += br * ujr - bi * uji;
          si += br * uji + bi * ujr;
          p[2 * j] += br * uir + bi * uii;
          p[2 * j + 1] += br * uii - bi * uir;
        }
        p[2 * i] += sr;
        p[2 * i + 1] += si;
      }
      // q = p - (beta/2)(u^dagger p) u, then B -= u q^dagger + q u^dagger.
      let upr = 0;
      for (let j = 2 * (k + 1); j < 2 * n; j++) {
        p[j] *= beta;
        upr += a[base + j] * p[j];
      }
      const kk = 0.5 * beta * upr;
      for (let j = 2 * (k + 1); j < 2 * n; j++) p[j] -= kk * a[base + j];
      for (let i = k + 1; i < n; i++) {
        const ri = 2 * i * n;
        const uir = a[base + 2 * i];
        const uii = a[base + 2 * i + 1];
        const qir = p[2 * i];
        const qii = p[2 * i + 1];
        for (let j = i; j < n; j++) {
          const ujr = a[base + 2 * j];
          const uji = a[base + 2 * j + 1];
          const qjr = p[2 * j];
          const qji = p[2 * j + 1];
          a[ri + 2 * j] -= uir * qjr + uii * qji + qir * ujr + qii * uji;
          a[ri + 2 * j + 1] -= uii * qjr - uir * qji + qii * ujr - qir * uji;
        }
      }
    }
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
   * the rows of `y` while the reflectors are applied (blocks of 16 vectors share each reflector
   * while it is in cache; pairs share its loads), then go to the columns of `vecs` in order.
   */
  private backTransform(vecs: CMatrix, vo: number): void {
    const n = this.n;
    const z = this.z;
    const y = this.y;
    const phase = this.phase;
    const order = this.order;
    for (let col = 0; col < n; col++) {
      const src = order[col];
      const row = 2 * col * n;
      for (let i = 0; i < n; i++) {
        const zi = z[i * n + src];
        y[row + 2 * i] = phase[2 * i] * zi;
        y[row + 2 * i + 1] = phase[2 * i + 1] * zi;
      }
    }
    for (let c0 = 0; c0 < n; c0 += BACK_BLOCK) {
      const c1 = Math.min(n, c0 + BACK_BLOCK);
      let k = n - 3;
      for (; k >= 1; k -= 2) this.applyReflectorPair(k, c0, c1);
      if (k === 0) this.applyReflector(0, c0, c1);
    }
    for (let col = 0; col < n; col++) {
      const row = 2 * col * n;
      for (let i = 0; i < n; i++) {
        vecs[vo + 2 * (i * n + col)] = y[row + 2 * i];
        vecs[vo + 2 * (i * n + col) + 1] = y[row + 2 * i + 1];
      }
    }
  }

  /** Rows c0..c1 of y (eigenvectors) times reflector k: y -= beta u (u^dagger y). */
  private applyReflector(k: number, c0: number, c1: number): void {
    const beta = this.beta[k];
    if (beta === 0) return;
    const n = this.n;
    const a = this.a;
    const y = this.y;
    const base = 2 * k * n;
    const from = 2 * (k + 1);
    const end = 2 * n;
    for (let c = c0; c < c1; c++) {
      const ya = 2 * c * n;
      let ar = 0, ai = 0;
      for (let j = from; j < end; j += 2) {
        const ur = a[base + j], ui = a[base + j + 1];
        const xr = y[ya + j], xi = y[ya + j + 1];
        ar += ur * xr + ui * xi;
        ai += ur * xi - ui * xr;
      }
      ar *= beta;
      ai *= beta;
      for (let j = from; j < end; j += 2) {
        const ur = a[base + j], ui = a[base + j + 1];
        y[ya + j] -= ar * ur - ai * ui;
        y[ya + j + 1] -= ar * ui + ai * ur;
      }
    }
  }

  /**
   * Rows c0..c1 of y times P_{k-1} P_k in one pass over each vector (two reflectors by two vectors,
   * a register tile): with u = u_k, v = u_{k-1}, P_{k-1} P_k y = y - a u - b v where
   * a = beta_k u^dagger y and b = beta_{k-1} (v^dagger y - a v^dagger u).
   */
  private applyReflectorPair(k: number, c0: number, c1: number): void {
    const n = this.n;
    const a = this.a;
    const y = this.y;
    const bu = this.beta[k];
    const bv = this.beta[k - 1];
    const ub = 2 * k * n;
    const vb = ub - 2 * n;
    const from = 2 * (k + 1);
    const end = 2 * n;
    // v^dagger u (both vanish before k + 1, except v_k).
    let cr = 0, ci = 0;
    for (let j = from; j < end; j += 2) {
      const ur = a[ub + j], ui = a[ub + j + 1];
      const vr = a[vb + j], vi = a[vb + j + 1];
      cr += vr * ur + vi * ui;
      ci += vr * ui - vi * ur;
    }
    const vkr = a[vb + from - 2], vki = a[vb + from - 1];
    let c = c0;
    for (; c + 1 < c1; c += 2) {
      const ya = 2 * c * n;
      const yb = ya + 2 * n;
      let uar = 0, uai = 0, ubr = 0, ubi = 0;
      // v_k y_k starts the v-dots.
      let xr = y[ya + from - 2], xi = y[ya + from - 1];
      let var_ = vkr * xr + vki * xi, vai = vkr * xi - vki * xr;
      xr = y[yb + from - 2];
      xi = y[yb + from - 1];
      let vbr = vkr * xr + vki * xi, vbi = vkr * xi - vki * xr;
      for (let j = from; j < end; j += 2) {
        const ur = a[ub + j], ui = a[ub + j + 1];
        const vr = a[vb + j], vi = a[vb + j + 1];
        const pr = y[ya + j], pi = y[ya + j + 1];
        const qr = y[yb + j], qi = y[yb + j + 1];
        uar += ur * pr + ui * pi;
        uai += ur * pi - ui * pr;
        var_ += vr * pr + vi * pi;
        vai += vr * pi - vi * pr;
        ubr += ur * qr + ui * qi;
        ubi += ur * qi - ui * qr;
        vbr += vr * qr + vi * qi;
        vbi += vr * qi - vi * qr;
      }
      const aar = bu * uar, aai = bu * uai;
      const abr = bu * ubr, abi = bu * ubi;
      const bar = bv * (var_ - (aar * cr - aai * ci)), bai = bv * (vai - (aar * ci + aai * cr));
      const bbr = bv * (vbr - (abr * cr - abi * ci)), bbi = bv * (vbi - (abr * ci + abi * cr));
      y[ya + from - 2] -= bar * vkr - bai * vki;
      y[ya + from - 1] -= bar * vki + bai * vkr;
      y[yb + from - 2] -= bbr * vkr - bbi * vki;
      y[yb + from - 1] -= bbr * vki + bbi * vkr;
      for (let j = from; j < end; j += 2) {
        const ur = a[ub + j], ui = a[ub + j + 1];
        const vr = a[vb + j], vi = a[vb + j + 1];
        y[ya + j] -= aar * ur - aai * ui + bar * vr - bai * vi;
        y[ya + j + 1] -= aar * ui + aai * ur + bar * vi + bai * vr;
        y[yb + j] -= abr * ur - abi * ui + bbr * vr - bbi * vi;
        y[yb + j + 1] -= abr * ui + abi * ur + bbr * vi + bbi * vr;
      }
    }
    if (c < c1) {
      this.applyReflector(k, c, c1);
      this.applyReflector(k - 1, c, c1);
    }
  }
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
