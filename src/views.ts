/**
 * What a view of a result computes (a widget, in the page's worker and in the kernel, so both
 * compute the same thing). Most views are one engine request; a Wannier-centre flow also reads the
 * engine's Z2 count beside the flow it shows (asked for with `invariant: 'z2'`, and by default for
 * a time-reversal-symmetric band group; `invariant: 'winding'` keeps the winding alone).
 */
import { BlochHamiltonian } from './bloch/hamiltonian.js';
import { compute, computeOn } from './compute.js';
import type { KindRequest } from './diagnostics/registry.js';
import type { ModelSpec } from './model/spec.js';
import { checkRequest, type DiagnosticRequest } from './request.js';
import { withZ2, Z2_OF_PARTS, type ViewResult } from './topology/flow-z2.js';

/** A view's request as it arrives: untyped JSON shaped like a diagnostic request. */
export type ViewRequest = Readonly<Record<string, unknown>> & { kind: string };
export type { ViewResult };

/**
 * A drag changes parameter values only: keep the last model compiled (validation and the mathjs
 * expressions cost ~15-20 ms for a 4-band model, a third of a 100x100 map) and re-evaluate its
 * amplitudes. Every kind but the phase map (which compiles once per sweep) runs on it.
 */
let compiled: { key: string; hamiltonian: BlochHamiltonian } | null = null;

function compiledFor(request: ViewRequest): BlochHamiltonian {
  const convention = request.convention === 'orbital' ? 'orbital' : 'lattice';
  const key = `${convention}\n${JSON.stringify(request.model)}`;
  const params = (request.params ?? {}) as Record<string, number>;
  if (compiled?.key === key) return compiled.hamiltonian.setParameters(params);
  compiled = null; // a model that fails to compile leaves nothing stale behind
  const hamiltonian = new BlochHamiltonian(request.model as ModelSpec, params, { convention });
  compiled = { key, hamiltonian };
  return hamiltonian;
}

function run(request: ViewRequest): ViewResult {
  // Untyped JSON: the engine's one check names any bad field first.
  checkRequest(request as unknown as DiagnosticRequest);
  if (request.kind === 'phase-map') return compute(request as unknown as DiagnosticRequest) as unknown as ViewResult;
  const hamiltonian = compiledFor(request);
  return Object.assign(computeOn(hamiltonian, request as unknown as KindRequest), { params: { ...hamiltonian.params } }) as unknown as ViewResult;
}

/**
 * The engine's Z2 count refuses a band group whose Wannier centres are not Kramers pairs at the
 * time-reversal-invariant momenta (src/topology/z2.ts says so in a warning): such a group is not
 * time-reversal symmetric, and its flow is read by its winding instead.
 */
const NOT_KRAMERS = /not in Kramers pairs/;

/** Reports points done of the points planned (the grid; boundary refinement adds a few). */
export type OnPoints = (done: number, total: number) => void;

export function computeView(request: ViewRequest, onPoints?: OnPoints): ViewResult {
  if (request.kind === 'phase-map' && onPoints !== undefined) return compute(request as unknown as DiagnosticRequest, { onPoint: onPoints }) as unknown as ViewResult;
  if (request.kind === 'wannier-flow') {
    // `invariant` is the widget's, not an engine option.
    const { invariant, ...flowRequest } = request;
    const flow = run(flowRequest);
    const part = request.part as { index?: number } | undefined;
    if (invariant === 'winding' || (part !== undefined && part.index !== 0)) return flow;
    let z2: ViewResult;
    try {
      z2 = run({ kind: 'z2', model: request.model, params: request.params, bands: request.bands, method: 'flow' });
    } catch (err) {
      if (invariant === 'z2') throw err;
      return flow;
    }
    // Asked for by default: kept only for a time-reversal-symmetric group.
    if (invariant === undefined && z2.checks.warnings.some((w) => NOT_KRAMERS.test(w))) return flow;
    return part !== undefined ? { ...flow, [Z2_OF_PARTS]: z2 } : withZ2(flow, z2);
  }
  if (request.kind === 'local-marker') return withCleanChern(request, run(request));
  return run(request);
}

/**
 * Beside a marker map at half filling (no `fermiEnergy`), the clean crystal's Chern number of the
 * lower half of the bands, the bulk value the marker should approach (null when the engine withholds
 * it). The model is already compiled (`run`), so this costs one Chern number per parameter change.
 */
let cleanCache: { key: string; chern: number | null } | null = null;

function withCleanChern(request: ViewRequest, marker: ViewResult): ViewResult {
  if (request.fermiEnergy !== undefined || request.model === undefined) return marker;
  const key = JSON.stringify([request.model, request.params, request.convention]);
  if (cleanCache?.key !== key) {
    let chern: number | null;
    try {
      chern = (computeOn(compiledFor(request), { kind: 'chern' } as KindRequest) as unknown as { chern: number | null }).chern;
    } catch {
      return marker; // a model the Chern number does not apply to: the map stands alone
    }
    cleanCache = { key, chern };
  }
  return { ...marker, cleanChern: cleanCache.chern };
}
