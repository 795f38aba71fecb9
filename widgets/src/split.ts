/**
 * How a view shares one request among several engine workers: a curvature map by rows, a
 * Wannier-centre flow by across-momenta, each worker computing one part (the engine's `part`
 * option), joined here by the engine's own join (src/topology/parts.ts), which reproduces the
 * unsplit result exactly. Which kinds split, and how many rows they have, is that module's word
 * (`SPLIT_ROWS`, which the registry's kinds point to); other requests go whole to one worker.
 * The page's main thread plans and joins without loading the engine.
 */
import { joinParts, SPLIT_ROWS, type DiagnosticPart } from '../../src/topology/parts.js';
import type { SplitPlan } from './compute-client.js';
import { withZ2, Z2_OF_PARTS } from '../../src/topology/flow-z2.js';
import type { ViewResult } from '../../contract/protocol.js';

/** Fewer rows per part than this: splitting costs more (the extra edge row, the messages) than it saves. */
const MIN_ROWS_PER_PART = 8;

/** Workers per view: the cores the browser reports, at most four. */
export function engineWorkers(cores = globalThis.navigator?.hardwareConcurrency ?? 1): number {
  return Math.min(4, Math.max(1, Math.floor(cores)));
}

export function splitPlan(workers: number): SplitPlan {
  return {
    parts(request) {
      if (!Object.hasOwn(SPLIT_ROWS, request.kind)) return 1;
      const rows = SPLIT_ROWS[request.kind as keyof typeof SPLIT_ROWS](request);
      return Math.max(1, Math.min(workers, Math.floor(rows / MIN_ROWS_PER_PART)));
    },
    partRequest: (request, index, count) => ({ ...request, part: { index, count } }),
    join: (_request, parts) => {
      const joined = joinParts(parts as unknown as DiagnosticPart[]) as unknown as ViewResult;
      // Each part echoes the parameter values it used (compute()); so does the whole.
      const params = (parts[0] as { params?: unknown } | undefined)?.params;
      const whole = params === undefined ? joined : { ...joined, params };
      // A flow's Z2 count comes whole with its first part (src/views.ts).
      const z2 = parts[0]?.[Z2_OF_PARTS] as ViewResult | undefined;
      return z2 === undefined ? whole : withZ2(whole, z2);
    },
  };
}
