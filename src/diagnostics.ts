/**
 * One unit of work everywhere: a diagnostic request (plain data: model, parameter values, what to
 * compute and its options) in, a result (plain data with typed arrays and its checks) out. The same
 * request runs in a notebook cell, in a widget's Web Worker and in a shard of a cluster sweep.
 */
import type { BlochConvention } from './bloch/hamiltonian.js';
import { BlochHamiltonian } from './bloch/hamiltonian.js';
import { checkInterrupt, InterruptedError } from './interrupt.js';
import { ModelError, show } from './model/errors.js';
import type { ModelSpec, ParameterValues } from './model/spec.js';
import { bands, type BandsOptions, type BandsResult } from './spectra/bands.js';
import { directGap, findGapClosings, type GapClosingOptions, type GapClosingResult, type GapOptions, type GapResult } from './spectra/gap.js';
import { berryPhase, type BerryPhaseOptions, type BerryPhaseResult } from './topology/berry.js';
import { chernNumber, type ChernOptions, type ChernResult } from './topology/chern.js';
import { curvatureMap, type CurvatureOptions, type CurvatureResult } from './topology/curvature.js';
import { wannierFlow, type WannierFlowOptions, type WannierFlowResult } from './topology/wilson.js';

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
  | (RequestBase & { kind: 'berry-phase' } & Without<BerryPhaseOptions>);

export type DiagnosticResult =
  | BandsResult
  | GapResult
  | GapClosingResult
  | ChernResult
  | CurvatureResult
  | WannierFlowResult
  | BerryPhaseResult;

export type DiagnosticKind = DiagnosticRequest['kind'];

export const DIAGNOSTIC_KINDS: readonly DiagnosticKind[] = ['bands', 'gap', 'gap-closings', 'chern', 'curvature', 'wannier-flow', 'berry-phase'];

/** The request's own options: everything but kind and model (params and convention stay). */
function optionsOf<T extends DiagnosticRequest>(request: T): Omit<T, 'kind' | 'model'> {
  const { kind: _kind, model: _model, ...rest } = request;
  return rest;
}

/** Compute one diagnostic. Throws ModelError (naming the field and value) on a malformed request. */
export function compute(request: DiagnosticRequest): DiagnosticResult {
  if (request === null || typeof request !== 'object') throw new ModelError('request', `expected a diagnostic request object. Value: ${show(request)}`);
  if (!DIAGNOSTIC_KINDS.includes(request.kind)) {
    throw new ModelError('kind', `unknown diagnostic ${show(request.kind)}; expected one of ${DIAGNOSTIC_KINDS.map((k) => `"${k}"`).join(', ')}`);
  }
  if (request.params !== undefined && (request.params === null || typeof request.params !== 'object' || Array.isArray(request.params))) {
    throw new ModelError('params', `expected an object of parameter values. Value: ${show(request.params)}`);
  }
  const h = new BlochHamiltonian(request.model, request.params ?? {}, { convention: request.convention ?? 'lattice' });
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
  }
}

export interface ComputeAsyncOptions {
  /** Checked before the work starts; a started computation stops through the host's interrupt flag. */
  signal?: { readonly aborted: boolean };
  /** Called with 0 when the work starts and 1 when it ends. */
  onProgress?: (fraction: number) => void;
}

/**
 * `compute` after the current task, so a host can queue requests and cancel ones that
 * have not started. Long loops inside still stop through `checkInterrupt` (src/interrupt.ts).
 */
export async function computeAsync(request: DiagnosticRequest, options: ComputeAsyncOptions = {}): Promise<DiagnosticResult> {
  await Promise.resolve();
  if (options.signal?.aborted) throw new InterruptedError();
  checkInterrupt();
  options.onProgress?.(0);
  const result = compute(request);
  options.onProgress?.(1);
  return result;
}
