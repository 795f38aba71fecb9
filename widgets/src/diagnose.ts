/**
 * A widget's request -> the engine. Most widgets are one engine request; the flow widget with
 * `invariant: 'z2'` adds the engine's Z2 count to the flow it draws. Runs in the page's worker and
 * in the kernel (kernel/widgets.ts), so both compute the same thing.
 */
import { compute } from '../../src/index.js';
import type { DiagnosticRequest, DiagnosticResult } from './protocol.js';

type EngineRequest = Parameters<typeof compute>[0];

function run(request: Record<string, unknown>): DiagnosticResult {
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
