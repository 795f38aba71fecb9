/**
 * How much memory and output one cell may use. Defaults: memory is half the machine's RAM, at most
 * 4096 MB; output is 10 MB per cell. `CHERNEL_CELL_MEMORY_MB` and `CHERNEL_OUTPUT_MB` (for example
 * in the kernelspec's `env`) change them.
 */

import { totalmem } from 'node:os';

export interface CellLimits {
  /** The whole cell process: JavaScript heap, typed arrays, native buffers (resident size). */
  totalMb: number;
  /** The worker's JavaScript heap, a share of the total so the heap limit is met first. */
  heapMb: number;
  outputBytes: number;
  /** Where the memory limit came from, said in the error when it is hit. */
  source: string;
}

export const DEFAULT_CELL_MEMORY_MB = Math.min(4096, Math.floor(totalmem() / 2 ** 20 / 2));
export const DEFAULT_OUTPUT_MB = 10;
const SMALLEST_MB = 256;

/** A positive number of MB from the environment; a malformed one is reported and the default kept. */
function positive(env: NodeJS.ProcessEnv, name: string, warnings: string[]): number | null {
  const text = env[name];
  if (text === undefined || text === '') return null;
  const value = Number(text);
  if (Number.isFinite(value) && value > 0) return value;
  warnings.push(`${name}: expected a positive number of MB, got ${JSON.stringify(text)}; using the default`);
  return null;
}

/** The limits from the environment (the kernel logs `warnings` once, at start). */
export function cellLimits(env: NodeJS.ProcessEnv, warnings: string[] = []): CellLimits {
  const asked = positive(env, 'CHERNEL_CELL_MEMORY_MB', warnings);
  const totalMb = Math.max(SMALLEST_MB, Math.floor(asked ?? DEFAULT_CELL_MEMORY_MB));
  const outputMb = positive(env, 'CHERNEL_OUTPUT_MB', warnings) ?? DEFAULT_OUTPUT_MB;
  return {
    totalMb,
    heapMb: Math.floor(totalMb * 0.75),
    outputBytes: Math.floor(outputMb * 1e6),
    source: asked === null ? `the default; set CHERNEL_CELL_MEMORY_MB to change it` : `CHERNEL_CELL_MEMORY_MB=${asked}`,
  };
}
