/**
 * A gap certificate: a proof that a band group is separated from the other bands everywhere on a
 * region of the zone (a line, a plane or the whole zone), not just at the samples.
 *
 * Between samples the bands can move only so far: by Weyl's inequality every eigenvalue moves by at
 * most ||H(k + delta) - H(k)||, which the compiled model bounds from its amplitudes and hopping
 * vectors (BlochHamiltonian.variationBound). Every point of a box of the sample lattice lies within
 * half the box's widths of one of its corners, so the gap everywhere in the box is at least
 *   (smallest corner gap) - 2 V(half widths);
 * and, on a straight region, where V is at most linear in the step (a_i per radian along axis i),
 * the bound from every corner averaged over the corners gives the often larger
 *   (mean corner gap) - sum_i a_i w_i.
 * A box that fails this gets a second, local chance: around each corner c, H(k) - H(c) is the
 * derivative at c (whose norm is solved there, along each axis) plus a second-order remainder the
 * amplitudes bound, which is far tighter than the global bound wherever the hoppings partly cancel.
 * Boxes where neither is positive are split by inserting the midlines of their intervals (a
 * rectilinear lattice, refined only along the lines that cross a bad box), until every box is
 * proven (gapped), a sample's gap falls to the tolerance (gapless), or the budget runs out
 * (unproven). Before saying unproven, the smallest sampled gap is minimised locally (Nelder–Mead),
 * which finds a closing the boxes could only bracket.
 *
 * A caller can ask more of each box than a positive gap (`cellCondition`): the winding number asks
 * that the phase of det q cannot turn by pi across a box, which the same bound and the box's proven
 * gap control.
 */
import type { BlochHamiltonian } from '../bloch/hamiltonian.js';
import { checkInterrupt } from '../interrupt.js';
import { ModelError, valueText } from '../model/errors.js';
import { HermitianEigensolver } from '../linalg/eigh.js';
import { BandSampler, groupGap, type BandGroup, type GapProof } from './common.js';
import { nelderMead } from './gap.js';

export type GapVerdict = GapProof['verdict'];

export interface GapCertificate {
  /** 'gapped': proven everywhere on the region; 'gapless': a sample at or below the tolerance; 'unproven': neither within the budget. */
  verdict: GapVerdict;
  /** Proven lower bound on the gap over the whole region (0 unless gapped). */
  lowerBound: number;
  /** Smallest gap met at a sample (an upper bound on the true minimum), and where (reduced k, radians, every model direction). */
  minGap: number;
  minGapAt: number[];
  /** The gap at or below which the bands count as touching. */
  tolerance: number;
  /** Largest |energy| sampled (the scale of the default tolerance). */
  energyScale: number;
  /** Eigenvalue solves spent. */
  samples: number;
  /** The sample lines per region axis at the end (ascending, both ends of each range included). */
  positions: Float64Array[];
  /** Why the verdict is not 'gapped', in words. */
  reason?: string;
}

/**
 * Where to certify: coordinates u_i spanning `ranges` (default [-pi, pi] each). Without a `chart`,
 * u_i is the momentum along model direction `axes[i]` and the other directions are fixed at
 * `origin`; a chart maps u to k itself and bounds how far k can move.
 */
export interface CertifyRegion {
  axes: number[];
  origin: number[];
  ranges?: [number, number][];
  chart?: Chart;
}

/**
 * A curved region (a sphere around a node, say): k(u), and a bound on |k_j(u + du) - k_j(u)| for
 * |du_i| <= half[i], which must be additive over the axes (the bound for several axes at once is at
 * most the sum of the bounds for each alone).
 */
export interface Chart {
  place(u: ArrayLike<number>, k: Float64Array): void;
  reach(half: ArrayLike<number>, steps: number[]): void;
}

/**
 * What a box must satisfy besides a positive gap: given its proven gap lower bound and its widths
 * per region axis (radians), true when the box is fine enough.
 */
export type CellCondition = (gapLowerBound: number, widths: number[]) => boolean;

export interface CertifyOptions {
  /** Gap at or below which the group counts as touching; default 1e-9 times the largest |energy| sampled. */
  tolerance?: number;
  /** Lines per axis to start from (default 32 / 16 / 8 in 1D / 2D / 3D). */
  start?: number;
  /** Most lines per axis (default 4096). */
  maxLines?: number;
  /**
   * Most eigenvalue solves. Default: what about 4e10 operations buy (n^3 per solve for n orbitals),
   * between four starting lattices and 400000.
   */
  maxSamples?: number;
  cellCondition?: CellCondition;
  /** The ascending energies at k, when the caller wants to keep more of each solve (default: eigenvalues only). */
  solve?: (k: Float64Array) => Float64Array;
}

const START = [0, 32, 16, 8];
/** Intervals narrower than this (radians) are not split again. */
const MIN_WIDTH = 2 * Math.PI * 2 ** -36;

/** Sup over k of ||dH/dk_i|| for each model direction in `axes` (the derivative bound, uncapped). */
export function derivativeBounds(h: BlochHamiltonian, axes: number[]): number[] {
  return axes.map((a) => {
    const steps = new Array<number>(h.dim).fill(0);
    steps[a] = 1;
    return h.variationBound(steps, false);
  });
}

function linspace(from: number, to: number, n: number): number[] {
  return Array.from({ length: n + 1 }, (_, j) => (j === n ? to : from + ((to - from) * j) / n));
}

/** Prove a gap over a region, or find where it closes (see the module comment). */
export function certifyGap(h: BlochHamiltonian, group: BandGroup, region: CertifyRegion, options: CertifyOptions = {}): GapCertificate {
  const d = region.axes.length;
  const nb = h.size;
  const ranges = region.ranges ?? region.axes.map((): [number, number] => [-Math.PI, Math.PI]);
  const start = options.start ?? START[d];
  const maxLines = options.maxLines ?? 4096;
  const maxSamples = options.maxSamples ?? Math.round(Math.min(400_000, Math.max(4 * (start + 1) ** d, 4e10 / nb ** 3)));
  if (options.tolerance !== undefined && !(options.tolerance >= 0 && Number.isFinite(options.tolerance))) {
    throw new ModelError('gapTolerance', `expected a nonnegative number. Value: ${valueText(options.tolerance)}`);
  }
  const bands = options.solve === undefined ? new BandSampler(h) : null;
  const solve = options.solve ?? ((kk: Float64Array) => bands!.solve(kk));
  const k = new Float64Array(h.dim);
  for (let i = 0; i < h.dim; i++) k[i] = region.origin[i] ?? 0;
  let positions = ranges.map(([a, b]) => linspace(a, b, start));
  /** Gaps at the lattice points, last axis fastest; NaN where not sampled yet. */
  let gaps = new Float64Array(0);
  /** ||dH/du_i|| at the lattice points, d per point, solved only for the corners of boxes that need it (NaN: not yet). */
  let norms = new Float64Array(0);
  let counts: number[] = [];
  let strides: number[] = [];
  let samples = 0;
  let minGap = Infinity;
  const minGapAt = Array.from(k);
  const minGapU = new Array<number>(d).fill(0);
  let energyScale = 0;

  const chart: Chart = region.chart ?? {
    place: (u, out) => { for (let i = 0; i < d; i++) out[region.axes[i]] = u[i]; },
    reach: (half, out) => { for (let i = 0; i < d; i++) out[region.axes[i]] = half[i]; },
  };
  const gapAt = (point: ArrayLike<number>): number => {
    chart.place(point, k);
    const e = solve(k);
    samples++;
    energyScale = Math.max(energyScale, Math.abs(e[0]), Math.abs(e[nb - 1]));
    const g = groupGap(e, 0, group, nb);
    if (g < minGap) {
      minGap = g;
      for (let i = 0; i < h.dim; i++) minGapAt[i] = k[i];
      for (let i = 0; i < d; i++) minGapU[i] = point[i];
    }
    return g;
  };
  const tolerance = () => options.tolerance ?? 1e-9 * Math.max(energyScale, 1e-300);

  /**
   * Lay the lattice of `next` positions, keeping the gaps known at the old points (every old line
   * is still a line), then sample the new points; false when the budget would be exceeded.
   */
  const relay = (next: number[][]): boolean => {
    const nextCounts = next.map((p) => p.length);
    const total = nextCounts.reduce((a, n) => a * n, 1);
    if (total > maxSamples) return false;
    const nextStrides = nextCounts.map((_, i) => nextCounts.slice(i + 1).reduce((a, n) => a * n, 1));
    const nextGaps = new Float64Array(total).fill(NaN);
    const nextNorms = new Float64Array(total * d).fill(NaN);
    if (gaps.length > 0) {
      // Old line j of axis i sits at new line where[i][j].
      const where = positions.map((p, i) => {
        const map = new Int32Array(p.length);
        let at = 0;
        for (let j = 0; j < p.length; j++) {
          while (next[i][at] !== p[j]) at++;
          map[j] = at;
        }
        return map;
      });
      for (let q = 0; q < gaps.length; q++) {
        let rest = q, to = 0;
        for (let i = 0; i < d; i++) {
          const j = Math.floor(rest / strides[i]);
          rest -= j * strides[i];
          to += where[i][j] * nextStrides[i];
        }
        nextGaps[to] = gaps[q];
        for (let i = 0; i < d; i++) nextNorms[to * d + i] = norms[q * d + i];
      }
    }
    positions = next;
    counts = nextCounts;
    strides = nextStrides;
    gaps = nextGaps;
    norms = nextNorms;
    const point = new Float64Array(d);
    for (let q = 0; q < total; q++) {
      if (!Number.isNaN(gaps[q])) continue;
      if (samples % 256 === 0) checkInterrupt();
      gaps[q] = gapAt(pointAt(q, point));
    }
    return true;
  };

  // A box's corners move by at most V(half widths) <= sum over axes of V(one axis's half width)
  // (min(2, a + b) <= min(2, a) + min(2, b), row sums add), so each interval's share is computed once.
  const steps = new Array<number>(h.dim).fill(0);
  /** How far k can move when region axis `axis` moves by `half` alone. */
  const stepsAlong = (axis: number, half: number): number[] => {
    const one = new Array<number>(d).fill(0);
    one[axis] = half;
    steps.fill(0);
    chart.reach(one, steps);
    return steps;
  };
  const corners = 1 << d;
  // Bisection makes few distinct interval widths per axis: each width's bound is computed once.
  const variations = region.axes.map(() => new Map<number, number>());
  const remainderShares = region.axes.map(() => new Map<number, number>());
  const linearShares = region.axes.map(() => new Map<number, number>());
  const once = (memo: Map<number, number>[], axis: number, width: number, make: () => number): number => {
    let value = memo[axis].get(width);
    if (value === undefined) memo[axis].set(width, (value = make()));
    return value;
  };

  // The local bound needs the derivative along each axis, which only a straight region has.
  const derivative = region.chart === undefined ? new Float64Array(2 * nb * nb) : null;
  const derivativeValues = new Float64Array(nb);
  const derivativeSolver = derivative === null ? null : new HermitianEigensolver(nb);
  const pointAt = (q: number, out: Float64Array): Float64Array => {
    let rest = q;
    for (let i = 0; i < d; i++) {
      const j = Math.floor(rest / strides[i]);
      rest -= j * strides[i];
      out[i] = positions[i][j];
    }
    return out;
  };
  const normPoint = new Float64Array(d);
  /** ||dH/du_i|| at lattice point q (solved once). */
  const normAt = (q: number, i: number): number => {
    if (Number.isNaN(norms[q * d + i])) {
      chart.place(pointAt(q, normPoint), k);
      h.fillDerivative(k, region.axes[i], derivative!);
      derivativeSolver!.solve(derivative!, derivativeValues);
      norms[q * d + i] = Math.max(Math.abs(derivativeValues[0]), Math.abs(derivativeValues[nb - 1]));
    }
    return norms[q * d + i];
  };

  const finish = (verdict: GapVerdict, lowerBound: number, reason?: string): GapCertificate => ({
    verdict, lowerBound, minGap, minGapAt: [...minGapAt], tolerance: tolerance(), energyScale, samples,
    positions: positions.map((p) => Float64Array.from(p)), ...(reason === undefined ? {} : { reason }),
  });
  const gapless = (): GapCertificate => finish('gapless', 0);

  /** Minimise the gap from the smallest sample: a closing the boxes only bracket shows up here. */
  const polish = (reason: string): GapCertificate => {
    const from = [...minGapU];
    const widths = positions.map((p) => Math.max(MIN_WIDTH, Math.min(...p.slice(1).map((x, j) => x - p[j]))));
    const { x } = nelderMead((y) => {
      const g = gapAt(Array.from(y));
      return g * g;
    }, from, widths, 1e-13, 4000);
    gapAt(Array.from(x));
    return minGap <= tolerance() ? gapless() : finish('unproven', 0, reason);
  };

  if (!relay(positions)) return finish('unproven', 0, `${positions.map((p) => p.length).join('x')} starting samples exceed the budget of ${maxSamples}`);
  for (let round = 1; ; round++) {
    if (minGap <= tolerance()) return gapless();
    // A true closing makes every round bracket it more tightly; minimising from the best sample
    // now and then reaches it in far fewer samples.
    if ((round & (round - 1)) === 0 && round >= 4 && polish('').verdict === 'gapless') return gapless();
    checkInterrupt();
    const widths = positions.map((p) => Float64Array.from({ length: p.length - 1 }, (_, j) => p[j + 1] - p[j]));
    const shares = widths.map((w, i) => Float64Array.from(w, (x) => once(variations, i, x, () => h.variationBound(stepsAlong(i, x / 2)))));
    // On a straight region the uncapped bound is linear in the step: a_i w_i for a whole interval.
    const slopes = region.chart === undefined ? widths.map((w, i) => Float64Array.from(w, (x) => once(linearShares, i, x, () => h.variationBound(stepsAlong(i, x), false)))) : null;
    // (sum of d terms)^2 <= d (sum of squares): each interval's share of the remainder, times d.
    const remainders = derivative === null ? null : widths.map((w, i) => Float64Array.from(w, (x) => once(remainderShares, i, x, () => d * h.remainderBound(stepsAlong(i, x / 2)))));
    const cornerOffsets = Array.from({ length: corners }, (_, c) => strides.reduce((a, st, i) => a + ((c >> i) & 1) * st, 0));
    // Boxes: the proven gap of each, and which intervals to split where a box is not proven.
    const split = positions.map((p) => new Uint8Array(p.length - 1));
    const boxCounts = counts.map((n) => n - 1);
    const boxes = boxCounts.reduce((a, n) => a * n, 1);
    const index = new Int32Array(d);
    const boxWidths = new Array<number>(d);
    let lowerBound = Infinity;
    let failing = 0;
    const fine = (b: number) => b > 0 && (options.cellCondition === undefined || options.cellCondition(b, boxWidths));
    for (let box = 0; box < boxes; box++) {
      let rest = box, base = 0, share = 0;
      for (let i = d - 1; i >= 0; i--) {
        const j = rest % boxCounts[i];
        rest = (rest - j) / boxCounts[i];
        index[i] = j;
        base += j * strides[i];
        share += shares[i][j];
        boxWidths[i] = widths[i][j];
      }
      let smallest = Infinity, sum = 0;
      for (let c = 0; c < corners; c++) {
        const g = gaps[base + cornerOffsets[c]];
        smallest = Math.min(smallest, g);
        sum += g;
      }
      let bound = smallest - 2 * share;
      if (slopes !== null) {
        // gap(p) >= gap(c) - 2 sum_i a_i |p_i - c_i| for every corner c, so also for their average;
        // averaged over the corners, sum_i a_i |p_i - c_i| is sum_i a_i w_i / 2 wherever p is.
        let linear = 0;
        for (let i = 0; i < d; i++) linear += slopes[i][index[i]];
        bound = Math.max(bound, sum / corners - linear);
      }
      if (!fine(bound) && remainders !== null) {
        let remainder = 0;
        for (let i = 0; i < d; i++) remainder += remainders[i][index[i]];
        let local = Infinity;
        for (let c = 0; c < corners && local > bound; c++) {
          const q = base + cornerOffsets[c];
          let move = remainder;
          for (let i = 0; i < d; i++) move += normAt(q, i) * boxWidths[i] / 2;
          local = Math.min(local, gaps[q] - 2 * move);
        }
        bound = Math.max(bound, local);
      }
      if (fine(bound)) {
        if (bound < lowerBound) lowerBound = bound;
        continue;
      }
      failing++;
      for (let i = 0; i < d; i++) if (boxWidths[i] > MIN_WIDTH) split[i][index[i]] = 1;
    }
    if (failing === 0) return finish('gapped', lowerBound);
    let inserted = 0;
    const next = positions.map((p, i) => {
      const out: number[] = [p[0]];
      for (let j = 0; j + 1 < p.length; j++) {
        if (split[i][j]) {
          out.push((p[j] + p[j + 1]) / 2);
          inserted++;
        }
        out.push(p[j + 1]);
      }
      return out;
    });
    const where = `k = (${minGapAt.map((x) => (x / (2 * Math.PI)).toFixed(4)).join(', ')})`;
    if (inserted === 0) return polish(`boxes narrower than ${MIN_WIDTH.toExponential(1)} rad near ${where} are still not proven`);
    if (next.some((p) => p.length > maxLines + 1)) return polish(`more than ${maxLines} lines per direction would be needed near ${where}`);
    if (!relay(next)) return polish(`more than ${maxSamples} samples would be needed near ${where}`);
  }
}
