/**
 * One unit of work everywhere: a diagnostic request (plain data: model, parameter values, what to
 * compute and its options) in, a result (plain data with typed arrays and its checks) out. The same
 * request runs in a notebook cell, in a widget's Web Worker and in a shard of a cluster sweep.
 */
import type { BlochConvention } from './bloch/hamiltonian.js';
import { BlochHamiltonian } from './bloch/hamiltonian.js';
import { checkCost } from './cost.js';
import { checkInterrupt, InterruptedError } from './interrupt.js';
import { ModelError, show } from './model/errors.js';
import { resolveParameters } from './model/expressions.js';
import { checkRequestFields, didYouMean } from './request-fields.js';
import type { ModelSpec, ParameterValues } from './model/spec.js';
import type { PointFunctionFactory } from './scan/executor.js';
import { pointFunction } from './scan/point.js';
import { phaseMapSync, runPhaseMap } from './scan/run.js';
import type { PhaseMapRequest, PhaseMapResult } from './scan/sweep.js';
import { bands, type BandsOptions, type BandsResult } from './spectra/bands.js';
import { directGap, findGapClosings, type GapClosingOptions, type GapClosingResult, type GapOptions, type GapResult } from './spectra/gap.js';
import { ribbonSpectrum, type RibbonSpectrumOptions, type RibbonSpectrumResult } from './spectra/ribbon.js';
import { berryPhase, type BerryPhaseOptions, type BerryPhaseResult } from './topology/berry.js';
import { chernNumber, type ChernOptions, type ChernResult } from './topology/chern.js';
import { majoranaNumber, windingNumber, type MajoranaResult, type WindingOptions, type WindingResult } from './topology/chiral.js';
import type { TopologyOptions } from './topology/common.js';
import { curvatureMap, type CurvatureOptions, type CurvatureResult } from './topology/curvature.js';
import { hallConductivity, type HallOptions, type HallResult } from './topology/hall.js';
import { joinParts as joinPartsOnly, type CurvaturePart, type DiagnosticPart, type WannierFlowPart } from './topology/parts.js';
import { weylPoints, type WeylOptions, type WeylResult } from './topology/weyl.js';
import { wannierFlow, type WannierFlowOptions, type WannierFlowResult } from './topology/wilson.js';
import { spinChern, z2Index, type SpinChernResult, type Z2Options, type Z2Result } from './topology/z2.js';

/** What every request carries besides its options. */
interface RequestBase {
  model: ModelSpec;
  params?: ParameterValues;
  convention?: BlochConvention;
}

type Without<T> = Omit<T, 'params' | 'convention'>;

export type DiagnosticRequest =
  | (RequestBase & { kind: 'bands' } & Without<BandsOptions>)
  | (RequestBase & { kind: 'gap' } & Without<GapOptions>)
  | (RequestBase & { kind: 'gap-closings' } & Without<GapClosingOptions>)
  | (RequestBase & { kind: 'chern' } & Without<ChernOptions>)
  | (RequestBase & { kind: 'curvature' } & Without<CurvatureOptions>)
  | (RequestBase & { kind: 'wannier-flow' } & Without<WannierFlowOptions>)
  | (RequestBase & { kind: 'berry-phase' } & Without<BerryPhaseOptions>)
  | (RequestBase & { kind: 'z2' } & Without<Z2Options>)
  | (RequestBase & { kind: 'spin-chern' } & Without<ChernOptions>)
  | (RequestBase & { kind: 'winding' } & Without<WindingOptions>)
  | (RequestBase & { kind: 'majorana' } & Without<Omit<TopologyOptions, 'bands'>>)
  | (RequestBase & { kind: 'weyl' } & Without<WeylOptions>)
  | (RequestBase & { kind: 'hall' } & Without<HallOptions>)
  | (RequestBase & { kind: 'ribbon' } & Without<RibbonSpectrumOptions>)
  | PhaseMapRequest;

export type DiagnosticResult =
  | BandsResult
  | GapResult
  | GapClosingResult
  | ChernResult
  | CurvatureResult
  | WannierFlowResult
  | BerryPhaseResult
  | Z2Result
  | SpinChernResult
  | WindingResult
  | MajoranaResult
  | WeylResult
  | HallResult
  | RibbonSpectrumResult
  | PhaseMapResult
  /** A 'curvature' or 'wannier-flow' request with `part`: one part, for `joinParts` (topology/parts.ts). */
  | DiagnosticPart;

export type DiagnosticKind = DiagnosticRequest['kind'];

export const DIAGNOSTIC_KINDS: readonly DiagnosticKind[] = [
  'bands', 'gap', 'gap-closings', 'ribbon', 'chern', 'curvature', 'wannier-flow', 'berry-phase', 'z2', 'spin-chern',
  'winding', 'majorana', 'weyl', 'hall', 'phase-map',
];

/** The request's own options: everything but kind and model (params and convention stay). */
function optionsOf<T extends DiagnosticRequest>(request: T): Omit<T, 'kind' | 'model'> {
  const { kind: _kind, model: _model, ...rest } = request;
  return rest;
}

/** Every result carries the parameter values it was computed with, defaults filled in. */
export type ComputedResult = DiagnosticResult & { params: ParameterValues };

/**
 * Checks a request before any work: its kind, the names of all its fields (a misspelt option is an
 * error naming the closest valid one), the shape of its parameter values and its cost (refused when
 * it cannot fit the budget, src/cost.ts). The model and the values themselves are checked when the
 * model is compiled.
 */
export function checkRequest(request: DiagnosticRequest): void {
  if (request === null || typeof request !== 'object' || Array.isArray(request)) throw new ModelError('request', `expected a diagnostic request object. Value: ${show(request)}`);
  if (!DIAGNOSTIC_KINDS.includes(request.kind)) {
    const hint = typeof request.kind === 'string' ? didYouMean(request.kind, DIAGNOSTIC_KINDS) : '';
    throw new ModelError('kind', `unknown diagnostic ${show(request.kind)}${hint} (expected one of ${DIAGNOSTIC_KINDS.map((k) => `"${k}"`).join(', ')})`);
  }
  checkRequestFields(request);
  if (request.params !== undefined && (request.params === null || typeof request.params !== 'object' || Array.isArray(request.params))) {
    throw new ModelError('params', `expected an object of parameter values. Value: ${show(request.params)}`);
  }
  checkCost(request);
}

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

/** One non-sweep diagnostic on a compiled model. */
function computeOn(h: BlochHamiltonian, request: Exclude<DiagnosticRequest, PhaseMapRequest>): DiagnosticResult {
  switch (request.kind) {
    case 'bands':
      return bands(h, optionsOf(request));
    case 'gap':
      return directGap(h, optionsOf(request));
    case 'gap-closings':
      return findGapClosings(h, optionsOf(request));
    case 'chern':
      return chernNumber(h, optionsOf(request));
    case 'curvature':
      return curvatureMap(h, optionsOf(request));
    case 'wannier-flow':
      return wannierFlow(h, optionsOf(request));
    case 'berry-phase':
      return berryPhase(h, optionsOf(request));
    case 'z2':
      return z2Index(h, optionsOf(request));
    case 'spin-chern':
      return spinChern(h, optionsOf(request));
    case 'winding':
      return windingNumber(h, optionsOf(request));
    case 'majorana':
      return majoranaNumber(h, optionsOf(request));
    case 'weyl':
      return weylPoints(h, optionsOf(request));
    case 'hall':
      return hallConductivity(h, optionsOf(request));
    case 'ribbon':
      return ribbonSpectrum(h, optionsOf(request));
  }
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
