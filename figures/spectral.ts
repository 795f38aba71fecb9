/**
 * What the surface figures share: spectral weights of the three panels (the two terminations and
 * the bulk projection) side by side along one x axis, as one raster on a logarithmic colour scale
 * relative to the largest weight shown; and the summary line (the cut, eta, the warnings).
 * One x axis (not subplots) so a drag step previews the whole picture as one image (preview.ts).
 */
import type { ViewResult } from '../contract/protocol.js';
import type { Raster } from './picture.js';
import { fmt, numberArray, ResultShapeError, unitText } from './common.js';
import type { Data } from './plotly-json.js';

/** The panels, left to right: result field and its name on the figure. */
export const PANELS = [
  { field: 'bottom', name: 'bottom termination' },
  { field: 'top', name: 'top termination' },
  { field: 'bulk', name: 'bulk projection' },
] as const;

/** Decades of the colour scale below the largest weight shown. */
export const DECADES = 4;

/** White at the floor (and in the gaps between panels), dark at the largest weight. */
export const SPECTRAL_SCALE: [number, string][] = [
  [0, '#ffffff'],
  [0.3, '#dfe6c4'],
  [0.55, '#e0a458'],
  [0.8, '#b03a2e'],
  [1, '#2d0f2b'],
];

/** Where the colour-bar heatmap sits: far outside any axis range. */
const OUTSIDE = 1e6;

export interface PanelGeometry {
  /** Columns per panel (samples along x) and the gap between panels, in columns. */
  columns: number;
  gap: number;
  /** Width of one column in x units. */
  dx: number;
  /** x of column c of panel p. */
  at(p: number, c: number): number;
  /** Panel p spans [left(p), left(p) + (columns - 1) dx] at its column centres. */
  left(p: number): number;
}

/** Panels of `columns` samples, the first at x0, dx apart, with a gap of at least two columns between panels. */
export function panelGeometry(columns: number, x0: number, dx: number): PanelGeometry {
  const gap = Math.max(2, Math.round(0.08 * columns));
  const stride = (columns - 1 + gap) * dx;
  return { columns, gap, dx, at: (p, c) => x0 + p * stride + c * dx, left: (p) => x0 + p * stride };
}

/** The three weights of a result, each `columns * rows` long, checked. */
export function panelWeights(result: ViewResult, size: number): ArrayLike<number>[] {
  return PANELS.map(({ field }) => {
    const w = numberArray(result, field);
    if (w.length !== size) throw new ResultShapeError(result.kind, field, w);
    return w;
  });
}

/** The largest weight over the panels (0 when all vanish). */
export function largestWeight(weights: ArrayLike<number>[]): number {
  let peak = 0;
  for (const w of weights) for (let i = 0; i < w.length; i++) if (w[i] > peak) peak = w[i];
  return peak;
}

/**
 * The raster of the panels: `value(p, c, r)` the weight of panel p at column c and row r (row 0 the
 * bottom of the picture), drawn as log10(weight / peak) clipped to [-DECADES, 0]; gap columns take
 * the floor colour (white).
 */
export function panelRaster(geometry: PanelGeometry, rows: number, y: [number, number], peak: number, value: (p: number, c: number, r: number) => number): Raster {
  const { columns, gap, dx } = geometry;
  const width = PANELS.length * columns + (PANELS.length - 1) * (gap - 1);
  const values = new Float32Array(width * rows).fill(-DECADES - 1);
  const norm = peak > 0 ? 1 / peak : 0;
  for (let p = 0; p < PANELS.length; p++) {
    const offset = p * (columns - 1 + gap);
    for (let r = 0; r < rows; r++) {
      const line = (rows - 1 - r) * width + offset;
      for (let c = 0; c < columns; c++) {
        const v = value(p, c, r) * norm;
        values[line + c] = v > 0 ? Math.max(-DECADES, Math.log10(v)) : -DECADES;
      }
    }
  }
  const left = geometry.at(0, 0) - dx / 2;
  return { width, height: rows, values, x: [left, left + width * dx], y, range: [-DECADES, 0], colorscale: SPECTRAL_SCALE };
}

/** The colour bar of the raster: a two-brick heatmap far outside the axis ranges, ticks in decades. */
export function colourBarTrace(): Data {
  const ticks = Array.from({ length: DECADES + 1 }, (_, i) => -DECADES + i);
  return {
    type: 'heatmap',
    x: [OUTSIDE, OUTSIDE + 1],
    y: [OUTSIDE],
    z: [[-DECADES, 0]],
    zmin: -DECADES,
    zmax: 0,
    colorscale: SPECTRAL_SCALE,
    colorbar: { title: { text: 'A / max A' }, tickvals: ticks, ticktext: ticks.map((t) => (t === 0 ? '1' : `1e${t}`)) },
    hoverinfo: 'skip',
    name: 'colour scale',
  };
}

/** The panels' names over their middles. */
export function panelAnnotations(geometry: PanelGeometry): { x: number; y: number; xref: 'x'; yref: 'paper'; text: string; showarrow: false; yanchor: 'bottom' }[] {
  return PANELS.map(({ name }, p) => ({
    x: geometry.left(p) + ((geometry.columns - 1) * geometry.dx) / 2,
    y: 1,
    xref: 'x' as const,
    yref: 'paper' as const,
    text: name,
    showarrow: false as const,
    yanchor: 'bottom' as const,
  }));
}

export interface CutShape {
  miller: number[];
}

/** The cut as the summary writes it: Miller indices "(0 1)". */
export function cutText(result: ViewResult): string {
  const cut = result.cut as Partial<CutShape> | undefined;
  if (!cut || !Array.isArray(cut.miller) || !cut.miller.every((m) => typeof m === 'number')) throw new ResultShapeError(result.kind, 'cut', cut);
  return `cut (${cut.miller.join(' ')})`;
}

/** "1 warning: ..." (the first, and how many more), or '' without warnings. */
export function warningText(result: ViewResult): string {
  const warnings = result.checks?.warnings ?? [];
  if (warnings.length === 0) return '';
  const first = warnings[0].length > 90 ? `${warnings[0].slice(0, 87)}...` : warnings[0];
  return ` · ${warnings.length} warning${warnings.length > 1 ? 's' : ''}: ${first}`;
}

/** "cut (0 1) · η = 0.036 (units of t)" with the warnings after. */
export function spectralSummary(result: ViewResult, unit: string, lead: string): string {
  const eta = result.eta;
  if (typeof eta !== 'number') throw new ResultShapeError(result.kind, 'eta', eta);
  return `${lead} · ${cutText(result)} · η = ${fmt(eta)}${unitText(unit)}${warningText(result)}`;
}
