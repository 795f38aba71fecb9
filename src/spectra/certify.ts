/**
 * A gap certificate: a proof that a band group is separated from the other bands everywhere on a
 * region of the zone (a line, a plane or the whole zone), not just at the samples.
 *
 * Between samples the bands can move only so far: by Weyl's inequality every eigenvalue moves by at
 * most ||H(k + delta) - H(k)||, which the compiled model bounds from its amplitudes and hopping
 * vectors (BlochHamiltonian.variationBound). Every point of a box of the sample lattice lies within
 * half the box's widths of one of its corners, so the gap everywhere in the box is at least
 *   (smallest corner gap) - 2 V(half widths).
 * Boxes where that is not positive are split by inserting the midlines of their intervals (a
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
import { ModelError, show } from '../model/errors.js';
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

/** A curved region (a sphere around a node, say): k(u), and a bound on |k_j(u + du) - k_j(u)| for |du_i| <= half[i]. */
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
  /** Most eigenvalue solves (default 400000). */
  maxSamples?: number;
  cellCondition?: CellCondition;
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
  const maxSamples = options.maxSamples ?? 400_000;
  if (options.tolerance !== undefined && !(options.tolerance >= 0 && Number.isFinite(options.tolerance))) {
    throw new ModelError('gapTolerance', `expected a nonnegative number. Value: ${show(options.tolerance)}`);
  }
  const sampler = new BandSampler(h);
  const k = new Float64Array(h.dim);
  for (let i = 0; i < h.dim; i++) k[i] = region.origin[i] ?? 0;
  const positions = ranges.map(([a, b]) => linspace(a, b, start));
  const gaps = new Map<string, number>();
  let samples = 0;
  let minGap = Infinity;
  const minGapAt = Array.from(k);
  const minGapU = new Array<number>(d).fill(0);
  let energyScale = 0;

  const chart: Chart = region.chart ?? {
    place: (u, out) => { for (let i = 0; i < d; i++) out[region.axes[i]] = u[i]; },
    reach: (half, out) => { for (let i = 0; i < d; i++) out[region.axes[i]] = half[i]; },
  };
  const gapAt = (point: number[]): number => {
    chart.place(point, k);
    const e = sampler.solve(k);
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

  /** Visit every combination of one index per axis (`counts[i]` choices each). */
  const odometer = (counts: number[], visit: (index: number[]) => void): void => {
    if (counts.some((c) => c <= 0)) return;
    const index = new Array<number>(d).fill(0);
    for (;;) {
      visit(index);
      let i = d - 1;
      while (i >= 0 && ++index[i] === counts[i]) index[i--] = 0;
      if (i < 0) return;
    }
  };
  const pointOf = (index: number[], shift?: number[]): number[] => index.map((j, i) => positions[i][j + (shift?.[i] ?? 0)]);
  const keyOf = (point: number[]): string => point.join(',');

  /** Sample every lattice point not yet known; false when the budget would be exceeded. */
  const fill = (): boolean => {
    const total = positions.reduce((a, p) => a * p.length, 1);
    if (total > maxSamples) return false;
    let seen = 0;
    odometer(positions.map((p) => p.length), (index) => {
      if (++seen % 256 === 0) checkInterrupt();
      const point = pointOf(index);
      const key = keyOf(point);
      if (!gaps.has(key)) gaps.set(key, gapAt(point));
    });
    return true;
  };

  const steps = new Array<number>(h.dim).fill(0);
  const variation = new Map<string, number>();
  const boundOver = (halfWidths: number[]): number => {
    const key = halfWidths.join(',');
    let v = variation.get(key);
    if (v === undefined) {
      chart.reach(halfWidths, steps);
      v = h.variationBound(steps);
      variation.set(key, v);
    }
    return v;
  };
  const corners = 1 << d;

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

  if (!fill()) return finish('unproven', 0, `${positions.map((p) => p.length).join('x')} starting samples exceed the budget of ${maxSamples}`);
  for (let round = 1; ; round++) {
    if (minGap <= tolerance()) return gapless();
    // A true closing makes every round bracket it more tightly; minimising from the best sample
    // now and then reaches it in far fewer samples.
    if ((round & (round - 1)) === 0 && round >= 4 && polish('').verdict === 'gapless') return gapless();
    checkInterrupt();
    // Boxes: the proven gap of each, and which intervals to split where a box is not proven.
    const split = positions.map((p) => new Uint8Array(p.length - 1));
    let lowerBound = Infinity;
    let failing = 0;
    const half = new Array<number>(d);
    const widths = new Array<number>(d);
    const shift = new Array<number>(d);
    odometer(positions.map((p) => p.length - 1), (index) => {
      let smallest = Infinity;
      for (let c = 0; c < corners; c++) {
        for (let i = 0; i < d; i++) shift[i] = (c >> i) & 1;
        smallest = Math.min(smallest, gaps.get(keyOf(pointOf(index, shift)))!);
      }
      for (let i = 0; i < d; i++) {
        widths[i] = positions[i][index[i] + 1] - positions[i][index[i]];
        half[i] = widths[i] / 2;
      }
      const bound = smallest - 2 * boundOver(half);
      const ok = bound > 0 && (options.cellCondition === undefined || options.cellCondition(bound, widths));
      if (ok) {
        lowerBound = Math.min(lowerBound, bound);
        return;
      }
      failing++;
      for (let i = 0; i < d; i++) if (widths[i] > MIN_WIDTH) split[i][index[i]] = 1;
    });
    if (failing === 0) return finish('gapped', lowerBound);
    let inserted = 0;
    positions.forEach((p, i) => {
      const next: number[] = [p[0]];
      for (let j = 0; j + 1 < p.length; j++) {
        if (split[i][j]) {
          next.push((p[j] + p[j + 1]) / 2);
          inserted++;
        }
        next.push(p[j + 1]);
      }
      positions[i] = next;
    });
    const where = `k = (${minGapAt.map((x) => (x / (2 * Math.PI)).toFixed(4)).join(', ')})`;
    if (inserted === 0) return polish(`boxes narrower than ${MIN_WIDTH.toExponential(1)} rad near ${where} are still not proven`);
    if (positions.some((p) => p.length > maxLines + 1)) return polish(`more than ${maxLines} lines per direction would be needed near ${where}`);
    if (!fill()) return polish(`more than ${maxSamples} samples would be needed near ${where}`);
  }
}
