/**
 * A Wannier-centre flow with the engine's Z2 count beside it (diagnose.ts adds it), also when the
 * flow is computed in parts (split.ts): kept apart from diagnose.ts so the page's main thread,
 * which joins the parts, does not load the engine.
 */
import type { DiagnosticResult } from './protocol.js';

/** The flow with the Z2 count beside it (its warnings too; either being gapless withholds Z2). */
export function withZ2(flow: DiagnosticResult, z2: DiagnosticResult): DiagnosticResult {
  const gapless = flow.checks.gapless === true || z2.checks.gapless === true;
  return {
    ...flow,
    z2: gapless ? null : (z2.z2 as number | null),
    checks: { ...flow.checks, gapless, warnings: [...flow.checks.warnings, ...z2.checks.warnings] },
  };
}

/** Where a part of a split flow (split.ts) carries the Z2 count, computed by part 0 only. */
export const Z2_OF_PARTS = 'z2Count';

