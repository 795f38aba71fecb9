/**
 * Chern numbers by Fukui–Hatsugai–Suzuki link variables (J. Phys. Soc. Jpn. 74, 1674 (2005)),
 * non-Abelian (determinants of overlap matrices) so degenerate groups are handled.
 *
 * Sign convention (shared/references.md): A = i<u|grad u>, Omega = d1 A2 - d2 A1, so the Berry flux
 * through a plaquette is minus the phase of U1(k) U2(k+1) U1(k+2)* U2(k)*, and
 * C = (1/2pi) sum of fluxes; a1 x a2 < 0 flips the sign so C keeps the Cartesian orientation.
 */
import { checkInterrupt } from '../interrupt.js';
import { ModelError, valueText } from '../model/errors.js';
import {
  bandGroup, bisectLines, compileSource, embedding, formatK, FRAME_MEMORY, FrameSampler, orientation2D, resolvePlane, uniformLines,
  type Plane, type PlaneSpec, type TopologyChecks, type TopologyOptions, type TopologySource,
} from './common.js';
import { certifyGap } from '../spectra/certify.js';
import { certificateChecks, COARSE_PLAQUETTE_PHASE } from './checks.js';
import { determinantInPlace, overlapMatrix } from './links.js';

export interface ChernChecks extends TopologyChecks {
  /** Largest |Berry flux| through one plaquette; near pi the integer cannot be trusted. */
  maxPlaquettePhase?: number;
  /** True when the grid is too coarse (largest plaquette phase above pi/2, or a vanishing link). */
  coarse?: boolean;
  /** Automatic grid: true when the refinement reached every plaquette phase below pi/4 on a proven gap. */
  converged?: boolean;
}

export interface ChernOptions extends TopologyOptions {
  /** k-points per direction (one number or two), or 'auto' (default): refine until the integer is certain. */
  grid?: number | [number, number] | 'auto';
  /** For a 3D model: the slice k_normal = at (radians). */
  plane?: PlaneSpec;
  /** Most lines per direction 'auto' may use, for the gap proof and the sum alike. Default 512. */
  maxGrid?: number;
}

export interface ChernResult {
  kind: 'chern';
  /** The Chern number, or null when the group is gapless or the grid could not be made trustworthy. */
  chern: number | null;
  /** Band indices of the group, lowest and highest. */
  bands: [number, number];
  /** Reduced axes of the plane (2D: [0, 1]) and, for a 3D slice, the fixed momentum. */
  plane: { axes: [number, number]; at?: number; normal?: number };
  /**
   * The total Berry flux / 2pi before rounding (an integer up to rounding error when the grid is
   * sound), as a curvature map's `total`; null when no sum was made (the gap was not proven).
   */
  total: number | null;
  checks: ChernChecks;
}

/** Berry flux over a plane sampled on an n1 x n2 grid, with the diagnostics of its plaquettes. */
export interface PlaneFlux {
  /** Sum of plaquette fluxes (radians), in reduced orientation. */
  total: number;
  maxPhase: number;
  /** Smallest |det| of a link (normalised overlaps): near zero the link phase is meaningless. */
  minLink: number;
}

/**
 * Flux of the plaquettes of a grid over `plane` whose lines along each axis are `lines` (ascending,
 * within [-pi, pi), the last plaquette closing across the zone edge), whose lower edge
 * lies on rows `rows[0]` to `rows[1] - 1` along axis 2 (default all). With `map` (row-major, one
 * row of n1 per plaquette row, the first row at 0), each plaquette's flux is stored at its
 * lower-left corner. Only the k-points of those rows count towards the sampler's gap: the row
 * above the last one is sampled for its frames alone, so a split grid sees each k once. Two rows
 * of frames live at a time; nothing is allocated per k.
 */
export function planeFlux(
  sampler: FrameSampler, plane: Plane, lines: [Float64Array, Float64Array],
  map: Float64Array | null = null, rows: [number, number] = [0, lines[1].length],
): PlaneFlux {
  const [xs, ys] = lines;
  const n1 = xs.length, n2 = ys.length;
  const h = sampler.hamiltonian;
  const m = sampler.m;
  const n = sampler.n;
  const fl = sampler.frameLength;
  const [ax1, ax2] = plane.axes;
  const [lo, hi] = rows;
  const embed1 = embedding(h, ax1);
  const embed2 = embedding(h, ax2);
  // The whole grid closes on its own first row: keep it rather than sample it twice.
  const closes = lo === 0 && hi === n2;
  const row0 = closes ? new Float64Array(n1 * fl) : null;
  const link1Row0 = closes ? new Float64Array(2 * n1) : null;
  let cur = new Float64Array(n1 * fl);
  let next = new Float64Array(n1 * fl);
  let link1Cur = new Float64Array(2 * n1);
  let link1Next = new Float64Array(2 * n1);
  const link2 = new Float64Array(2 * n1);
  const scratch = new Float64Array(2 * m * m);
  const det = new Float64Array(2);
  const k = Float64Array.from(plane.origin);
  let minLink = Infinity;

  const link = (a: Float64Array, aOff: number, b: Float64Array, bOff: number, embed: Float64Array | null, out: Float64Array, at: number): void => {
    overlapMatrix(n, m, a, aOff, b, bOff, embed, scratch);
    determinantInPlace(m, scratch, det);
    out[at] = det[0];
    out[at + 1] = det[1];
    const mod = Math.hypot(det[0], det[1]);
    if (mod < minLink) minLink = mod;
  };
  const fillRow = (b: number, frames: Float64Array, links: Float64Array): void => {
    const own = b >= lo && b < hi;
    k[ax2] = ys[b];
    for (let a = 0; a < n1; a++) {
      k[ax1] = xs[a];
      sampler.sample(k, frames, a * fl, own);
    }
    for (let a = 0; a < n1; a++) {
      const last = a === n1 - 1;
      link(frames, a * fl, frames, last ? 0 : (a + 1) * fl, last ? embed1 : null, links, 2 * a);
    }
  };

  checkInterrupt();
  fillRow(lo, cur, link1Cur);
  if (row0 !== null && link1Row0 !== null) {
    row0.set(cur);
    link1Row0.set(link1Cur);
  }
  let total = 0;
  let maxPhase = 0;
  for (let b = lo; b < hi; b++) {
    checkInterrupt();
    const wrap = b === n2 - 1;
    const kept = wrap && row0 !== null && link1Row0 !== null;
    const upper = kept ? row0 : next;
    const upperLinks = kept ? link1Row0 : link1Next;
    if (!kept) fillRow(wrap ? 0 : b + 1, next, link1Next);
    for (let a = 0; a < n1; a++) link(cur, a * fl, upper, a * fl, wrap ? embed2 : null, link2, 2 * a);
    for (let a = 0; a < n1; a++) {
      const a1 = a === n1 - 1 ? 0 : a + 1;
      // U1(a,b) U2(a+1,b) conj(U1(a,b+1)) conj(U2(a,b))
      let pr = link1Cur[2 * a], pi = link1Cur[2 * a + 1];
      let xr = link2[2 * a1], xi = link2[2 * a1 + 1];
      let tr = pr * xr - pi * xi;
      let ti = pr * xi + pi * xr;
      xr = upperLinks[2 * a];
      xi = -upperLinks[2 * a + 1];
      pr = tr * xr - ti * xi;
      pi = tr * xi + ti * xr;
      xr = link2[2 * a];
      xi = -link2[2 * a + 1];
      tr = pr * xr - pi * xi;
      ti = pr * xi + pi * xr;
      const flux = -Math.atan2(ti, tr);
      total += flux;
      const mag = Math.abs(flux);
      if (mag > maxPhase) maxPhase = mag;
      if (map !== null) map[(b - lo) * n1 + a] = flux;
    }
    if (!kept) {
      const t = cur;
      cur = next;
      next = t;
      const tl = link1Cur;
      link1Cur = link1Next;
      link1Next = tl;
    }
  }
  // Links are products of m overlaps of unit vectors; normalise the smallest to [0, 1].
  return { total, maxPhase, minLink: Math.min(1, minLink) };
}

function resolveGridOption(grid: ChernOptions['grid'], field = 'grid'): [number, number] | 'auto' {
  if (grid === undefined || grid === 'auto') return 'auto';
  const pair = typeof grid === 'number' ? [grid, grid] : grid;
  if (!Array.isArray(pair) || pair.length !== 2) throw new ModelError(field, `expected a number of k-points, two numbers, or "auto". Value: ${valueText(grid)}`);
  pair.forEach((x, i) => {
    if (!Number.isInteger(x) || x < 3 || x > 100_000) throw new ModelError(typeof grid === 'number' ? field : `${field}[${i}]`, `expected a whole number of k-points from 3 to 100000. Value: ${valueText(x)}`);
  });
  return [pair[0], pair[1]];
}

const AUTO_START = 16;

/**
 * Largest plaquette phase accepted on an automatic grid: half the coarse limit, a margin for what
 * the samples cannot see.
 */
export const CERTAIN_PLAQUETTE_PHASE = Math.PI / 4;

/**
 * Chern number of a band group of a 2D model, or of a 2D slice of a 3D model.
 *
 * The gap is proven over the whole plane first (spectra/certify.ts); without that proof the result
 * is null, with checks.gapless and where the bands touch, or with the reason the proof failed. With
 * grid 'auto' (default) the Fukui–Hatsugai–Suzuki sum then runs on the certificate's lines, which
 * are dense where the gap is small, and plaquettes whose phase exceeds pi/4 are bisected until none
 * does. An explicit grid is used as given (the gap is still proven; a plaquette phase above pi/2
 * is flagged coarse).
 */
export function chernNumber(source: TopologySource, options: ChernOptions = {}): ChernResult {
  const h = compileSource(source, options);
  const plane = resolvePlane(h.dim, options.plane);
  const group = bandGroup(options.bands, h.size);
  const grid = resolveGridOption(options.grid);
  // An automatic sum runs on the gap proof's own lines: the frames solved for the proof are kept.
  const sampler = grid === 'auto' ? new FrameSampler(h, group).remember(FRAME_MEMORY) : new FrameSampler(h, group);
  const maxGrid = options.maxGrid ?? 512;
  if (!Number.isInteger(maxGrid) || maxGrid < AUTO_START) throw new ModelError('maxGrid', `expected a whole number of at least ${AUTO_START}. Value: ${valueText(maxGrid)}`);
  const sign = h.dim === 2 ? orientation2D(h.spec) : 1;
  const planeInfo = h.dim === 2 ? { axes: plane.axes } : { axes: plane.axes, normal: options.plane!.normal, at: options.plane!.at };
  const what = 'the Chern number';
  const cert = certifyGap(h, group, { axes: plane.axes, origin: plane.origin }, {
    tolerance: options.gapTolerance, start: AUTO_START, maxLines: maxGrid,
    ...(grid === 'auto' ? { solve: (k: Float64Array) => sampler.sample(k, undefined, 0, false) } : {}),
  });
  const result = (c: number | null, checks: ChernChecks, integer: boolean): ChernResult => ({
    kind: 'chern', chern: integer && c !== null ? Math.round(c) + 0 : null, bands: [group.lo, group.hi], plane: planeInfo, total: c, checks,
  });

  if (grid !== 'auto') {
    const [n1, n2] = grid;
    const flux = planeFlux(sampler, plane, [uniformLines(n1), uniformLines(n2)]);
    const checks: ChernChecks = certificateChecks(cert, group, [n1, n2], what);
    checks.maxPlaquettePhase = flux.maxPhase;
    if (cert.verdict === 'gapped' && (flux.maxPhase > COARSE_PLAQUETTE_PHASE || flux.minLink < 1e-6)) {
      checks.coarse = true;
      checks.warnings.push(
        `grid ${n1}x${n2} is too coarse to trust: largest plaquette phase ${flux.maxPhase.toFixed(3)} rad ` +
          `(limit pi/2), smallest link modulus ${flux.minLink.toExponential(2)}; smallest gap ${cert.minGap.toExponential(2)} at k = ${formatK(cert.minGapAt)}`,
      );
    }
    return result((sign * flux.total) / (2 * Math.PI), checks, cert.verdict === 'gapped');
  }
  if (cert.verdict !== 'gapped') {
    const checks: ChernChecks = certificateChecks(cert, group, cert.positions.map((p) => p.length - 1), what);
    checks.converged = false;
    return result(null, checks, false);
  }
  // The certificate's lines include both ends of [-pi, pi]; the plane closes on itself.
  let xs = cert.positions[0].subarray(0, -1);
  let ys = cert.positions[1].subarray(0, -1);
  for (;;) {
    const map = new Float64Array(xs.length * ys.length);
    const flux = planeFlux(sampler, plane, [xs, ys], map);
    const checks: ChernChecks = certificateChecks(cert, group, [xs.length, ys.length], what);
    checks.maxPlaquettePhase = flux.maxPhase;
    const c = (sign * flux.total) / (2 * Math.PI);
    const markX = new Uint8Array(xs.length), markY = new Uint8Array(ys.length);
    let bad = 0;
    for (let b = 0; b < ys.length; b++) {
      for (let a = 0; a < xs.length; a++) {
        if (Math.abs(map[b * xs.length + a]) > CERTAIN_PLAQUETTE_PHASE) {
          markX[a] = 1;
          markY[b] = 1;
          bad++;
        }
      }
    }
    if (bad === 0 && flux.minLink > 1e-6) {
      checks.converged = true;
      checks.certified = true;
      return result(c, checks, true);
    }
    xs = bisectLines(xs, markX, Math.PI);
    ys = bisectLines(ys, markY, Math.PI);
    if (bad === 0 || xs.length > maxGrid || ys.length > maxGrid) {
      checks.converged = false;
      checks.warnings.push(
        `no certain integer within ${maxGrid} lines per direction (maxGrid): ${bad} plaquettes still turn by more than pi/4 ` +
          `(largest ${flux.maxPhase.toFixed(3)} rad), smallest link modulus ${flux.minLink.toExponential(2)}; last estimate ${c.toFixed(3)}`,
      );
      return result(c, checks, false);
    }
  }
}
