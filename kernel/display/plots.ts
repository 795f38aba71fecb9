/** Plot figures for plottable results (filled in below the core). */
import type { ResultLike } from './summary.js';

export interface Plot {
  figure: { data: unknown[]; layout: Record<string, unknown> };
  fallback: { mime: 'image/svg+xml' | 'image/png'; data: string } | null;
}

export function plotFor(_result: ResultLike): Plot | null {
  return null;
}
