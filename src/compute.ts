/**
 * One unit of work everywhere: a diagnostic request (plain data: model, parameter values, what to
 * compute and its options) in, a result (plain data with typed arrays and its checks) out. The same
 * request runs in a notebook cell, in a widget's Web Worker and in a shard of a cluster sweep. What
 * each kind computes is its module's business (diagnostics/registry.ts); this is the one way in.
 */
import { BlochHamiltonian } from './bloch/hamiltonian.js';
import { diagnosticOf, type KindRequest, type KindResult } from './diagnostics/registry.js';
import { checkInterrupt, InterruptedError } from './interrupt.js';
import { resolveParameters } from './model/expressions.js';
import type { ParameterValues } from './model/spec.js';
import { checkRequest, type DiagnosticRequest } from './request.js';
import type { PointFunctionFactory } from './scan/executor.js';
import { pointFunction } from './scan/point.js';
import { phaseMapSync, runPhaseMap } from './scan/run.js';
import type { PhaseMapRequest, PhaseMapResult } from './scan/sweep.js';
import type { CurvatureResult } from './topology/curvature.js';
import { joinParts as joinPartsOnly, type CurvaturePart, type DiagnosticPart, type WannierFlowPart } from './topology/parts.js';
import type { WannierFlowResult } from './topology/wilson.js';

export { checkRequest, DIAGNOSTIC_KINDS, type DiagnosticKind, type DiagnosticRequest } from './request.js';

/** A result of any kind; a split request with `part` gives one part, for `joinParts` (topology/parts.ts). */
export type DiagnosticResult = KindResult | PhaseMapResult;

/** Every result carries the parameter values it was computed with, defaults filled in. */
export type ComputedResult = DiagnosticResult & { params: ParameterValues };

/**
 * Compute one diagnostic. Throws ModelError (naming the field and value) on a malformed request or
 * one whose cost does not fit the budget. The result echoes the parameter values it used (`params`,
 * defaults filled in; for a phase map, the values of the parameters it does not sweep).
 * A 'curvature' or 'wannier-flow' request with `part: {index, count}` computes that part only;
 * `joinParts` makes the result of the whole request from all of them.
 */
export function compute(request: DiagnosticRequest, options: ComputeOptions = {}): ComputedResult {
  checkRequest(request);
  return run(request, options.onPoint);
}

export interface ComputeOptions {
  /**
   * A phase map calls this after each point: the points done, and the points planned (the grid;
   * boundary refinement adds a few as it goes). Hosts draw progress with it.
   */
  onPoint?: (done: number, planned: number) => void;
}

/** The engine's point function, reporting each point it computes. */
function countingPoints(request: PhaseMapRequest, onPoint: (done: number, planned: number) => void): PointFunctionFactory {
  const grid = request.axes.reduce((n, axis) => n * axis.count, 1);
  let done = 0;
  return (target) => {
    const point = pointFunction(target);
    return (swept) => {
      const outcome = point(swept);
      done++;
      onPoint(done, Math.max(grid, done));
      return outcome;
    };
  };
}

/** The parameters a phase map holds fixed, resolved with defaults (its model is valid by now). */
function fixedParams(request: PhaseMapRequest): ParameterValues {
  const swept = new Set(request.axes.map((a) => a.param));
  const given = Object.entries(request.params ?? {}).filter(([name]) => !swept.has(name));
  const resolved = resolveParameters(request.model, Object.fromEntries(given));
  for (const name of swept) delete resolved[name];
  return resolved;
}

function run(request: DiagnosticRequest, onPoint?: ComputeOptions['onPoint']): ComputedResult {
  if (request.kind === 'phase-map') {
    const map = phaseMapSync(request, onPoint === undefined ? pointFunction : countingPoints(request, onPoint));
    return Object.assign(map, { params: fixedParams(request) });
  }
  const h = new BlochHamiltonian(request.model, request.params ?? {}, { convention: request.convention ?? 'lattice' });
  return Object.assign(computeOn(h, request), { params: { ...h.params } });
}

/**
 * One diagnostic on a compiled model whose parameter values are set: the request's own options
 * (its params and convention are already the model's).
 */
export function computeOn(h: BlochHamiltonian, request: KindRequest): KindResult {
  const { kind, model: _model, params: _params, convention: _convention, ...options } = request;
  return diagnosticOf(kind).run(h, options) as KindResult;
}

export interface ComputeAsyncOptions {
  /** Checked before the work starts and, for a phase map, between points. */
  signal?: { readonly aborted: boolean };
  /** The fraction of the work done: 0 at the start, 1 at the end, and per point for a phase map. */
  onProgress?: (fraction: number) => void;
}

/**
 * `compute` after the current task, so a host can queue requests and cancel ones that have not
 * started. A phase map runs point by point, yielding to the host between batches, so progress
 * shows and a stop takes effect between points; long loops inside still stop through
 * `checkInterrupt` (src/interrupt.ts).
 */
export async function computeAsync(request: DiagnosticRequest, options: ComputeAsyncOptions = {}): Promise<ComputedResult> {
  checkRequest(request);
  await Promise.resolve();
  if (options.signal?.aborted) throw new InterruptedError();
  checkInterrupt();
  options.onProgress?.(0);
  const result: ComputedResult =
    request.kind === 'phase-map'
      ? Object.assign(await runPhaseMap(request, {
          pointFunction,
          signal: options.signal,
          // Refinement schedules more points as it goes: the fraction is of those scheduled so far.
          onProgress: (p) => options.onProgress?.(p.total > 0 ? Math.min(p.done / p.total, 0.99) : 0),
        }), { params: fixedParams(request) })
      : run(request);
  options.onProgress?.(1);
  return result;
}

/**
 * The result of a whole split request from all its parts (topology/parts.ts), echoing the
 * parameter values the parts were computed with, as `compute` of the whole request does.
 */
export function joinParts(parts: readonly CurvaturePart[]): CurvatureResult;
export function joinParts(parts: readonly WannierFlowPart[]): WannierFlowResult;
export function joinParts(parts: readonly DiagnosticPart[]): CurvatureResult | WannierFlowResult;
export function joinParts(parts: readonly DiagnosticPart[]): CurvatureResult | WannierFlowResult {
  const joined = joinPartsOnly(parts);
  const params = (parts[0] as { params?: ParameterValues }).params;
  return params === undefined ? joined : Object.assign(joined, { params: { ...params } });
}
