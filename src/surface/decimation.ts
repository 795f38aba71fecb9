/**
 * Surface and bulk Green's functions of a half-infinite stack of principal layers by the decimation
 * of Lopez Sancho, Lopez Sancho & Rubio, J. Phys. F 15, 851 (1985). Each step eliminates every
 * other layer, so after s steps the renormalised couplings alpha, beta join layers 2^s apart and
 * shrink like exp(-2^s eta / v): the work grows with log(1/eta), not with the depth.
 *
 * With omega = E + i eta, H00 = <0|H|0>, H01 = <0|H|1>, start alpha = H01, beta = H01^dagger,
 * eps = eps_bottom = eps_top = H00, and repeat with g = (omega - eps)^{-1}:
 *   eps_bottom += alpha g beta,  eps_top += beta g alpha,  eps += alpha g beta + beta g alpha,
 *   alpha <- alpha g alpha,  beta <- beta g beta,
 * until every element of alpha and beta is below `tolerance` times the energy scale (the largest
 * element of H00 and H01). Then G = (omega - eps_x)^{-1}:
 * - 'bottom': the sample occupies layers 0, 1, 2, ... (its surface faces -A_d; a ribbon's layer-0
 *   edge, `edges.first`);
 * - 'top': the sample occupies ..., -2, -1, 0 (its surface faces +A_d; a ribbon's last edge);
 * - 'bulk': one principal layer of the infinite crystal.
 *
 * Matrices are split re/im, row-major, sized n = the principal layer's orbitals (2 to 8 typically):
 * the class owns every buffer, nothing is allocated per solve.
 */
import type { SplitMatrix } from './layers.js';

/** Steps taken when the tolerance is never met (2^60 layers: only a vanishing eta needs more). */
export const DECIMATION_MAX_STEPS = 60;
/** Couplings below this times the energy scale end the iteration. */
export const DECIMATION_TOLERANCE = 1e-10;

/** The spectral weights -Im Tr G / pi of one solve, and the steps it took (-1: not converged). */
export interface DecimationOutcome {
  bottom: number;
  top: number;
  bulk: number;
  steps: number;
}

export class Decimation {
  readonly n: number;
  readonly tolerance: number;
  readonly maxSteps: number;
  private readonly epsR: Float64Array; private readonly epsI: Float64Array;
  private readonly botR: Float64Array; private readonly botI: Float64Array;
  private readonly topR: Float64Array; private readonly topI: Float64Array;
  private readonly aR: Float64Array; private readonly aI: Float64Array;
  private readonly bR: Float64Array; private readonly bI: Float64Array;
  private readonly gR: Float64Array; private readonly gI: Float64Array;
  private readonly agR: Float64Array; private readonly agI: Float64Array;
  private readonly bgR: Float64Array; private readonly bgI: Float64Array;
  private readonly tR: Float64Array; private readonly tI: Float64Array;
  private readonly pivots: Int32Array;
  readonly outcome: DecimationOutcome = { bottom: 0, top: 0, bulk: 0, steps: 0 };

  constructor(n: number, tolerance = DECIMATION_TOLERANCE, maxSteps = DECIMATION_MAX_STEPS) {
    this.n = n;
    this.tolerance = tolerance;
    this.maxSteps = maxSteps;
    const m = (): Float64Array => new Float64Array(n * n);
    this.epsR = m(); this.epsI = m(); this.botR = m(); this.botI = m(); this.topR = m(); this.topI = m();
    this.aR = m(); this.aI = m(); this.bR = m(); this.bI = m(); this.gR = m(); this.gI = m();
    this.agR = m(); this.agI = m(); this.bgR = m(); this.bgI = m(); this.tR = m(); this.tI = m();
    this.pivots = new Int32Array(n);
  }

  /**
   * The three spectral weights at energy `energy` with broadening `eta` > 0 (-Im Tr G / pi, summed
   * over the principal layer's orbitals), into `this.outcome`.
   */
  solve(h00: SplitMatrix, h01: SplitMatrix, energy: number, eta: number): DecimationOutcome {
    const n = this.n, nn = n * n;
    const { epsR, epsI, botR, botI, topR, topI, aR, aI, bR, bI, gR, gI, agR, agI, bgR, bgI, tR, tI } = this;
    let scale = 0;
    for (let i = 0; i < nn; i++) {
      const x = h00.re[i], y = h00.im[i], u = h01.re[i], v = h01.im[i];
      epsR[i] = botR[i] = topR[i] = x;
      epsI[i] = botI[i] = topI[i] = y;
      aR[i] = u; aI[i] = v;
      scale = Math.max(scale, Math.abs(x), Math.abs(y), Math.abs(u), Math.abs(v));
    }
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) { bR[i * n + j] = h01.re[j * n + i]; bI[i * n + j] = -h01.im[j * n + i]; }
    const limit = this.tolerance * Math.max(scale, 1e-300);
    let steps = -1;
    for (let s = 0; s < this.maxSteps; s++) {
      resolvent(n, epsR, epsI, energy, eta, gR, gI, this.pivots);
      multiply(n, aR, aI, gR, gI, agR, agI);
      multiply(n, bR, bI, gR, gI, bgR, bgI);
      // alpha g beta into the bottom surface and the bulk; beta g alpha into the top and the bulk.
      multiply(n, agR, agI, bR, bI, tR, tI);
      for (let i = 0; i < nn; i++) { botR[i] += tR[i]; botI[i] += tI[i]; epsR[i] += tR[i]; epsI[i] += tI[i]; }
      multiply(n, bgR, bgI, aR, aI, tR, tI);
      for (let i = 0; i < nn; i++) { topR[i] += tR[i]; topI[i] += tI[i]; epsR[i] += tR[i]; epsI[i] += tI[i]; }
      multiply(n, agR, agI, aR, aI, tR, tI);
      let big = 0;
      for (let i = 0; i < nn; i++) { aR[i] = tR[i]; aI[i] = tI[i]; big = Math.max(big, Math.abs(tR[i]), Math.abs(tI[i])); }
      multiply(n, bgR, bgI, bR, bI, tR, tI);
      for (let i = 0; i < nn; i++) { bR[i] = tR[i]; bI[i] = tI[i]; big = Math.max(big, Math.abs(tR[i]), Math.abs(tI[i])); }
      if (big <= limit) {
        steps = s + 1;
        break;
      }
    }
    const out = this.outcome;
    out.steps = steps;
    out.bottom = this.weight(botR, botI, energy, eta);
    out.top = this.weight(topR, topI, energy, eta);
    out.bulk = this.weight(epsR, epsI, energy, eta);
    return out;
  }

  /** -Im Tr (omega - eps)^{-1} / pi. */
  private weight(er: Float64Array, ei: Float64Array, energy: number, eta: number): number {
    const n = this.n;
    resolvent(n, er, ei, energy, eta, this.gR, this.gI, this.pivots);
    let tr = 0;
    for (let i = 0; i < n; i++) tr += this.gI[i * n + i];
    return -tr / Math.PI;
  }
}

/**
 * c = a b (n x n, split re/im; c must not alias a or b). Sums stay in registers; for even n, 2 x 2
 * blocks of c at a time, so each loaded element serves two products (1.6x faster at n = 4).
 */
function multiply(n: number, ar: Float64Array, ai: Float64Array, br: Float64Array, bi: Float64Array, cr: Float64Array, ci: Float64Array): void {
  if (n === 4) {
    multiply4(ar, ai, br, bi, cr, ci);
    return;
  }
  if (n % 2 === 0) {
    for (let i = 0; i < n; i += 2) {
      const r0 = i * n, r1 = r0 + n;
      for (let j = 0; j < n; j += 2) {
        let s00r = 0, s00i = 0, s01r = 0, s01i = 0, s10r = 0, s10i = 0, s11r = 0, s11i = 0;
        for (let k = 0, col = j; k < n; k++, col += n) {
          const x0r = ar[r0 + k], x0i = ai[r0 + k], x1r = ar[r1 + k], x1i = ai[r1 + k];
          const y0r = br[col], y0i = bi[col], y1r = br[col + 1], y1i = bi[col + 1];
          s00r += x0r * y0r - x0i * y0i; s00i += x0r * y0i + x0i * y0r;
          s01r += x0r * y1r - x0i * y1i; s01i += x0r * y1i + x0i * y1r;
          s10r += x1r * y0r - x1i * y0i; s10i += x1r * y0i + x1i * y0r;
          s11r += x1r * y1r - x1i * y1i; s11i += x1r * y1i + x1i * y1r;
        }
        cr[r0 + j] = s00r; ci[r0 + j] = s00i; cr[r0 + j + 1] = s01r; ci[r0 + j + 1] = s01i;
        cr[r1 + j] = s10r; ci[r1 + j] = s10i; cr[r1 + j + 1] = s11r; ci[r1 + j + 1] = s11i;
      }
    }
    return;
  }
  for (let i = 0; i < n; i++) {
    const row = i * n;
    for (let j = 0; j < n; j++) {
      let sr = 0, si = 0;
      for (let k = 0, col = j; k < n; k++, col += n) {
        const xr = ar[row + k], xi = ai[row + k], yr = br[col], yi = bi[col];
        sr += xr * yr - xi * yi;
        si += xr * yi + xi * yr;
      }
      cr[row + j] = sr;
      ci[row + j] = si;
    }
  }
}

/** c = a b for 4 x 4 (a 4-orbital layer, the commonest): a column of b in registers, rows unrolled. */
function multiply4(ar: Float64Array, ai: Float64Array, br: Float64Array, bi: Float64Array, cr: Float64Array, ci: Float64Array): void {
  for (let j = 0; j < 4; j++) {
    const b0r = br[j], b0i = bi[j], b1r = br[4 + j], b1i = bi[4 + j], b2r = br[8 + j], b2i = bi[8 + j], b3r = br[12 + j], b3i = bi[12 + j];
    for (let i = 0; i < 16; i += 4) {
      const a0r = ar[i], a0i = ai[i], a1r = ar[i + 1], a1i = ai[i + 1], a2r = ar[i + 2], a2i = ai[i + 2], a3r = ar[i + 3], a3i = ai[i + 3];
      cr[i + j] = a0r * b0r - a0i * b0i + a1r * b1r - a1i * b1i + a2r * b2r - a2i * b2i + a3r * b3r - a3i * b3i;
      ci[i + j] = a0r * b0i + a0i * b0r + a1r * b1i + a1i * b1r + a2r * b2i + a2i * b2r + a3r * b3i + a3i * b3r;
    }
  }
}

/**
 * (omega - eps)^{-1} into (gr, gi), omega = energy + i eta, by Gauss–Jordan in place. eps is H00
 * plus retarded self-energies (anti-Hermitian part <= 0), so omega - eps has a positive definite
 * anti-Hermitian part (eta > 0): every leading block is invertible and no pivoting is needed
 * (times -i, its Hermitian part is positive definite). A pivot that is nevertheless tiny (rounding)
 * sends the matrix to the pivoting version.
 */
function resolvent(n: number, er: Float64Array, ei: Float64Array, energy: number, eta: number, gr: Float64Array, gi: Float64Array, piv: Int32Array): void {
  const nn = n * n;
  for (let i = 0; i < nn; i++) { gr[i] = -er[i]; gi[i] = -ei[i]; }
  for (let i = 0; i < n; i++) { gr[i * n + i] += energy; gi[i * n + i] += eta; }
  const small = 1e-8 * eta * eta;
  for (let k = 0; k < n; k++) {
    const rk = k * n;
    const pr = gr[rk + k], pi = gi[rk + k];
    const d = pr * pr + pi * pi;
    if (!(d > small)) {
      pivotedResolvent(n, er, ei, energy, eta, gr, gi, piv);
      return;
    }
    const ir = pr / d, ii = -pi / d;
    gr[rk + k] = 1; gi[rk + k] = 0;
    for (let j = 0; j < n; j++) {
      const xr = gr[rk + j], xi = gi[rk + j];
      gr[rk + j] = xr * ir - xi * ii;
      gi[rk + j] = xr * ii + xi * ir;
    }
    for (let i = 0; i < n; i++) {
      if (i === k) continue;
      const ri = i * n;
      const fr = gr[ri + k], fi = gi[ri + k];
      gr[ri + k] = 0; gi[ri + k] = 0;
      for (let j = 0; j < n; j++) {
        const yr = gr[rk + j], yi = gi[rk + j];
        gr[ri + j] -= fr * yr - fi * yi;
        gi[ri + j] -= fr * yi + fi * yr;
      }
    }
  }
}

/** The same with partial pivoting (rows swapped while eliminating, the inverse's columns swapped back). */
function pivotedResolvent(n: number, er: Float64Array, ei: Float64Array, energy: number, eta: number, gr: Float64Array, gi: Float64Array, piv: Int32Array): void {
  const nn = n * n;
  for (let i = 0; i < nn; i++) { gr[i] = -er[i]; gi[i] = -ei[i]; }
  for (let i = 0; i < n; i++) { gr[i * n + i] += energy; gi[i * n + i] += eta; }
  for (let k = 0; k < n; k++) {
    let p = k, best = -1;
    for (let i = k; i < n; i++) {
      const m = Math.abs(gr[i * n + k]) + Math.abs(gi[i * n + k]);
      if (m > best) { best = m; p = i; }
    }
    piv[k] = p;
    if (p !== k) {
      for (let j = 0; j < n; j++) {
        const a = k * n + j, b = p * n + j;
        let t = gr[a]; gr[a] = gr[b]; gr[b] = t;
        t = gi[a]; gi[a] = gi[b]; gi[b] = t;
      }
    }
    const pr = gr[k * n + k], pi = gi[k * n + k];
    const d = pr * pr + pi * pi;
    const ir = pr / d, ii = -pi / d;
    gr[k * n + k] = 1; gi[k * n + k] = 0;
    const rk = k * n;
    for (let j = 0; j < n; j++) {
      const xr = gr[rk + j], xi = gi[rk + j];
      gr[rk + j] = xr * ir - xi * ii;
      gi[rk + j] = xr * ii + xi * ir;
    }
    for (let i = 0; i < n; i++) {
      if (i === k) continue;
      const ri = i * n;
      const fr = gr[ri + k], fi = gi[ri + k];
      if (fr === 0 && fi === 0) continue;
      gr[ri + k] = 0; gi[ri + k] = 0;
      for (let j = 0; j < n; j++) {
        const yr = gr[rk + j], yi = gi[rk + j];
        gr[ri + j] -= fr * yr - fi * yi;
        gi[ri + j] -= fr * yi + fi * yr;
      }
    }
  }
  for (let k = n - 1; k >= 0; k--) {
    const p = piv[k];
    if (p === k) continue;
    for (let i = 0; i < n; i++) {
      const a = i * n + k, b = i * n + p;
      let t = gr[a]; gr[a] = gr[b]; gr[b] = t;
      t = gi[a]; gi[a] = gi[b]; gi[b] = t;
    }
  }
}
