/**
 * Phase diagrams: a quantity (an invariant, the gap, a disorder average) over a 1D or 2D grid of
 * parameters, with the phase
 * boundaries located by bisection along every grid edge whose two ends disagree.
 *
 * The sweep is a pure, deterministic schedule: `advanceSweep(request, known)` looks at the points
 * known so far and says either which points to compute next (the grid, then one bisection round at
 * a time) or, when nothing is missing, the finished phase map. Everything else builds on that:
 * executors compute the pending points, a checkpoint is just the known points, resuming is replaying
 * the schedule with them, and a cluster round is one batch of pending points split into shards.
 */
import { ModelError, valueText } from '../model/errors.js';
import type { ModelSpec, ParameterValues } from '../model/spec.js';
import { validateModel } from '../model/validate.js';
import { canonicalJson, digest } from './checksum.js';
import { checkParameterValues, parameterValueProblem } from '../model/parameters.js';

import type { PointOutcome } from '../diagnostics/diagnostic.js';
import { diagnosticOf, SWEEP_QUANTITIES, type SweepQuantity } from '../diagnostics/registry.js';

/** What a point of a phase map computes: a kind with a scalar per point (diagnostics/registry.ts). */
export { SWEEP_QUANTITIES, type PointOutcome, type SweepQuantity };

/**
 * A swept option's name and, for "option.key" (a width of `parameterDisorder`, say), the key in the
 * option's object that each point sets.
 */
export function splitOptionAxis(name: string): [option: string, key: string | undefined] {
  const dot = name.indexOf('.');
  return dot < 0 ? [name, undefined] : [name.slice(0, dot), name.slice(dot + 1)];
}

/**
 * One swept parameter: `count` evenly spaced values from `from` to `to` inclusive. `param` names a
 * parameter of the model, or else a numeric option of the swept kind (a disorder strength, say),
 * or "option.parameter" for one width of an option keyed by the model's parameters
 * (`parameterDisorder.v`), which each point sets in its request.
 */
export interface SweepAxis {
  param: string;
  from: number;
  to: number;
  count: number;
}

export interface RefineOptions {
  /** Bisect until each boundary bracket is at most this wide, in the swept parameter's units. */
  tolerance: number;
  /** Upper bound on bisection rounds (default 60, more than enough to reach double precision). */
  maxRounds?: number;
}

/**
 * The `'phase-map'` diagnostic request. Fields other than the ones named here (`bands`, `grid`,
 * `method`, ...) are passed on unchanged to the request computed at every point.
 */
export interface PhaseMapRequest {
  kind: 'phase-map';
  model: ModelSpec;
  /** Values of the parameters that are not swept; a swept parameter's value here is ignored. */
  params?: ParameterValues;
  /** One or two swept parameters. */
  axes: SweepAxis[];
  /** What each point computes: a kind of the registry with a value per point (an invariant, the gap, an average). */
  quantity: SweepQuantity;
  refine?: RefineOptions;
  bands?: number | number[];
  grid?: number | number[] | 'auto';
  [option: string]: unknown;
}

/** The request computed at each point: the phase map's request with `kind` = its quantity. */
export interface PointTarget {
  kind: SweepQuantity;
  model: ModelSpec;
  params?: ParameterValues;
  [option: string]: unknown;
}

/** Evaluates one point, given the swept parameters' values (the target's fixed ones are merged in). */
export type PointFunction = (swept: ParameterValues) => PointOutcome;

/** A located boundary: a bracket along one swept parameter whose two ends disagree. */
export interface PhaseBoundary {
  /** The middle of the bracket: the boundary lies within `(upper - lower) / 2` of it along `along`. */
  at: ParameterValues;
  /** The swept parameter the bracket runs along. */
  along: string;
  lower: number;
  upper: number;
  /** The invariant at `lower` and at `upper` (null: gapless there). */
  values: [number | null, number | null];
  /**
   * The smallest gap found at `lower` and at `upper`: a boundary of certified integers is a gap
   * closing, so both shrink with the bracket (their confirmation that the phases meet there).
   */
  gaps: [number, number];
}

/**
 * Where the mean of an averaged map crosses a half-integer between two neighbouring grid points:
 * the averaged invariant going from one plateau towards the next (0 -> 1 crosses 1/2).
 */
export interface LevelCrossing {
  /** Where the straight line between the two means meets the level. */
  at: ParameterValues;
  /** The swept parameter the grid edge runs along, and its ends. */
  along: string;
  lower: number;
  upper: number;
  /** The half-integer crossed. */
  level: number;
  /** The means and their standard errors at `lower` and at `upper`. */
  values: [number, number];
  standardErrors: [number | null, number | null];
  /**
   * True when each end lies more than RESOLVING_ERRORS standard errors from the level: the errors
   * resolve the change. Otherwise either end is consistent with the level itself (or has no error)
   * and the crossing is not a resolved boundary.
   */
  resolved: boolean;
}

/** How many standard errors from a half-integer a mean must lie to count as on one side of it. */
export const RESOLVING_ERRORS = 2;

export interface PhaseMapAxis extends SweepAxis {
  /** The grid values along the axis. */
  values: number[];
}

/** The engine-wide `checks`, for a phase map. */
export interface PhaseMapChecks {
  /** Smallest gap over the grid points, and where. */
  minGap: number;
  minGapAt: ParameterValues;
  /** The k-grid each point used, when the request named one. */
  grid?: number | number[] | 'auto';
  /** True when any grid point was gapless (its value is null). */
  gapless: boolean;
  warnings: string[];
}

export interface PhaseMapResult {
  kind: 'phase-map';
  quantity: SweepQuantity;
  /** False for a continuous map (a gap, an average): its values are not phases. */
  quantised: boolean;
  axes: PhaseMapAxis[];
  /**
   * Row-major with the first axis fastest: `values[j * n0 + i]` is the invariant at
   * (`axes[0].values[i]`, `axes[1].values[j]`); null where the bands are not gapped.
   */
  values: (number | null)[];
  /** The gap at each grid point, same layout. */
  gaps: number[];
  /**
   * A map of an average (an ensemble's mean): the standard error of each value, same layout; null
   * where there is none (fewer than two members gave a value). Absent for other quantities.
   */
  standardErrors?: (number | null)[];
  /** A map of an average: every crossing of a half-integer between neighbouring grid points, in scan order. */
  crossings?: LevelCrossing[];
  /** A map of an ensemble: the diagnostic it averages (the request's `of`). */
  averaged?: string;
  /** Refined boundaries (empty without `refine`), in the order the grid edges were scanned. */
  boundaries: PhaseBoundary[];
  /** Bisection rounds run and points evaluated beyond the grid. */
  refinement?: { tolerance: number; rounds: number; points: number };
  checks: PhaseMapChecks;
}

/** Which stage the schedule is in: the grid (round 0) or bisection round `round` >= 1. */
export interface SweepStage {
  stage: 'grid' | 'refine';
  round: number;
}

export type SweepStep =
  | ({ done: false; pending: number[][] } & SweepStage)
  | { done: true; result: PhaseMapResult };

/** Points known so far, by `pointKey` of their swept coordinates. */
export type KnownPoints = ReadonlyMap<string, PointOutcome>;

const DEFAULT_MAX_ROUNDS = 60;

/**
 * The key of a point: its swept coordinates in axis order, in shortest round-trip form, so the same
 * point computed in another process or read back from JSON finds the same entry.
 */
export function pointKey(coords: readonly number[]): string {
  return coords.map((x) => (Object.is(x, -0) ? '0' : String(x))).join(',');
}

/** The swept coordinates as named parameter values. */
export function sweptParams(axes: readonly SweepAxis[], coords: readonly number[]): ParameterValues {
  const out: ParameterValues = {};
  axes.forEach((a, i) => (out[a.param] = coords[i]));
  return out;
}

/** The grid values along an axis (exact ends; interior values are from + step * i). */
export function axisValues(axis: SweepAxis): number[] {
  const { from, to, count } = axis;
  if (count === 1) return [from];
  const values: number[] = [];
  for (let i = 0; i < count; i++) values.push(i === count - 1 ? to : from + ((to - from) * i) / (count - 1));
  return values;
}

/** The request for each point (the phase map's own fields removed, `kind` = its quantity). */
export function pointTarget(request: PhaseMapRequest): PointTarget {
  const { kind: _kind, axes: _axes, quantity, refine: _refine, ...rest } = request;
  return { ...rest, kind: quantity };
}

/**
 * Check a phase-map request before any computing. Every error is a ModelError naming the field and
 * its value. Returns the request (typed).
 */
export function validatePhaseMapRequest(request: unknown): PhaseMapRequest {
  if (request === null || typeof request !== 'object') throw new ModelError('request', `expected a phase-map request object. Value: ${valueText(request)}`);
  const r = request as Partial<PhaseMapRequest>;
  if (r.kind !== 'phase-map') throw new ModelError('kind', `expected "phase-map". Value: ${valueText(r.kind)}`);
  let model: ModelSpec;
  try {
    model = validateModel(r.model);
  } catch (err) {
    if (err instanceof ModelError) throw new ModelError(`model.${err.field}`, err.message.slice(err.field.length + 2));
    throw err;
  }
  if (!SWEEP_QUANTITIES.includes(r.quantity as SweepQuantity)) {
    throw new ModelError('quantity', `expected one of ${SWEEP_QUANTITIES.join(', ')}. Value: ${valueText(r.quantity)}`);
  }
  if (r.params !== undefined) checkParameterValues(model, r.params, 'params');
  if (!Array.isArray(r.axes) || r.axes.length < 1 || r.axes.length > 2) {
    throw new ModelError('axes', `expected one or two swept parameters. Value: ${valueText(r.axes)}`);
  }
  const seen = new Set<string>();
  r.axes.forEach((a, i) => {
    const field = `axes[${i}]`;
    if (a === null || typeof a !== 'object') throw new ModelError(field, `expected {param, from, to, count}. Value: ${valueText(a)}`);
    const spec = typeof a.param === 'string' && Object.hasOwn(model.parameters, a.param) ? model.parameters[a.param] : undefined;
    const options = diagnosticOf(r.quantity, 'quantity').options;
    const [option, key] = typeof a.param === 'string' ? splitOptionAxis(a.param) : ['', undefined];
    if (key !== undefined && spec === undefined && (!options.includes(option) || !Object.hasOwn(model.parameters, key))) {
      throw new ModelError(`${field}.param`, `expected "option.parameter" with an option of a "${r.quantity}" request and a parameter of model "${model.name}" (parameters: ${Object.keys(model.parameters).join(', ') || 'none'}). Value: ${valueText(a.param)}`);
    }
    if (typeof a.param !== 'string' || (spec === undefined && !options.includes(option))) {
      throw new ModelError(`${field}.param`, `model "${model.name}" has no parameter ${valueText(a.param)} and a "${r.quantity}" request no such option (parameters: ${Object.keys(model.parameters).join(', ') || 'none'}; options: ${options.join(', ')})`);
    }
    if (seen.has(a.param)) throw new ModelError(`${field}.param`, `"${a.param}" is swept twice`);
    seen.add(a.param);
    for (const end of ['from', 'to'] as const) {
      // An option's values are the diagnostic's to check, at each point; here only that they are numbers.
      const problem = parameterValueProblem(a[end], spec ?? {});
      if (problem !== null) throw new ModelError(`${field}.${end}`, `${a.param}: ${problem}`);
    }
    if (typeof a.count !== 'number' || !Number.isInteger(a.count) || a.count < 1) {
      throw new ModelError(`${field}.count`, `the grid is empty: expected a whole number of points >= 1. Value: ${valueText(a.count)}`);
    }
    if (a.count > 1 && a.from === a.to) throw new ModelError(`${field}.to`, `equals from (${a.from}) with count ${a.count}: the points would coincide`);
  });
  if (r.refine !== undefined) {
    if (r.refine === null || typeof r.refine !== 'object') throw new ModelError('refine', `expected {tolerance}. Value: ${valueText(r.refine)}`);
    const { tolerance, maxRounds } = r.refine;
    if (typeof tolerance !== 'number' || !(tolerance > 0) || !Number.isFinite(tolerance)) {
      throw new ModelError('refine.tolerance', `expected a positive number. Value: ${valueText(tolerance)}`);
    }
    if (maxRounds !== undefined && (!Number.isInteger(maxRounds) || maxRounds < 0)) {
      throw new ModelError('refine.maxRounds', `expected a whole number >= 0. Value: ${valueText(maxRounds)}`);
    }
    if (diagnosticOf(r.quantity, 'quantity').quantised === false) {
      throw new ModelError('refine', `boundaries are refined between different values of a quantised invariant; a map of "${r.quantity}" has none (drop refine, or sweep an invariant)`);
    }
  }
  return r as PhaseMapRequest;
}

/** A stable fingerprint of a request: checkpoints and shard outputs carry it to be matched. */
export function requestFingerprint(request: PhaseMapRequest): string {
  return digest(canonicalJson(request));
}

interface Bracket {
  axis: number;
  lo: number[];
  hi: number[];
  vlo: number | null;
  vhi: number | null;
}

function withCoord(coords: readonly number[], axis: number, x: number): number[] {
  const out = coords.slice();
  out[axis] = x;
  return out;
}

/**
 * One step of the deterministic schedule. `request` must have passed `validatePhaseMapRequest`.
 * Pending points are listed in a fixed order (grid row-major, first axis fastest; brackets in scan
 * order), which is what lets shards split them and resumed runs recognise them.
 */
export function advanceSweep(request: PhaseMapRequest, known: KnownPoints): SweepStep {
  const axes = request.axes;
  const grids = axes.map(axisValues);
  const n0 = grids[0].length;
  const n1 = grids.length > 1 ? grids[1].length : 1;
  const gridCoords: number[][] = [];
  for (let j = 0; j < n1; j++) {
    for (let i = 0; i < n0; i++) gridCoords.push(grids.length > 1 ? [grids[0][i], grids[1][j]] : [grids[0][i]]);
  }
  const missing = gridCoords.filter((c) => !known.has(pointKey(c)));
  if (missing.length > 0) return { done: false, pending: missing, stage: 'grid', round: 0 };
  const outcomes = gridCoords.map((c) => known.get(pointKey(c))!);

  const boundaries: PhaseBoundary[] = [];
  let refinement: PhaseMapResult['refinement'];
  const warnings: string[] = [];
  if (request.refine !== undefined) {
    const tolerance = request.refine.tolerance;
    const maxRounds = request.refine.maxRounds ?? DEFAULT_MAX_ROUNDS;
    // Initial brackets: every grid edge whose ends disagree.
    let brackets: Bracket[] = [];
    for (const [axis, p, q] of gridEdges(n0, n1, grids.length)) {
      const a = outcomes[p].value;
      const b = outcomes[q].value;
      if (a !== b) brackets.push({ axis, lo: gridCoords[p], hi: gridCoords[q], vlo: a, vhi: b });
    }
    let rounds = 0;
    let extra = 0;
    const finished: Bracket[] = [];
    for (;;) {
      const open: Bracket[] = [];
      for (const b of brackets) (Math.abs(b.hi[b.axis] - b.lo[b.axis]) > tolerance ? open : finished).push(b);
      if (open.length === 0) break;
      if (rounds >= maxRounds) {
        warnings.push(`${open.length} boundary bracket(s) are still wider than the tolerance ${tolerance} after ${maxRounds} bisection rounds`);
        finished.push(...open);
        break;
      }
      const mids = open.map((b) => withCoord(b.lo, b.axis, (b.lo[b.axis] + b.hi[b.axis]) / 2));
      const absent = mids.filter((m) => !known.has(pointKey(m)));
      if (absent.length > 0) {
        // Two brackets can share a midpoint only if they are the same bracket; list each point once.
        const unique = new Map(absent.map((m) => [pointKey(m), m]));
        return { done: false, pending: [...unique.values()], stage: 'refine', round: rounds + 1 };
      }
      rounds++;
      extra += mids.length;
      const next: Bracket[] = [];
      open.forEach((b, n) => {
        const m = mids[n];
        const vm = known.get(pointKey(m))!.value;
        // Keep each half whose ends still disagree: a third phase in between keeps both.
        if (b.vlo !== vm) next.push({ axis: b.axis, lo: b.lo, hi: m, vlo: b.vlo, vhi: vm });
        if (vm !== b.vhi) next.push({ axis: b.axis, lo: m, hi: b.hi, vlo: vm, vhi: b.vhi });
      });
      brackets = next;
    }
    for (const b of finished) {
      const mid = withCoord(b.lo, b.axis, (b.lo[b.axis] + b.hi[b.axis]) / 2);
      const lower = Math.min(b.lo[b.axis], b.hi[b.axis]);
      const upper = Math.max(b.lo[b.axis], b.hi[b.axis]);
      const ascending = b.lo[b.axis] <= b.hi[b.axis];
      const gapLo = known.get(pointKey(b.lo))!.gap, gapHi = known.get(pointKey(b.hi))!.gap;
      boundaries.push({
        at: sweptParams(axes, mid),
        along: axes[b.axis].param,
        lower,
        upper,
        values: ascending ? [b.vlo, b.vhi] : [b.vhi, b.vlo],
        gaps: ascending ? [gapLo, gapHi] : [gapHi, gapLo],
      });
    }
    refinement = { tolerance, rounds, points: extra };
  }

  const averaged = outcomes.some((o) => o.standardError !== undefined);
  const standardErrors = averaged ? outcomes.map((o) => o.standardError ?? null) : undefined;
  const crossings = standardErrors !== undefined ? levelCrossings(axes, gridCoords, n0, n1, outcomes.map((o) => o.value), standardErrors) : undefined;
  const unresolved = crossings?.filter((c) => !c.resolved).length ?? 0;
  if (unresolved > 0) {
    warnings.push(`${unresolved} of ${crossings!.length} crossings of a half-integer are not resolved: an end lies within ${RESOLVING_ERRORS} standard errors of the level (more samples narrow the errors)`);
  }

  let minIndex = 0;
  outcomes.forEach((o, n) => {
    if (o.gap < outcomes[minIndex].gap) minIndex = n;
  });
  const quantised = diagnosticOf(request.quantity, 'quantity').quantised !== false;
  const gaplessCount = quantised ? outcomes.filter((o) => o.value === null).length : 0;
  const doubtful = outcomes.findIndex((o) => o.doubtful === true);
  if (doubtful >= 0) {
    const count = outcomes.filter((o) => o.doubtful === true).length;
    warnings.unshift(`${count} of ${outcomes.length} grid points were flagged by the ${request.quantity} diagnostic (k-grid too coarse or not converged), first at ${valueText(sweptParams(axes, gridCoords[doubtful]))}; use a finer grid`);
  }
  if (gaplessCount > 0) {
    warnings.unshift(`${gaplessCount} of ${outcomes.length} grid points are gapless (no invariant there); the smallest gap is ${outcomes[minIndex].gap} at ${valueText(sweptParams(axes, gridCoords[minIndex]))}`);
  }
  const result: PhaseMapResult = {
    kind: 'phase-map',
    quantity: request.quantity,
    quantised,
    axes: axes.map((a, i) => ({ param: a.param, from: a.from, to: a.to, count: a.count, values: grids[i] })),
    values: outcomes.map((o) => o.value),
    gaps: outcomes.map((o) => o.gap),
    ...(standardErrors !== undefined ? { standardErrors, crossings } : {}),
    ...(typeof request.of === 'string' && request.quantity === 'ensemble' ? { averaged: request.of } : {}),
    boundaries,
    ...(refinement !== undefined ? { refinement } : {}),
    checks: {
      minGap: outcomes[minIndex].gap,
      minGapAt: sweptParams(axes, gridCoords[minIndex]),
      ...(request.grid !== undefined ? { grid: request.grid } : {}),
      gapless: gaplessCount > 0,
      warnings,
    },
  };
  return { done: true, result };
}

/**
 * Every edge between neighbouring grid points, as [axis, index, neighbour's index] into the
 * row-major grid (first axis fastest): along axis 0, then along axis 1.
 */
function* gridEdges(n0: number, n1: number, dims: number): Generator<[axis: number, from: number, to: number]> {
  for (let axis = 0; axis < dims; axis++) {
    for (let j = 0; j < n1 - (axis === 1 ? 1 : 0); j++) {
      for (let i = 0; i < n0 - (axis === 0 ? 1 : 0); i++) yield [axis, j * n0 + i, axis === 0 ? j * n0 + i + 1 : (j + 1) * n0 + i];
    }
  }
}

/**
 * The crossings of half-integers along every grid edge of an averaged map. A level at an end counts
 * (the end sits on it: not resolved); an edge with a null mean has none.
 */
function levelCrossings(axes: readonly SweepAxis[], gridCoords: number[][], n0: number, n1: number, means: (number | null)[], errors: (number | null)[]): LevelCrossing[] {
  const out: LevelCrossing[] = [];
  for (const [axis, p, q] of gridEdges(n0, n1, axes.length)) {
    const [a, b] = [means[p], means[q]];
    if (a === null || b === null || a === b) continue;
    const [ea, eb] = [errors[p], errors[q]];
    const [lo, hi] = [gridCoords[p], gridCoords[q]];
    const ascending = lo[axis] <= hi[axis];
    for (let k = Math.ceil(Math.min(a, b) - 0.5); k + 0.5 <= Math.max(a, b); k++) {
      const level = k + 0.5;
      const t = (level - a) / (b - a);
      const clear = (mean: number, error: number | null) => error !== null && Math.abs(mean - level) > RESOLVING_ERRORS * error;
      out.push({
        at: sweptParams(axes, withCoord(lo, axis, lo[axis] + t * (hi[axis] - lo[axis]))),
        along: axes[axis].param,
        lower: Math.min(lo[axis], hi[axis]),
        upper: Math.max(lo[axis], hi[axis]),
        level,
        values: ascending ? [a, b] : [b, a],
        standardErrors: ascending ? [ea, eb] : [eb, ea],
        resolved: clear(a, ea) && clear(b, eb),
      });
    }
  }
  return out;
}
