/**
 * How a view shares one request among several engine workers: a curvature map by rows, a
 * Wannier-centre flow by across-momenta, each worker computing one part (the engine's `part`
 * option), joined here by the engine's own join (src/topology/parts.ts), which reproduces the
 * unsplit result exactly. Which kinds split, and how many rows they have, is the registry's word
 * (src/diagnostics/registry.ts); other requests go whole to one worker.
 */
import { diagnosticOf, splits } from '../../src/diagnostics/registry.js';
import { joinParts, type DiagnosticPart } from '../../src/topology/parts.js';
import type { SplitPlan } from './compute-client.js';
import { withZ2, Z2_OF_PARTS } from './flow-z2.js';
import type { DiagnosticResult } from './protocol.js';

/** Fewer rows per part than this: splitting costs more (the extra edge row, the messages) than it saves. */
const MIN_ROWS_PER_PART = 8;

/** Workers per view: the cores the browser reports, at most four. */
export function engineWorkers(cores = globalThis.navigator?.hardwareConcurrency ?? 1): number {
  return Math.min(4, Math.max(1, Math.floor(cores)));
}

export function splitPlan(workers: number): SplitPlan {
  return {
    parts(request) {
      if (!splits(request.kind)) return 1;
      const rows = diagnosticOf(request.kind).splitRows?.(request) ?? 1;
      return Math.max(1, Math.min(workers, Math.floor(rows / MIN_ROWS_PER_PART)));
    },
    partRequest: (request, index, count) => ({ ...request, part: { index, count } }),
    join: (_request, parts) => {
      const joined = joinParts(parts as unknown as DiagnosticPart[]) as unknown as DiagnosticResult;
      // Each part echoes the parameter values it used (compute()); so does the whole.
      const params = (parts[0] as { params?: unknown } | undefined)?.params;
      const whole = params === undefined ? joined : { ...joined, params };
      // A flow's Z2 count comes whole with its first part (diagnose.ts).
      const z2 = parts[0]?.[Z2_OF_PARTS] as DiagnosticResult | undefined;
      return z2 === undefined ? whole : withZ2(whole, z2);
    },
  };
}
