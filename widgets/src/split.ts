/**
 * How a view shares one request among several engine workers: a curvature map by rows, a
 * Wannier-centre flow by across-momenta, each worker computing one part (the engine's `part`
 * option), joined here by the engine's own join (src/topology/parts.ts: a light module, no model
 * compilation), which reproduces the unsplit result exactly. Other requests go whole to one worker.
 */
import { joinParts, type DiagnosticPart } from '../../src/topology/parts.js';
import type { SplitPlan } from './compute-client.js';
import { withZ2, Z2_OF_PARTS } from './flow-z2.js';
import type { DiagnosticRequest, DiagnosticResult } from './protocol.js';

/** The engine's default grid for these kinds (src/topology/curvature.ts, wilson.ts). */
const DEFAULT_GRID = 64;
/** Fewer rows per part than this: splitting costs more (the extra edge row, the messages) than it saves. */
const MIN_ROWS_PER_PART = 8;

/** Workers per view: the cores the browser reports, at most four. */
export function engineWorkers(cores = globalThis.navigator?.hardwareConcurrency ?? 1): number {
  return Math.min(4, Math.max(1, Math.floor(cores)));
}

function rowsOf(request: DiagnosticRequest): number {
  const grid = request.grid;
  if (typeof grid === 'number') return grid;
  if (Array.isArray(grid) && grid.every((n) => typeof n === 'number')) return Math.min(...(grid as number[]));
  return DEFAULT_GRID;
}

export function splitPlan(workers: number): SplitPlan {
  return {
    parts(request) {
      const splittable = request.kind === 'curvature' || request.kind === 'wannier-flow';
      return splittable ? Math.max(1, Math.min(workers, Math.floor(rowsOf(request) / MIN_ROWS_PER_PART))) : 1;
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
