/**
 * Berry (Zak) phase of a band group along a closed loop in k, non-Abelian: the Wilson loop
 * W = M(0,1) M(1,2) ... M(N-1,N) of overlap matrices, gamma = -Im ln det W (A = i<u|grad u>, so
 * gamma = loop integral of A). In the 'orbital' convention a loop that advances by a reciprocal
 * vector G closes through the embedding e^{-iG·r} (see `embeddingFor`). The result names its
 * convention: the phase of the same loop differs between the two by 2pi times the orbital positions.
 */
import { checkInterrupt } from '../interrupt.js';
import { multiply } from '../linalg/cmatrix.js';
import { ModelError, valueText } from '../model/errors.js';
import {
  bandGroup, compileSource, embeddingFor, formatK, FrameSampler,
  type TopologyChecks, type TopologyOptions, type TopologySource,
} from './common.js';
import { determinantInPlace, fraction, overlapMatrix, UnitaryPhases, wrapAngle } from './links.js';
import { COARSE_LINK } from './checks.js';

export interface BerryPhaseOptions extends TopologyOptions {
  /**
   * The loop: reduced momenta (radians) in order; it closes from the last point back to the first
   * shifted by `wraps` reciprocal vectors. Default for a 1D model: the whole zone, -pi to pi.
   */
  loop?: number[][];
  /** Reciprocal vectors (integers per periodic direction) the loop advances by; default 0 (1 for the default zone loop). */
  wraps?: number[];
  /** Points of the default zone loop of a 1D model; default 'auto' (doubled until the phase is stable to 1e-8). */
  points?: number | 'auto';
}

export interface BerryPhaseChecks extends TopologyChecks {
  /** Smallest link modulus along the loop; below 0.9 the loop is sampled too coarsely. */
  minLink: number;
  /** Zone loop, automatic points: change of the phase at the last doubling (radians). */
  change?: number;
  coarse?: boolean;
}

export interface BerryPhaseResult {
  kind: 'berry-phase';
  convention: 'lattice' | 'orbital';
  bands: [number, number];
  /** gamma = -Im ln det W in (-pi, pi], null when the group is gapless on the loop. */
  phase: number | null;
  /** Eigenphases of W, each band's share (radians), and the Wannier centres -phase/2pi mod 1. */
  phases: Float64Array;
  centres: Float64Array;
  /** gamma/2pi mod 1, in [0, 1): the polarization (in units of e times the lattice constant) of a 1D chain. */
  polarization: number | null;
  points: number;
  checks: BerryPhaseChecks;
}

function checkLoop(loop: unknown, dim: number): number[][] {
  if (!Array.isArray(loop) || loop.length < 3) throw new ModelError('loop', `expected at least 3 momenta. Value: ${valueText(loop)}`);
  loop.forEach((k, i) => {
    if (!Array.isArray(k) || k.length !== dim || !k.every((x) => typeof x === 'number' && Number.isFinite(x))) {
      throw new ModelError(`loop[${i}]`, `expected ${dim} finite reduced momenta (radians). Value: ${valueText(k)}`);
    }
  });
  return loop as number[][];
}

function checkWraps(wraps: unknown, dim: number): number[] {
  if (!Array.isArray(wraps) || wraps.length !== dim || !wraps.every((x) => Number.isInteger(x))) {
    throw new ModelError('wraps', `expected ${dim} integers. Value: ${valueText(wraps)}`);
  }
  return wraps as number[];
}

interface LoopProduct {
  det: [number, number];
  minLink: number;
}

/** W along the loop (points as a flat array of dim-vectors) into `w`. */
function loopProduct(sampler: FrameSampler, points: Float64Array, count: number, embed: Float64Array | null, w: Float64Array): LoopProduct {
  const { n, m, frameLength: fl } = sampler;
  const dim = sampler.hamiltonian.dim;
  const frames = new Float64Array(count * fl);
  const k = new Float64Array(dim);
  for (let j = 0; j < count; j++) {
    if (j % 256 === 0) checkInterrupt();
    for (let i = 0; i < dim; i++) k[i] = points[j * dim + i];
    sampler.sample(k, frames, j * fl);
  }
  const link = new Float64Array(2 * m * m);
  const tmp = new Float64Array(2 * m * m);
  const det = new Float64Array(2);
  w.fill(0);
  for (let i = 0; i < m; i++) w[2 * (i * m + i)] = 1;
  let minLink = Infinity;
  for (let j = 0; j < count; j++) {
    const last = j === count - 1;
    overlapMatrix(n, m, frames, j * fl, frames, last ? 0 : (j + 1) * fl, last ? embed : null, link);
    tmp.set(link);
    determinantInPlace(m, tmp, det);
    minLink = Math.min(minLink, Math.hypot(det[0], det[1]));
    multiply(m, w, link, tmp);
    w.set(tmp);
  }
  tmp.set(w);
  determinantInPlace(m, tmp, det);
  return { det: [det[0], det[1]], minLink: Math.min(1, minLink) };
}

/** Berry phase of a band group around a closed loop (default: the Zak phase of a 1D chain). */
export function berryPhase(source: TopologySource, options: BerryPhaseOptions = {}): BerryPhaseResult {
  const h = compileSource(source, options);
  const dim = h.dim;
  const group = bandGroup(options.bands, h.size);
  const sampler = new FrameSampler(h, group);
  const m = sampler.m;
  const w = new Float64Array(2 * m * m);
  let product: LoopProduct;
  let count: number;
  let change: number | undefined;
  if (options.loop === undefined) {
    if (dim !== 1) throw new ModelError('loop', `a ${dim}D model needs an explicit loop (reduced momenta, radians) and its wraps`);
    const zoneLoop = (N: number): LoopProduct => {
      const pts = new Float64Array(N);
      for (let j = 0; j < N; j++) pts[j] = -Math.PI + (2 * Math.PI * j) / N;
      return loopProduct(sampler, pts, N, embeddingFor(h, [1]), w);
    };
    const requested = options.points ?? 'auto';
    if (requested === 'auto') {
      count = 64;
      product = zoneLoop(count);
      for (;;) {
        const finer = zoneLoop(2 * count);
        const delta = Math.abs(wrapAngle(Math.atan2(finer.det[1], finer.det[0]) - Math.atan2(product.det[1], product.det[0])));
        product = finer;
        count *= 2;
        change = delta;
        if (delta < 1e-8 || count >= 8192) break;
      }
    } else {
      if (!Number.isInteger(requested) || requested < 3 || requested > 1_000_000) throw new ModelError('points', `expected a whole number from 3 to 1000000 or "auto". Value: ${valueText(requested)}`);
      count = requested;
      product = zoneLoop(count);
    }
  } else {
    const loop = checkLoop(options.loop, dim);
    const wraps = options.wraps === undefined ? new Array<number>(dim).fill(0) : checkWraps(options.wraps, dim);
    count = loop.length;
    product = loopProduct(sampler, Float64Array.from(loop.flat()), count, embeddingFor(h, wraps), w);
  }

  const checks = sampler.gapChecks([count], options.gapTolerance, 'the Berry phase') as BerryPhaseChecks;
  checks.minLink = product.minLink;
  if (change !== undefined) checks.change = change;
  if (!checks.gapless && product.minLink < COARSE_LINK) {
    checks.coarse = true;
    checks.warnings.push(`loop of ${count} points is too coarse: smallest link modulus ${product.minLink.toFixed(3)} (limit ${COARSE_LINK}); smallest gap ${sampler.minGap.toExponential(2)} at k = ${formatK(sampler.minGapAt)}`);
  }
  if (change !== undefined && change >= 1e-8) checks.warnings.push(`the phase still changed by ${change.toExponential(2)} rad at ${count} points`);
  const phases = new Float64Array(m);
  new UnitaryPhases(m).solve(w, phases);
  for (let i = 0; i < m; i++) phases[i] = -phases[i];
  const centres = phases.map((p) => fraction(p / (2 * Math.PI)));
  const gamma = wrapAngle(-Math.atan2(product.det[1], product.det[0]));
  return {
    kind: 'berry-phase',
    convention: h.convention,
    bands: [group.lo, group.hi],
    phase: checks.gapless ? null : gamma,
    phases,
    centres,
    polarization: checks.gapless ? null : fraction(gamma / (2 * Math.PI)),
    points: count,
    checks,
  };
}
