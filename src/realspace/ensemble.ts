/**
 * Disorder ensembles: one real-space diagnostic over many seeded samples, with the mean and its
 * standard error. Seed rule: member i (counted from 0 over the whole ensemble) uses seed
 * `seed + i`; each seed initialises the generator through splitmix64 (random.ts), so consecutive
 * seeds give uncorrelated samples. A cluster shard computes members [first, first + samples) and
 * `joinEnsembles` merges the parts in member order, so a shard can resume mid-ensemble by index
 * and the merged result does not depend on how the members were split.
 */
import type { BlochHamiltonian } from '../bloch/hamiltonian.js';
import type { CostEstimate } from '../cost.js';
import { ModelError, valueText } from '../model/errors.js';
import { bottCost, bottIndex, type BottOptions } from './bott.js';
import { chernMarker, chernMarkerCost, type ChernMarkerOptions } from './chern-marker.js';
import { checkSeed } from './random.js';
import { spinBottIndex, type SpinBottOptions } from './spin-bott.js';
import { chainWinding, chainWindingCost, type ChainWindingOptions } from './winding.js';

/** The diagnostics an ensemble can average, and the number each contributes. */
export type EnsembleDiagnostic = 'bott' | 'spin-bott' | 'chain-winding' | 'local-marker';

export type EnsembleOptions = (BottOptions & SpinBottOptions & ChainWindingOptions & ChernMarkerOptions) & {
  /**
   * Which diagnostic: the Bott index, spin Bott index, chain winding, or the local Chern marker
   * (chern-marker.ts, dense or Chebyshev by `method`) averaged over `cells` (default: the centre cell).
   */
  of: EnsembleDiagnostic;
  /** Members to compute. */
  samples: number;
  /** Index of the first member (a shard resuming mid-ensemble); default 0. */
  first?: number;
};

export interface EnsembleResult {
  kind: 'ensemble';
  of: EnsembleDiagnostic;
  /** Member indices and their seeds. */
  members: Int32Array;
  seeds: Float64Array;
  /** Each member's value; NaN where the diagnostic gave null (gapless, singular...). */
  values: Float64Array;
  /** Mean and standard error (sample standard deviation / sqrt(count)) of the non-null values. */
  mean: number | null;
  standardError: number | null;
  count: number;
  checks: { warnings: string[]; nulls: number };
}

/** What each member computes, and its cost from the model's orbital and term counts. */
const MEMBERS: Record<EnsembleDiagnostic, { run: (h: BlochHamiltonian, o: EnsembleOptions) => number | null; cost: (orbitals: number, terms: number, o: EnsembleOptions) => CostEstimate }> = {
  bott: { run: (h, o) => bottIndex(h, o).bott, cost: (n, _t, o) => bottCost(n, o) },
  'spin-bott': { run: (h, o) => spinBottIndex(h, o).spinBott, cost: (n, _t, o) => bottCost(n, o) },
  'chain-winding': { run: (h, o) => chainWinding(h, o).winding, cost: (n, _t, o) => chainWindingCost(n, o) },
  'local-marker': { run: (h, o) => meanOf(chernMarker(h, withCentre(o)).marker), cost: (n, t, o) => chernMarkerCost(n, t, withCentre(o)) },
};

/** The marker's cells, or the centre cell (a dense marker would otherwise average the whole sample, which is 0). */
function withCentre(o: EnsembleOptions): EnsembleOptions {
  return o.cells !== undefined || !Array.isArray(o.sizes) ? o : { ...o, cells: [o.sizes.map((s) => Math.floor(s / 2))] };
}

function meanOf(x: Float64Array): number | null {
  const mean = x.reduce((a, b) => a + b, 0) / x.length;
  return Number.isFinite(mean) ? mean : null;
}

function checkCount(x: unknown, field: string, min: number): number {
  if (typeof x !== 'number' || !Number.isInteger(x) || x < min) throw new ModelError(field, `expected an integer of at least ${min}. Value: ${valueText(x)}`);
  return x;
}

function checkDiagnostic(of: unknown): EnsembleDiagnostic {
  if (typeof of !== 'string' || !Object.hasOwn(MEMBERS, of)) throw new ModelError('of', `expected one of ${Object.keys(MEMBERS).join(', ')}. Value: ${valueText(of)}`);
  return of as EnsembleDiagnostic;
}

/** One member's memory (members run one after another) and all members' time. */
export function ensembleCost(orbitals: number, terms: number, options: EnsembleOptions): CostEstimate {
  const one = MEMBERS[checkDiagnostic(options.of)].cost(orbitals, terms, options);
  return { bytes: one.bytes, seconds: one.seconds * (typeof options.samples === 'number' ? options.samples : 1) };
}

/** The statistics of member values (NaN = null), in member order. */
function summarise(of: EnsembleDiagnostic, members: Int32Array, seeds: Float64Array, values: Float64Array): EnsembleResult {
  const good = Array.from(values).filter((v) => !Number.isNaN(v));
  const count = good.length;
  const mean = count > 0 ? good.reduce((a, b) => a + b, 0) / count : null;
  const variance = count > 1 && mean !== null ? good.reduce((a, b) => a + (b - mean) ** 2, 0) / (count - 1) : null;
  const nulls = values.length - count;
  const warnings: string[] = [];
  if (nulls > 0) warnings.push(`${nulls} of ${values.length} member(s) gave no value (gapless or singular samples); the mean is over the rest`);
  if (count < 2) warnings.push('fewer than two values: no standard error');
  // Members of an integer-valued diagnostic that round to different integers: the average is a fraction, not an invariant.
  if (of !== 'local-marker') {
    const tally = new Map<number, number>();
    for (const v of good) {
      const nearest = Math.round(v) + 0; // + 0: no "-0" in the message
      tally.set(nearest, (tally.get(nearest) ?? 0) + 1);
    }
    if (tally.size > 1) {
      const split = [...tally].sort((a, b) => a[0] - b[0]).map(([k, n]) => `${n} near ${k}`).join(', ');
      warnings.push(`the members disagree (${split}): the mean is a fraction, not an invariant; the samples are near a transition or not much larger than the localisation length`);
    }
  }
  return { kind: 'ensemble', of, members, seeds, values, mean, standardError: variance === null ? null : Math.sqrt(variance / count), count, checks: { warnings, nulls } };
}

/** Members [first, first + samples) of the ensemble; `run` gives one member's number from its seed. */
export function ensembleOf(of: EnsembleDiagnostic, run: (seed: number) => number | null, seed: number, first: number, samples: number): EnsembleResult {
  const seeds = Float64Array.from({ length: samples }, (_, i) => seed + first + i);
  seeds.forEach((s) => checkSeed(s, 'seed'));
  return ensembleOfValues(of, seed, first, Array.from(seeds, run));
}

/** The ensemble of members [first, first + values.length) whose values are known (null: gave none). */
export function ensembleOfValues(of: EnsembleDiagnostic, seed: number, first: number, values: readonly (number | null)[]): EnsembleResult {
  const members = Int32Array.from(values, (_, i) => first + i);
  return summarise(of, members, Float64Array.from(members, (i) => seed + i), Float64Array.from(values, (v) => v ?? NaN));
}

export function disorderEnsemble(h: BlochHamiltonian, options: EnsembleOptions): EnsembleResult {
  const of = checkDiagnostic(options.of);
  const samples = checkCount(options.samples, 'samples', 1);
  const first = checkCount(options.first ?? 0, 'first', 0);
  const seed = checkSeed(options.seed ?? 0);
  if (!Number.isSafeInteger(seed + first + samples)) throw new ModelError('seed', `seed + first + samples must stay below 2^53. Value: ${seed}`);
  const { run } = MEMBERS[of];
  return ensembleOf(of, (s) => run(h, { ...options, seed: s }), seed, first, samples);
}

/** Merge shards of one ensemble (any order, no overlaps) into the result of one run. */
export function joinEnsembles(parts: EnsembleResult[]): EnsembleResult {
  if (parts.length === 0) throw new ModelError('parts', 'nothing to join');
  const of = parts[0].of;
  const rows: [number, number, number][] = [];
  for (const p of parts) {
    if (p.of !== of) throw new ModelError('parts', `cannot join ensembles of ${of} and ${p.of}`);
    p.members.forEach((m, i) => rows.push([m, p.seeds[i], p.values[i]]));
  }
  rows.sort((a, b) => a[0] - b[0]);
  for (let i = 1; i < rows.length; i++) if (rows[i][0] === rows[i - 1][0]) throw new ModelError('parts', `member ${rows[i][0]} appears twice`);
  return summarise(of, Int32Array.from(rows, (r) => r[0]), Float64Array.from(rows, (r) => r[1]), Float64Array.from(rows, (r) => r[2]));
}
