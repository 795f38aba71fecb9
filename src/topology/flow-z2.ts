/**
 * A Wannier-centre flow with the engine's Z2 count beside it (src/views.ts adds it), also when the
 * flow is computed in parts (widgets/src/split.ts): kept apart from views.ts so a page's main
 * thread, which joins the parts, does not load the engine (this module imports nothing).
 */

/** A result as a view reads it: its kind, its checks and its fields. */
export interface ViewResult {
  kind: string;
  checks: { gapless?: boolean; warnings: string[] };
  [field: string]: unknown;
}

/** The flow with the Z2 count beside it (its warnings too; either being gapless withholds Z2). */
export function withZ2<R extends ViewResult>(flow: R, z2: ViewResult): R {
  const gapless = flow.checks.gapless === true || z2.checks.gapless === true;
  return {
    ...flow,
    z2: gapless ? null : (z2.z2 as number | null),
    checks: { ...flow.checks, gapless, warnings: [...flow.checks.warnings, ...z2.checks.warnings] },
  };
}

/** Where a part of a split flow (split.ts) carries the Z2 count, computed by part 0 only. */
export const Z2_OF_PARTS = 'z2Count';
