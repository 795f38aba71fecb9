/**
 * A widget's request -> the engine. Most widgets are one engine request; the flow widget with
 * `invariant: 'z2'` adds the engine's Z2 count to the flow it draws. Runs in the page's worker and
 * in the kernel (kernel/widgets.ts), so both compute the same thing.
 */
import { bands, BlochHamiltonian, checkRequest, compute, curvatureMap, wannierFlow, type ModelSpec } from '../../src/index.js';
import type { DiagnosticRequest, DiagnosticResult } from './protocol.js';

type EngineRequest = Parameters<typeof compute>[0];

/**
 * A drag changes parameter values only: keep the last model compiled (validation and the mathjs
 * expressions cost ~15-20 ms for a 4-band model, a third of a 100x100 map) and re-evaluate its
 * amplitudes. These kinds take a compiled model directly; the others go through compute().
 */
const ON_COMPILED = {
  curvature: curvatureMap,
  'wannier-flow': wannierFlow,
  bands,
} as const;

let compiled: { key: string; hamiltonian: BlochHamiltonian } | null = null;

function compiledFor(request: Record<string, unknown>): BlochHamiltonian {
  const convention = request.convention === 'orbital' ? 'orbital' : 'lattice';
  const key = `${convention}\n${JSON.stringify(request.model)}`;
  const params = (request.params ?? {}) as Record<string, number>;
  if (compiled?.key === key) return compiled.hamiltonian.setParameters(params);
  compiled = null; // a model that fails to compile leaves nothing stale behind
  const hamiltonian = new BlochHamiltonian(request.model as ModelSpec, params, { convention });
  compiled = { key, hamiltonian };
  return hamiltonian;
}

function run(request: Record<string, unknown>): DiagnosticResult {
  const kind = request.kind as string;
  if (Object.hasOwn(ON_COMPILED, kind) && request.params !== null && typeof request.params === 'object') {
    const { kind: _kind, model: _model, params: _params, convention: _convention, ...options } = request;
    // The same checks compute() makes (field names, cost), then the compiled model.
    checkRequest(request as unknown as EngineRequest);
    const diagnostic = ON_COMPILED[kind as keyof typeof ON_COMPILED] as (h: BlochHamiltonian, o: object) => object;
    const hamiltonian = compiledFor(request);
    return Object.assign(diagnostic(hamiltonian, options), { params: { ...hamiltonian.params } }) as unknown as DiagnosticResult;
  }
  // Widget state is untyped JSON; compute() validates the request and names any bad field.
  return compute(request as unknown as EngineRequest) as unknown as DiagnosticResult;
}

export function diagnose(request: DiagnosticRequest): DiagnosticResult {
  if (request.kind === 'wannier-flow' && request.invariant === 'z2') {
    const { invariant: _invariant, ...flowRequest } = request;
    const flow = run(flowRequest);
    const z2 = run({ kind: 'z2', model: request.model, params: request.params, bands: request.bands, method: 'flow' });
    const gapless = flow.checks.gapless === true || z2.checks.gapless === true;
    return {
      ...flow,
      z2: gapless ? null : z2.z2,
      checks: { ...flow.checks, gapless, warnings: [...flow.checks.warnings, ...z2.checks.warnings] },
    };
  }
  return run(request);
}
