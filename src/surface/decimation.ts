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
 * until every element of alpha and beta is below `tolerance` (1e-8) times the energy scale (the largest
 * element of H00 and H01). Then G = (omega - eps_x)^{-1}:
 * - 'bottom': the sample occupies layers 0, 1, 2, ... (its surface faces -A_d; a ribbon's layer-0
 *   edge, `edges.first`);
 * - 'top': the sample occupies ..., -2, -1, 0 (its surface faces +A_d; a ribbon's last edge);
 * - 'bulk': one principal layer of the infinite crystal.
 *
 * Matrices are split re/im, row-major, sized n = the principal layer's orbitals (2 to 8 typically):
 * the class owns every buffer, nothing is allocated per solve. A 4-orbital layer (the commonest
 * multi-orbital case) has its own code: one fused step, a 2 x 2 block inverse, every complex
 * number in locals; about 2.4 times numpy's vectorised decimation on the bench (bench/surface.ts).
 */
import type { SplitMatrix } from './layers.js';

/** Steps taken when the tolerance is never met (2^60 layers: only a vanishing eta needs more). */
export const DECIMATION_MAX_STEPS = 60;
/** Couplings below this times the energy scale end the iteration. */
export const DECIMATION_TOLERANCE = 1e-8;

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
  /** Bulk, bottom- and top-surface onsite blocks, couplings alpha and beta, g, alpha g, beta g. */
  readonly epsR: Float64Array; readonly epsI: Float64Array;
  readonly botR: Float64Array; readonly botI: Float64Array;
  readonly topR: Float64Array; readonly topI: Float64Array;
  readonly aR: Float64Array; readonly aI: Float64Array;
  readonly bR: Float64Array; readonly bI: Float64Array;
  readonly gR: Float64Array; readonly gI: Float64Array;
  readonly agR: Float64Array; readonly agI: Float64Array;
  readonly bgR: Float64Array; readonly bgI: Float64Array;
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
      if (n === 4) {
        if (step4(this) <= limit) {
          steps = s + 1;
          break;
        }
        continue;
      }
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
    if (n === 4) {
      const t = imTraceInverse4(er, ei, energy, eta);
      if (!Number.isNaN(t)) return -t / Math.PI;
    }
    resolvent(n, er, ei, energy, eta, this.gR, this.gI, this.pivots);
    let tr = 0;
    for (let i = 0; i < n; i++) tr += this.gI[i * n + i];
    return -tr / Math.PI;
  }
}

/**
 * One decimation step after g for a 4 x 4 layer, fused: alpha g and beta g, then per column j of
 * alpha and beta (held in registers) the four products with the rows of alpha g and beta g, added
 * into the surfaces and the bulk as they come; alpha and beta are overwritten column by column,
 * which is safe because column j is read before it is written and no other column needs it.
 * Returns the largest |re| + |im| summed over the new alpha and beta elements at one position.
 */
function step4(d: Decimation): number {
  const { aR, aI, bR, bI, gR, gI, agR, agI, bgR, bgI, epsR, epsI, botR, botI, topR, topI } = d;
  for (let j = 0; j < 4; j++) {
    const g0r = gR[j], g0i = gI[j], g1r = gR[4 + j], g1i = gI[4 + j], g2r = gR[8 + j], g2i = gI[8 + j], g3r = gR[12 + j], g3i = gI[12 + j];
    for (let i = 0; i < 16; i += 4) {
      let x0r = aR[i], x0i = aI[i], x1r = aR[i + 1], x1i = aI[i + 1], x2r = aR[i + 2], x2i = aI[i + 2], x3r = aR[i + 3], x3i = aI[i + 3];
      agR[i + j] = x0r * g0r - x0i * g0i + x1r * g1r - x1i * g1i + x2r * g2r - x2i * g2i + x3r * g3r - x3i * g3i;
      agI[i + j] = x0r * g0i + x0i * g0r + x1r * g1i + x1i * g1r + x2r * g2i + x2i * g2r + x3r * g3i + x3i * g3r;
      x0r = bR[i]; x0i = bI[i]; x1r = bR[i + 1]; x1i = bI[i + 1]; x2r = bR[i + 2]; x2i = bI[i + 2]; x3r = bR[i + 3]; x3i = bI[i + 3];
      bgR[i + j] = x0r * g0r - x0i * g0i + x1r * g1r - x1i * g1i + x2r * g2r - x2i * g2i + x3r * g3r - x3i * g3i;
      bgI[i + j] = x0r * g0i + x0i * g0r + x1r * g1i + x1i * g1r + x2r * g2i + x2i * g2r + x3r * g3i + x3i * g3r;
    }
  }
  let big = 0;
  for (let j = 0; j < 4; j++) {
    const a0r = aR[j], a0i = aI[j], a1r = aR[4 + j], a1i = aI[4 + j], a2r = aR[8 + j], a2i = aI[8 + j], a3r = aR[12 + j], a3i = aI[12 + j];
    const b0r = bR[j], b0i = bI[j], b1r = bR[4 + j], b1i = bI[4 + j], b2r = bR[8 + j], b2i = bI[8 + j], b3r = bR[12 + j], b3i = bI[12 + j];
    for (let i = 0; i < 16; i += 4) {
      const p0r = agR[i], p0i = agI[i], p1r = agR[i + 1], p1i = agI[i + 1], p2r = agR[i + 2], p2i = agI[i + 2], p3r = agR[i + 3], p3i = agI[i + 3];
      const q0r = bgR[i], q0i = bgI[i], q1r = bgR[i + 1], q1i = bgI[i + 1], q2r = bgR[i + 2], q2i = bgI[i + 2], q3r = bgR[i + 3], q3i = bgI[i + 3];
      // alpha g beta (x), alpha g alpha (y), beta g alpha (u), beta g beta (v) at (i, j).
      const xr = p0r * b0r - p0i * b0i + p1r * b1r - p1i * b1i + p2r * b2r - p2i * b2i + p3r * b3r - p3i * b3i;
      const xi = p0r * b0i + p0i * b0r + p1r * b1i + p1i * b1r + p2r * b2i + p2i * b2r + p3r * b3i + p3i * b3r;
      const yr = p0r * a0r - p0i * a0i + p1r * a1r - p1i * a1i + p2r * a2r - p2i * a2i + p3r * a3r - p3i * a3i;
      const yi = p0r * a0i + p0i * a0r + p1r * a1i + p1i * a1r + p2r * a2i + p2i * a2r + p3r * a3i + p3i * a3r;
      const ur = q0r * a0r - q0i * a0i + q1r * a1r - q1i * a1i + q2r * a2r - q2i * a2i + q3r * a3r - q3i * a3i;
      const ui = q0r * a0i + q0i * a0r + q1r * a1i + q1i * a1r + q2r * a2i + q2i * a2r + q3r * a3i + q3i * a3r;
      const vr = q0r * b0r - q0i * b0i + q1r * b1r - q1i * b1i + q2r * b2r - q2i * b2i + q3r * b3r - q3i * b3i;
      const vi = q0r * b0i + q0i * b0r + q1r * b1i + q1i * b1r + q2r * b2i + q2i * b2r + q3r * b3i + q3i * b3r;
      const at = i + j;
      botR[at] += xr; botI[at] += xi;
      topR[at] += ur; topI[at] += ui;
      epsR[at] += xr + ur; epsI[at] += xi + ui;
      aR[at] = yr; aI[at] = yi;
      bR[at] = vr; bI[at] = vi;
      const ay = Math.max(Math.abs(yr), Math.abs(yi), Math.abs(vr), Math.abs(vi));
      if (ay > big) big = ay;
    }
  }
  return big;
}

/**
 * c = a b (n x n, split re/im; c must not alias a or b). Sums stay in registers; for even n, 2 x 2
 * blocks of c at a time, so each loaded element serves two products (1.6x faster at n = 4).
 */
function multiply(n: number, ar: Float64Array, ai: Float64Array, br: Float64Array, bi: Float64Array, cr: Float64Array, ci: Float64Array): void {
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
  if (n === 4 && invert4(gr, gi, small)) return;
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

/**
 * 4 x 4 inverse in place by 2 x 2 blocks, M = [[P, Q], [R, S]]: with X = P^-1 Q, Y = R P^-1 and
 * the Schur complement Z = S - R X, M^-1 = [[P^-1 + X Z^-1 Y, -X Z^-1], [-Z^-1 Y, Z^-1]]. The same
 * argument as for Gauss–Jordan without pivoting makes P and Z invertible; false (nothing written)
 * when a determinant is nevertheless tiny. Every complex number stays in a local (re, im) pair.
 */
function invert4(gr: Float64Array, gi: Float64Array, small: number): boolean {
  const p00r = gr[0], p00i = gi[0];
  const p01r = gr[1], p01i = gi[1];
  const q00r = gr[2], q00i = gi[2];
  const q01r = gr[3], q01i = gi[3];
  const p10r = gr[4], p10i = gi[4];
  const p11r = gr[5], p11i = gi[5];
  const q10r = gr[6], q10i = gi[6];
  const q11r = gr[7], q11i = gi[7];
  const r00r = gr[8], r00i = gi[8];
  const r01r = gr[9], r01i = gi[9];
  const s00r = gr[10], s00i = gi[10];
  const s01r = gr[11], s01i = gi[11];
  const r10r = gr[12], r10i = gi[12];
  const r11r = gr[13], r11i = gi[13];
  const s10r = gr[14], s10i = gi[14];
  const s11r = gr[15], s11i = gi[15];
  let dr = p00r * p11r - p00i * p11i - (p01r * p10r - p01i * p10i), di = p00r * p11i + p00i * p11r - (p01r * p10i + p01i * p10r);
  let m = dr * dr + di * di;
  if (!(m > small * small)) return false;
  let ir = dr / m, ii = -di / m;
  const t00r = p11r * ir - p11i * ii, t00i = p11r * ii + p11i * ir;
  const t01r = -(p01r * ir - p01i * ii), t01i = -(p01r * ii + p01i * ir);
  const t10r = -(p10r * ir - p10i * ii), t10i = -(p10r * ii + p10i * ir);
  const t11r = p00r * ir - p00i * ii, t11i = p00r * ii + p00i * ir;
  const x00r = t00r * q00r - t00i * q00i + t01r * q10r - t01i * q10i, x00i = t00r * q00i + t00i * q00r + t01r * q10i + t01i * q10r;
  const x01r = t00r * q01r - t00i * q01i + t01r * q11r - t01i * q11i, x01i = t00r * q01i + t00i * q01r + t01r * q11i + t01i * q11r;
  const x10r = t10r * q00r - t10i * q00i + t11r * q10r - t11i * q10i, x10i = t10r * q00i + t10i * q00r + t11r * q10i + t11i * q10r;
  const x11r = t10r * q01r - t10i * q01i + t11r * q11r - t11i * q11i, x11i = t10r * q01i + t10i * q01r + t11r * q11i + t11i * q11r;
  const y00r = r00r * t00r - r00i * t00i + r01r * t10r - r01i * t10i, y00i = r00r * t00i + r00i * t00r + r01r * t10i + r01i * t10r;
  const y01r = r00r * t01r - r00i * t01i + r01r * t11r - r01i * t11i, y01i = r00r * t01i + r00i * t01r + r01r * t11i + r01i * t11r;
  const y10r = r10r * t00r - r10i * t00i + r11r * t10r - r11i * t10i, y10i = r10r * t00i + r10i * t00r + r11r * t10i + r11i * t10r;
  const y11r = r10r * t01r - r10i * t01i + r11r * t11r - r11i * t11i, y11i = r10r * t01i + r10i * t01r + r11r * t11i + r11i * t11r;
  const z00r = s00r - (r00r * x00r - r00i * x00i + r01r * x10r - r01i * x10i), z00i = s00i - (r00r * x00i + r00i * x00r + r01r * x10i + r01i * x10r);
  const z01r = s01r - (r00r * x01r - r00i * x01i + r01r * x11r - r01i * x11i), z01i = s01i - (r00r * x01i + r00i * x01r + r01r * x11i + r01i * x11r);
  const z10r = s10r - (r10r * x00r - r10i * x00i + r11r * x10r - r11i * x10i), z10i = s10i - (r10r * x00i + r10i * x00r + r11r * x10i + r11i * x10r);
  const z11r = s11r - (r10r * x01r - r10i * x01i + r11r * x11r - r11i * x11i), z11i = s11i - (r10r * x01i + r10i * x01r + r11r * x11i + r11i * x11r);
  dr = z00r * z11r - z00i * z11i - (z01r * z10r - z01i * z10i); di = z00r * z11i + z00i * z11r - (z01r * z10i + z01i * z10r);
  m = dr * dr + di * di;
  if (!(m > small * small)) return false;
  ir = dr / m; ii = -di / m;
  const w00r = z11r * ir - z11i * ii, w00i = z11r * ii + z11i * ir;
  const w01r = -(z01r * ir - z01i * ii), w01i = -(z01r * ii + z01i * ir);
  const w10r = -(z10r * ir - z10i * ii), w10i = -(z10r * ii + z10i * ir);
  const w11r = z00r * ir - z00i * ii, w11i = z00r * ii + z00i * ir;
  const u00r = -(x00r * w00r - x00i * w00i + x01r * w10r - x01i * w10i), u00i = -(x00r * w00i + x00i * w00r + x01r * w10i + x01i * w10r);
  const u01r = -(x00r * w01r - x00i * w01i + x01r * w11r - x01i * w11i), u01i = -(x00r * w01i + x00i * w01r + x01r * w11i + x01i * w11r);
  const u10r = -(x10r * w00r - x10i * w00i + x11r * w10r - x11i * w10i), u10i = -(x10r * w00i + x10i * w00r + x11r * w10i + x11i * w10r);
  const u11r = -(x10r * w01r - x10i * w01i + x11r * w11r - x11i * w11i), u11i = -(x10r * w01i + x10i * w01r + x11r * w11i + x11i * w11r);
  const v00r = -(w00r * y00r - w00i * y00i + w01r * y10r - w01i * y10i), v00i = -(w00r * y00i + w00i * y00r + w01r * y10i + w01i * y10r);
  const v01r = -(w00r * y01r - w00i * y01i + w01r * y11r - w01i * y11i), v01i = -(w00r * y01i + w00i * y01r + w01r * y11i + w01i * y11r);
  const v10r = -(w10r * y00r - w10i * y00i + w11r * y10r - w11i * y10i), v10i = -(w10r * y00i + w10i * y00r + w11r * y10i + w11i * y10r);
  const v11r = -(w10r * y01r - w10i * y01i + w11r * y11r - w11i * y11i), v11i = -(w10r * y01i + w10i * y01r + w11r * y11i + w11i * y11r);
  const e00r = t00r - (x00r * v00r - x00i * v00i + x01r * v10r - x01i * v10i), e00i = t00i - (x00r * v00i + x00i * v00r + x01r * v10i + x01i * v10r);
  const e01r = t01r - (x00r * v01r - x00i * v01i + x01r * v11r - x01i * v11i), e01i = t01i - (x00r * v01i + x00i * v01r + x01r * v11i + x01i * v11r);
  const e10r = t10r - (x10r * v00r - x10i * v00i + x11r * v10r - x11i * v10i), e10i = t10i - (x10r * v00i + x10i * v00r + x11r * v10i + x11i * v10r);
  const e11r = t11r - (x10r * v01r - x10i * v01i + x11r * v11r - x11i * v11i), e11i = t11i - (x10r * v01i + x10i * v01r + x11r * v11i + x11i * v11r);
  gr[0] = e00r; gi[0] = e00i;
  gr[1] = e01r; gi[1] = e01i;
  gr[2] = u00r; gi[2] = u00i;
  gr[3] = u01r; gi[3] = u01i;
  gr[4] = e10r; gi[4] = e10i;
  gr[5] = e11r; gi[5] = e11i;
  gr[6] = u10r; gi[6] = u10i;
  gr[7] = u11r; gi[7] = u11i;
  gr[8] = v00r; gi[8] = v00i;
  gr[9] = v01r; gi[9] = v01i;
  gr[10] = w00r; gi[10] = w00i;
  gr[11] = w01r; gi[11] = w01i;
  gr[12] = v10r; gi[12] = v10i;
  gr[13] = v11r; gi[13] = v11i;
  gr[14] = w10r; gi[14] = w10i;
  gr[15] = w11r; gi[15] = w11i;
  return true;
}

/**
 * Im Tr (omega - eps)^{-1} for 4 x 4 by the blocks of invert4: Tr M^-1 = Tr P^-1 + Tr Z^-1 (1 + Y X),
 * only the traces needed. NaN when a block's determinant is tiny (the caller then inverts in full).
 */
function imTraceInverse4(er: Float64Array, ei: Float64Array, energy: number, eta: number): number {
  const small = 1e-8 * eta * eta;
  const p00r = energy - er[0], p00i = eta - ei[0];
  const p01r = -er[1], p01i = -ei[1];
  const q00r = -er[2], q00i = -ei[2];
  const q01r = -er[3], q01i = -ei[3];
  const p10r = -er[4], p10i = -ei[4];
  const p11r = energy - er[5], p11i = eta - ei[5];
  const q10r = -er[6], q10i = -ei[6];
  const q11r = -er[7], q11i = -ei[7];
  const r00r = -er[8], r00i = -ei[8];
  const r01r = -er[9], r01i = -ei[9];
  const s00r = energy - er[10], s00i = eta - ei[10];
  const s01r = -er[11], s01i = -ei[11];
  const r10r = -er[12], r10i = -ei[12];
  const r11r = -er[13], r11i = -ei[13];
  const s10r = -er[14], s10i = -ei[14];
  const s11r = energy - er[15], s11i = eta - ei[15];
  let dr = p00r * p11r - p00i * p11i - (p01r * p10r - p01i * p10i), di = p00r * p11i + p00i * p11r - (p01r * p10i + p01i * p10r);
  let m = dr * dr + di * di;
  if (!(m > small * small)) return NaN;
  let ir = dr / m, ii = -di / m;
  const t00r = p11r * ir - p11i * ii, t00i = p11r * ii + p11i * ir;
  const t01r = -(p01r * ir - p01i * ii), t01i = -(p01r * ii + p01i * ir);
  const t10r = -(p10r * ir - p10i * ii), t10i = -(p10r * ii + p10i * ir);
  const t11r = p00r * ir - p00i * ii, t11i = p00r * ii + p00i * ir;
  const x00r = t00r * q00r - t00i * q00i + t01r * q10r - t01i * q10i, x00i = t00r * q00i + t00i * q00r + t01r * q10i + t01i * q10r;
  const x01r = t00r * q01r - t00i * q01i + t01r * q11r - t01i * q11i, x01i = t00r * q01i + t00i * q01r + t01r * q11i + t01i * q11r;
  const x10r = t10r * q00r - t10i * q00i + t11r * q10r - t11i * q10i, x10i = t10r * q00i + t10i * q00r + t11r * q10i + t11i * q10r;
  const x11r = t10r * q01r - t10i * q01i + t11r * q11r - t11i * q11i, x11i = t10r * q01i + t10i * q01r + t11r * q11i + t11i * q11r;
  const y00r = r00r * t00r - r00i * t00i + r01r * t10r - r01i * t10i, y00i = r00r * t00i + r00i * t00r + r01r * t10i + r01i * t10r;
  const y01r = r00r * t01r - r00i * t01i + r01r * t11r - r01i * t11i, y01i = r00r * t01i + r00i * t01r + r01r * t11i + r01i * t11r;
  const y10r = r10r * t00r - r10i * t00i + r11r * t10r - r11i * t10i, y10i = r10r * t00i + r10i * t00r + r11r * t10i + r11i * t10r;
  const y11r = r10r * t01r - r10i * t01i + r11r * t11r - r11i * t11i, y11i = r10r * t01i + r10i * t01r + r11r * t11i + r11i * t11r;
  const z00r = s00r - (r00r * x00r - r00i * x00i + r01r * x10r - r01i * x10i), z00i = s00i - (r00r * x00i + r00i * x00r + r01r * x10i + r01i * x10r);
  const z01r = s01r - (r00r * x01r - r00i * x01i + r01r * x11r - r01i * x11i), z01i = s01i - (r00r * x01i + r00i * x01r + r01r * x11i + r01i * x11r);
  const z10r = s10r - (r10r * x00r - r10i * x00i + r11r * x10r - r11i * x10i), z10i = s10i - (r10r * x00i + r10i * x00r + r11r * x10i + r11i * x10r);
  const z11r = s11r - (r10r * x01r - r10i * x01i + r11r * x11r - r11i * x11i), z11i = s11i - (r10r * x01i + r10i * x01r + r11r * x11i + r11i * x11r);
  dr = z00r * z11r - z00i * z11i - (z01r * z10r - z01i * z10i); di = z00r * z11i + z00i * z11r - (z01r * z10i + z01i * z10r);
  m = dr * dr + di * di;
  if (!(m > small * small)) return NaN;
  ir = dr / m; ii = -di / m;
  const w00r = z11r * ir - z11i * ii, w00i = z11r * ii + z11i * ir;
  const w01r = -(z01r * ir - z01i * ii), w01i = -(z01r * ii + z01i * ir);
  const w10r = -(z10r * ir - z10i * ii), w10i = -(z10r * ii + z10i * ir);
  const w11r = z00r * ir - z00i * ii, w11i = z00r * ii + z00i * ir;
  const c00r = y00r * x00r - y00i * x00i + y01r * x10r - y01i * x10i, c00i = y00r * x00i + y00i * x00r + y01r * x10i + y01i * x10r;
  const c01r = y00r * x01r - y00i * x01i + y01r * x11r - y01i * x11i, c01i = y00r * x01i + y00i * x01r + y01r * x11i + y01i * x11r;
  const c10r = y10r * x00r - y10i * x00i + y11r * x10r - y11i * x10i, c10i = y10r * x00i + y10i * x00r + y11r * x10i + y11i * x10r;
  const c11r = y10r * x01r - y10i * x01i + y11r * x11r - y11i * x11i, c11i = y10r * x01i + y10i * x01r + y11r * x11i + y11i * x11r;
  return t00i + t11i + w00i + w11i + w00r * c00i + w00i * c00r + w01r * c10i + w01i * c10r + w10r * c01i + w10i * c01r + w11r * c11i + w11i * c11r;
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
