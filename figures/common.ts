/** What every figure builder returns, and helpers for reading results defensively. */
import type { Data, Layout } from './plotly-json.js';
import type { ViewResult, ModelSpecView } from '../contract/protocol.js';
import type { Raster, Sketch } from './picture.js';
import type { NumericArray } from '../contract/wire.js';

export interface FigureContext {
  spec: ModelSpecView;
  values: Record<string, number>;
  options: Record<string, unknown>;
}

export interface Figure {
  data: Data[];
  layout: Partial<Layout>;
  /** One line for the widget's summary bar, e.g. "C = 1 · min gap 0.42". */
  summary: string;
  /** The invariant shown, or null when withheld (gapless) or not applicable. */
  invariant: number | null;
  gapless: boolean;
  /** A map drawn as an image under the traces (the view adds it to the layout's images). */
  raster?: Raster;
  /** What a drag step draws instead of some scatter traces (picture.ts). */
  sketch?: Sketch;
  /**
   * Everything a redraw keeps besides the picture and the title text; when two successive figures
   * share it, a drag step previews only those two (preview.ts), and plotly redraws the rest at rest.
   */
  frameKey?: string;
}

/** Data export: named columns of numbers (CSV) next to the raw result (JSON). */
export interface Table {
  columns: string[];
  rows: (number | string | null)[][];
}

export class ResultShapeError extends Error {
  constructor(kind: string, field: string, found: unknown) {
    super(`${kind} result: field "${field}" missing or malformed. Value: ${describe(found)}`);
    this.name = 'ResultShapeError';
  }
}

function describe(value: unknown): string {
  if (value === undefined) return 'undefined';
  if (ArrayBuffer.isView(value)) return `${value.constructor.name}(${(value as NumericArray).length})`;
  const text = JSON.stringify(value);
  return text === undefined ? String(value) : text.length > 80 ? `${text.slice(0, 77)}...` : text;
}

export function numberArray(result: ViewResult, field: string): ArrayLike<number> {
  const value = result[field];
  if (ArrayBuffer.isView(value) && !(value instanceof DataView)) return value as NumericArray;
  if (Array.isArray(value) && value.every((v) => typeof v === 'number' || v === null)) return value as number[];
  throw new ResultShapeError(result.kind, field, value);
}

export function optionalNumber(result: ViewResult, field: string): number | null {
  const value = result[field];
  if (value === null || value === undefined) return null;
  if (typeof value === 'number') return value;
  throw new ResultShapeError(result.kind, field, value);
}

export function gridOf(result: ViewResult, field = 'grid'): [number, number] {
  const value = result[field] ?? result.checks?.grid;
  if (Array.isArray(value) && value.length >= 2 && value.every((n) => Number.isInteger(n) && n > 0)) {
    return [value[0] as number, value[1] as number];
  }
  throw new ResultShapeError(result.kind, field, value);
}

export function fmt(value: number, digits = 3): string {
  if (!Number.isFinite(value)) return String(value);
  if (value === 0) return '0';
  const abs = Math.abs(value);
  return abs >= 1e4 || abs < 1e-3 ? value.toExponential(digits - 1) : String(Number(value.toPrecision(digits)));
}

/** The energy unit of a model: the unit most of its parameters share (angles excluded). */
export function energyUnit(spec: ModelSpecView): string {
  const counts = new Map<string, number>();
  for (const p of Object.values(spec.parameters)) {
    if (p.unit && p.unit !== 'rad' && p.unit !== 'deg') counts.set(p.unit, (counts.get(p.unit) ?? 0) + 1);
  }
  let best = '';
  for (const [unit, n] of counts) if (n > (counts.get(best) ?? 0)) best = unit;
  return best;
}

/** A unit after a number: ' eV', or ' (units of t)' for a model's own energy scale. */
export function unitText(unit: string): string {
  if (!unit) return '';
  const scale = /^energy (\(units of .*\))$/.exec(unit);
  return ` ${scale ? scale[1] : unit}`;
}

export function withUnit(label: string, unit: string): string {
  return unit ? `${label} [${unit}]` : label;
}

/** A gap line for summaries: "min gap 0.42 eV" or the closing point (minGapAt is in units of b_i) when gapless. */
export function gapText(result: ViewResult, unit: string): string {
  const { minGap, minGapAt, gapless } = result.checks;
  if (minGap === null || minGap === undefined) return 'gap not measured';
  const at = minGapAt && minGapAt.length ? ` at k = (${minGapAt.map((k) => fmt(k)).join(', ')})` : '';
  if (gapless) return `gapless${at} (gap ${fmt(minGap)}${unitText(unit)})`;
  return `min gap ${fmt(minGap)}${unitText(unit)}`;
}

/**
 * A figure title placed under plotly's toolbar (which shows at the top right of the figure while
 * the pointer is over it), so the toolbar never covers it.
 */
export function titled(text: string): Partial<Layout['title']> & { text: string } {
  return { text, yref: 'container', y: 1, yanchor: 'top', pad: { t: 30, r: 0, b: 0, l: 0 } };
}

export const BASE_LAYOUT: Partial<Layout> = {
  margin: { l: 64, r: 24, t: 76, b: 56 },
  font: { family: 'system-ui, -apple-system, "Segoe UI", sans-serif', size: 12 },
  paper_bgcolor: 'rgba(0,0,0,0)',
  plot_bgcolor: '#ffffff',
  hovermode: 'closest',
  // Keep the user's zoom and pan while a drag redraws the figure.
  uirevision: 'chernel',
  // Tick labels never reach past our fixed margins; plotly's default overflow check measures every
  // label on every redraw (a fifth of a curvature map's redraw).
  template: {
    layout: { xaxis: { ticklabeloverflow: 'allow' }, yaxis: { ticklabeloverflow: 'allow' } },
    data: { heatmap: [{ colorbar: { ticklabeloverflow: 'allow' } }], contour: [{ colorbar: { ticklabeloverflow: 'allow' } }] },
  },
};

/** A diverging scale (blue, white, red) with zero pinned to white by `zmid: 0`. */
export const DIVERGING: [number, string][] = [
  [0, '#1f4e9c'],
  [0.25, '#6f9bd1'],
  [0.5, '#f7f7f7'],
  [0.75, '#e08a6f'],
  [1, '#a1221b'],
];

export const CLOSING_MARKER = { symbol: 'x-thin-open' as const, size: 14, color: '#000', line: { width: 3, color: '#d40000' } };

/**
 * The states of a finite sample (a ribbon, a slab) as points (k, E), coloured by the difference of
 * their weights on its two boundaries: red on the first, blue on the second, grey in the bulk. The
 * hover carries both weights, rounded to three decimals, which keeps a saved figure of tens of
 * thousands of states small.
 */
export function boundaryWeightedStates(
  xs: ArrayLike<number>,
  bandCount: number,
  energies: ArrayLike<number>,
  weights: [ArrayLike<number>, ArrayLike<number>],
  colorbar: { title: string; ends: [string, string] },
  hovertemplate: string,
): Data {
  const x: number[] = [], y: number[] = [], colour: number[] = [];
  const custom: [number, number][] = [];
  const [first, second] = weights;
  for (let p = 0; p < xs.length; p++) {
    for (let n = 0; n < bandCount; n++) {
      const i = p * bandCount + n;
      x.push(xs[p]);
      y.push(energies[i]);
      colour.push(first[i] - second[i]);
      custom.push([Math.round(first[i] * 1000) / 1000, Math.round(second[i] * 1000) / 1000]);
    }
  }
  return {
    type: 'scatter',
    mode: 'markers',
    x,
    y,
    customdata: custom,
    marker: {
      size: 3.5,
      color: colour,
      colorscale: [[0, '#1f4e9c'], [0.5, '#b8b8b8'], [1, '#b3261e']],
      cmin: -1,
      cmax: 1,
      colorbar: { title: { text: colorbar.title }, tickvals: [-1, 0, 1], ticktext: [colorbar.ends[1], 'bulk', colorbar.ends[0]] },
    },
    name: 'states',
    hovertemplate,
  };
}
