/**
 * Eigenphases of a unitary matrix (a Wilson loop): the eigenvalues e^{i phi}, phi in (-pi, pi],
 * sorted ascending, by Householder reduction to Hessenberg form and the complex single-shift QR
 * iteration to Schur form. A unitary matrix is normal, so its Schur form is diagonal and the Schur
 * vectors are eigenvectors; exactly degenerate phases (Kramers pairs of Wannier centres) need no
 * special care.
 */
import type { CMatrix } from './cmatrix.js';
import { eigenphaseWorkspace, type EigenphaseKernels } from './simd.js';

const EPS = 2 ** -52;
/** Steps of a QR sweep whose column rotations are applied together to the rows above them. */
const DEFER = 32;
/** Phases within this of -pi are reported as +pi. */
const BRANCH_CUT = -Math.PI + 64 * EPS;
/** Inside [SQUARES_MIN, SQUARES_MAX] a sum of two squares lost nothing to underflow or overflow. */
const SQUARES_MIN = 2 ** -600;
const SQUARES_MAX = 2 ** 600;

function checkArray(name: string, x: ArrayLike<number>, offset: number, needed: number): void {
  if (!Number.isInteger(offset) || offset < 0) {
    throw new RangeError(`${name} offset must be a nonnegative integer. Value: ${offset}`);
  }
  if (x.length < offset + needed) {
    throw new RangeError(`${name} must hold ${needed} entries from offset ${offset}. Value: length ${x.length}`);
  }
}

export class UnitaryEigenphases {
  readonly n: number;
  /**
   * The eigenvalues of the last solve, interleaved (re, im), in the order of the phases. Their
   * moduli tell how far from unitary the input was.
   */
  readonly eigenvalues: Float64Array;
  private readonly a: Float64Array;
  /** The Schur vectors, made on the first solve that asks for them (an eigenvalue-only solve needs none). */
  private q: Float64Array = new Float64Array(0);
  private readonly u: Float64Array;
  /**
   * The SIMD kernels (src/linalg/simd.ts) and the byte offsets of u, of s and s2 (the dots) and of the
   * deferred column rotations (rot, a view at rotAt) in their memory.
   */
  private readonly simd: EigenphaseKernels;
  private readonly uAt: number;
  private readonly sAt: number;
  private readonly s2At: number;
  /** The two dot vectors (at sAt and s2At). */
  private readonly dots: Float64Array;
  private readonly rotAt: number;
  private readonly rot: Float64Array;
  private readonly raw: Float64Array;
  private readonly rawPhase: Float64Array;
  private readonly order: Int32Array;

  constructor(n: number) {
    if (!Number.isInteger(n) || n < 1) throw new RangeError(`eigenphase solver size must be a positive integer. Value: ${n}`);
    this.n = n;
    this.eigenvalues = new Float64Array(2 * n);
    // a (at byte 0), u and s live in the memory of the SIMD kernels (ours during a call).
    this.uAt = 16 * n * n;
    this.sAt = this.uAt + 16 * n;
    this.s2At = this.sAt + 16 * n;
    this.rotAt = this.s2At + 16 * n;
    const { kernels, memory } = eigenphaseWorkspace(this.rotAt + 48 * DEFER);
    this.rot = new Float64Array(memory, this.rotAt, 6 * DEFER);
    this.dots = new Float64Array(memory, this.sAt, 4 * n);
    this.simd = kernels;
    this.a = new Float64Array(memory, 0, 2 * n * n);
    this.u = new Float64Array(memory, this.uAt, 2 * n);
    this.raw = new Float64Array(2 * n);
    this.rawPhase = new Float64Array(n);
    this.order = new Int32Array(n);
  }

  /**
   * Phases of the eigenvalues of the (unitary) matrix `w` into `phases`, ascending in (-pi, pi]
   * (a phase within 64 eps of -pi is reported as +pi);
   * with `vecs`, the matching orthonormal eigenvectors into its columns (for a matrix that is not
   * normal these are its Schur vectors, not eigenvectors). `w` is not modified.
   * Returns `phases`.
   */
  solve(w: CMatrix, phases: Float64Array, vecs?: CMatrix): Float64Array {
    return this.solveAt(w, 0, phases, 0, vecs ?? null, 0);
  }

  /** `solve` on matrices at offsets (in doubles) inside larger arrays. */
  solveAt(w: CMatrix, wOffset: number, phases: Float64Array, phasesOffset: number, vecs: CMatrix | null, vecsOffset = 0): Float64Array {
    const n = this.n;
    checkArray('w', w, wOffset, 2 * n * n);
    checkArray('phases', phases, phasesOffset, n);
    if (vecs !== null) checkArray('vecs', vecs, vecsOffset, 2 * n * n);
    const a = this.a;
    let norm2 = 0;
    for (let j = 0; j < 2 * n * n; j++) {
      const x = w[wOffset + j];
      a[j] = x;
      norm2 += x * x;
    }
    if (!Number.isFinite(norm2)) {
      for (let j = 0; j < 2 * n * n; j++) {
        if (!Number.isFinite(w[wOffset + j])) {
          const e = j >> 1;
          throw new RangeError(`eigenphases: w[${Math.floor(e / n)}][${e % n}] is not finite. Value: ${w[wOffset + j]}`);
        }
      }
      throw new RangeError('eigenphases: w is too large (its norm overflows)');
    }
    const wantVectors = vecs !== null;
    if (wantVectors) {
      if (this.q.length === 0) this.q = new Float64Array(2 * n * n);
      else this.q.fill(0);
      for (let i = 0; i < n; i++) this.q[2 * (i * n + i)] = 1;
    }
    this.hessenberg(wantVectors);
    this.schur(wantVectors, EPS * Math.sqrt(norm2));
    const raw = this.raw;
    const rawPhase = this.rawPhase;
    const order = this.order;
    for (let i = 0; i < n; i++) {
      const re = a[2 * (i * n + i)];
      const im = a[2 * (i * n + i) + 1];
      raw[2 * i] = re;
      raw[2 * i + 1] = im;
      let phi = Math.atan2(im, re);
      // Rounding puts an eigenvalue at -1 on either side of the cut; report it at +pi, so that
      // a degenerate pair there stays together at the end of the list.
      if (phi <= BRANCH_CUT) phi = Math.PI;
      rawPhase[i] = phi;
      let j = i - 1;
      while (j >= 0 && rawPhase[order[j]] > phi) {
        order[j + 1] = order[j];
        j--;
      }
      order[j + 1] = i;
    }
    for (let c = 0; c < n; c++) {
      const src = order[c];
      phases[phasesOffset + c] = rawPhase[src];
      this.eigenvalues[2 * c] = raw[2 * src];
      this.eigenvalues[2 * c + 1] = raw[2 * src + 1];
    }
    if (vecs !== null) {
      const q = this.q;
      for (let c = 0; c < n; c++) {
        const src = order[c];
        for (let i = 0; i < n; i++) {
          vecs[vecsOffset + 2 * (i * n + c)] = q[2 * (i * n + src)];
          vecs[vecsOffset + 2 * (i * n + c) + 1] = q[2 * (i * n + src) + 1];
        }
      }
    }
    return phases;
  }

  /** A <- P A P column by column (P = I - beta u u^dagger Householder), Q <- Q P. */
  private hessenberg(wantVectors: boolean): void {
    const n = this.n;
    const a = this.a;
    const u = this.u;
    // s: the left dots of the current reflector; sNext: those of the next, formed (but for the
    // correction of their first row) in the current pass over the matrix.
    let sAt = this.sAt, sNext = this.s2At;
    let ready = false;
    for (let k = 0; k < n - 2; k++) {
      let tail = 0;
      for (let i = k + 2; i < n; i++) {
        const xr = a[2 * (i * n + k)];
        const xi = a[2 * (i * n + k) + 1];
        tail += xr * xr + xi * xi;
      }
      if (tail === 0) {
        ready = false;
        continue;
      }
      const x0r = a[2 * ((k + 1) * n + k)];
      const x0i = a[2 * ((k + 1) * n + k) + 1];
      const ax0 = Math.sqrt(x0r * x0r + x0i * x0i);
      const sigma = Math.sqrt(ax0 * ax0 + tail);
      const cr = ax0 === 0 ? 1 : x0r / ax0;
      const ci = ax0 === 0 ? 0 : x0i / ax0;
      const beta = 1 / (sigma * (sigma + ax0));
      u[2 * (k + 1)] = cr * (ax0 + sigma);
      u[2 * (k + 1) + 1] = ci * (ax0 + sigma);
      for (let i = k + 2; i < n; i++) {
        u[2 * i] = a[2 * (i * n + k)];
        u[2 * i + 1] = a[2 * (i * n + k) + 1];
      }
      // s_j = sum_i conj(u_i) A_ij over rows and columns k+1.. (column k becomes alpha e1): from
      // the previous pass, which summed with u_{k+1} = x_{k+1}, plus the difference on row k+1.
      const k1 = k + 1;
      if (ready) {
        const s = this.dots, s0 = (sAt - this.sAt) / 8;
        const dr = u[2 * k1] - x0r, di = u[2 * k1 + 1] - x0i;
        for (let j = k1; j < n; j++) {
          const yr = a[2 * (k1 * n + j)], yi = a[2 * (k1 * n + j) + 1];
          s[s0 + 2 * j] += dr * yr + di * yi;
          s[s0 + 2 * j + 1] += dr * yi - di * yr;
        }
      } else {
        this.simd.columnDots(16 * (k1 * n + k1), 16 * n, this.uAt + 16 * k1, sAt + 16 * k1, n - k1);
      }
      // A <- P A P on columns k+1.. (left on rows k+1.., right on every row), one pass (SIMD),
      // with the next reflector's dots when there is a next one.
      ready = k + 1 < n - 2;
      if (ready) {
        this.simd.similarityDots(0, 16 * n, this.uAt, sAt, n, k1, beta, sNext);
        [sAt, sNext] = [sNext, sAt];
      } else {
        this.simd.similarityRows(0, 16 * n, this.uAt, sAt, n, k1, beta);
      }
      a[2 * ((k + 1) * n + k)] = -cr * sigma;
      a[2 * ((k + 1) * n + k) + 1] = -ci * sigma;
      for (let i = k + 2; i < n; i++) a[2 * (i * n + k)] = a[2 * (i * n + k) + 1] = 0;
      if (wantVectors) applyRight(n, this.q, u, k + 1, beta);
    }
  }

  /** Complex single-shift QR on the Hessenberg matrix in `a` until it is upper triangular. */
  private schur(wantVectors: boolean, small: number): void {
    const n = this.n;
    const a = this.a;
    const q = this.q;
    const rot = this.rot;
    const identity = (t: number) => {
      rot[6 * t] = rot[6 * t + 1] = 1;
      rot[6 * t + 2] = rot[6 * t + 3] = rot[6 * t + 4] = rot[6 * t + 5] = 0;
    };
    let hi = n - 1;
    let iter = 0;
    while (hi > 0) {
      let l = hi;
      while (l > 0) {
        const sr = a[2 * (l * n + l - 1)];
        const si = a[2 * (l * n + l - 1) + 1];
        if (Math.abs(sr) + Math.abs(si) <= small) {
          a[2 * (l * n + l - 1)] = a[2 * (l * n + l - 1) + 1] = 0;
          break;
        }
        l--;
      }
      if (l === hi) {
        hi--;
        iter = 0;
        continue;
      }
      if (++iter > 100) throw new RangeError(`eigenphases: the QR iteration did not converge (n = ${this.n}); is w finite?`);
      // Shift: the eigenvalue of the trailing 2x2 block nearer its last diagonal entry (Wilkinson),
      // or an ad hoc one every 10 iterations (a plain shift stalls on, e.g., cyclic permutations).
      const t = 2 * ((hi - 1) * n + hi - 1);
      const ar = a[t], ai = a[t + 1];
      const br = a[t + 2], bi = a[t + 3];
      const cr = a[t + 2 * n], ci = a[t + 2 * n + 1];
      const dr = a[t + 2 * n + 2], di = a[t + 2 * n + 3];
      let mr: number;
      let mi: number;
      if (iter % 10 === 0) {
        mr = dr + 0.75 * Math.abs(cr) + 0.4375 * Math.abs(ci);
        mi = di + 0.4375 * Math.abs(cr) - 0.75 * Math.abs(ci);
      } else {
        // mu = d - bc / (delta + sqrt(delta^2 + bc)), delta = (a - d)/2, root taken so |denominator| is largest.
        const er = 0.5 * (ar - dr), ei = 0.5 * (ai - di);
        const pr = br * cr - bi * ci, pi = br * ci + bi * cr;
        const zr = er * er - ei * ei + pr, zi = 2 * er * ei + pi;
        const mod = Math.hypot(zr, zi);
        let sqr = 0;
        let sqi = 0;
        if (mod !== 0) {
          if (zr >= 0) {
            sqr = Math.sqrt(0.5 * (mod + zr));
            sqi = zi / (2 * sqr);
          } else {
            sqi = Math.sqrt(0.5 * (mod - zr));
            if (zi < 0) sqi = -sqi;
            sqr = zi / (2 * sqi);
          }
        }
        if (er * sqr + ei * sqi < 0) {
          sqr = -sqr;
          sqi = -sqi;
        }
        const denr = er + sqr, deni = ei + sqi;
        const den2 = denr * denr + deni * deni;
        if (den2 === 0) {
          mr = dr;
          mi = di;
        } else {
          mr = dr - (pr * denr + pi * deni) / den2;
          mi = di - (pi * denr - pr * deni) / den2;
        }
      }
      // Implicit QR sweep over the active block [l, hi]: chase the bulge with Givens rotations.
      // A column rotation at step k reaches rows l..k+2; the rows above k0 (which no row
      // rotation of steps k0.. touches) get those of DEFER steps at once, row by row, instead of
      // one strided pass per step (a skipped step is recorded as the identity).
      let k0 = l;
      for (let t = 0; t < DEFER; t++) identity(t);
      const flush = (from: number): void => {
        const steps = Math.min(DEFER, hi - from);
        if (from > l) this.simd.rotateRows(16 * (l * n + from), 16 * n, from - l, this.rotAt, steps);
        for (let t = 0; t < steps; t++) identity(t);
      };
      let fr = a[2 * (l * n + l)] - mr;
      let fi = a[2 * (l * n + l) + 1] - mi;
      let gr = a[2 * ((l + 1) * n + l)];
      let gi = a[2 * ((l + 1) * n + l) + 1];
      for (let k = l; k < hi; k++) {
        if (k - k0 === DEFER) {
          flush(k0);
          k0 = k;
        }
        if (k > l) {
          fr = a[2 * (k * n + k - 1)];
          fi = a[2 * (k * n + k - 1) + 1];
          gr = a[2 * ((k + 1) * n + k - 1)];
          gi = a[2 * ((k + 1) * n + k - 1) + 1];
        }
        // G = [[c, s], [-conj(s), c]] with G (f, g) = (r, 0), c real.
        const fa = modulus(fr, fi);
        const ga = modulus(gr, gi);
        if (ga === 0) continue;
        let c: number;
        let sr: number;
        let si: number;
        if (fa === 0) {
          c = 0;
          sr = gr / ga;
          si = -gi / ga;
        } else {
          const nrm = modulus(fa, ga);
          c = fa / nrm;
          const pr = fr / fa, pi = fi / fa;
          sr = (pr * gr + pi * gi) / nrm;
          si = (pi * gr - pr * gi) / nrm;
        }
        const j0 = k > l ? k - 1 : l;
        const rk = 2 * k * n;
        const rk1 = rk + 2 * n;
        this.simd.rotatePair(8 * (rk + 2 * j0), 8 * (rk1 + 2 * j0), hi - j0 + 1, c, sr, si);
        if (k > l) a[rk1 + 2 * (k - 1)] = a[rk1 + 2 * (k - 1) + 1] = 0;
        const t = 6 * (k - k0);
        rot[t] = rot[t + 1] = c;
        rot[t + 2] = rot[t + 3] = sr;
        rot[t + 4] = si;
        rot[t + 5] = -si;
        // Now on rows k0..k+2 (those above wait for the flush): one rotation, rows stride apart.
        const i0 = Math.max(l, k0), iEnd = Math.min(k + 2, hi);
        this.simd.rotateRows(16 * (i0 * n + k), 16 * n, iEnd - i0 + 1, this.rotAt + 8 * t, 1);
        if (wantVectors) rotateColumns(n, q, k, 0, n - 1, c, sr, si);
      }
      flush(k0);
    }
  }
}

/**
 * sqrt(x^2 + y^2): directly while the sum of squares is safely inside the normal range (every
 * rotation of a QR sweep takes three, and Math.hypot costs several times a square root), else
 * Math.hypot (no overflow or underflow).
 */
function modulus(x: number, y: number): number {
  const s = x * x + y * y;
  return s > SQUARES_MIN && s < SQUARES_MAX ? Math.sqrt(s) : Math.hypot(x, y);
}

/** M <- M (I - beta u u^dagger) on columns from..n-1 (u stored at those indices). */
function applyRight(n: number, m: Float64Array, u: Float64Array, from: number, beta: number): void {
  for (let i = 0; i < n; i++) {
    const row = 2 * i * n;
    let tr = 0;
    let ti = 0;
    for (let j = from; j < n; j++) {
      const xr = m[row + 2 * j], xi = m[row + 2 * j + 1];
      const ur = u[2 * j], ui = u[2 * j + 1];
      tr += xr * ur - xi * ui;
      ti += xr * ui + xi * ur;
    }
    tr *= beta;
    ti *= beta;
    for (let j = from; j < n; j++) {
      const ur = u[2 * j], ui = u[2 * j + 1];
      // subtract t conj(u_j)
      m[row + 2 * j] -= tr * ur + ti * ui;
      m[row + 2 * j + 1] -= ti * ur - tr * ui;
    }
  }
}

/** M <- M G^dagger on columns k, k+1, rows i0..i1: col k = c x + conj(s) y, col k+1 = -s x + c y. */
function rotateColumns(n: number, m: Float64Array, k: number, i0: number, i1: number, c: number, sr: number, si: number): void {
  for (let i = i0; i <= i1; i++) {
    const p = 2 * (i * n + k);
    const xr = m[p], xi = m[p + 1];
    const yr = m[p + 2], yi = m[p + 3];
    m[p] = c * xr + sr * yr + si * yi;
    m[p + 1] = c * xi + sr * yi - si * yr;
    m[p + 2] = c * yr - (sr * xr - si * xi);
    m[p + 3] = c * yi - (sr * xi + si * xr);
  }
}

/** Convenience: eigenphases (and eigenvectors) of one unitary matrix, allocating. */
export function eigenphases(n: number, w: CMatrix): { phases: Float64Array; vectors: CMatrix } {
  const solver = new UnitaryEigenphases(n);
  const phases = new Float64Array(n);
  const vectors = new Float64Array(2 * n * n);
  solver.solve(w, phases, vectors);
  return { phases, vectors };
}
