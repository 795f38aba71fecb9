/**
 * A figure (figures/: plotly traces and layout, plus a raster) drawn as a still picture on a
 * Pixels surface: title, axes with ticks and labels, heatmaps and the raster, lines, markers,
 * shapes, annotations and a legend row. It reads the subset of plotly's description our figures
 * use, so a kind looks the same in the live widget, in the kernel's PNG and in a saved notebook.
 */
import { colourTable, rasterPixels, type Raster } from '../picture.js';
import { GLYPH_HEIGHT, textWidth } from './font.js';
import { parseColour, Pixels, type Paint } from './pixels.js';

/** What is drawn: plotly-style traces and layout (read defensively), and the figure's raster. */
export interface DrawableFigure {
  data: readonly object[];
  layout: object;
  raster?: Raster;
}

type Json = Record<string, unknown>;
type Scale = [number, string][];

const WIDTH = 760;
const HEIGHT = 480;
const TEXT: Paint = { rgb: [34, 34, 34], alpha: 1 };
const AXIS: Paint = { rgb: [68, 68, 68], alpha: 1 };
const GRID: Paint = { rgb: [232, 232, 232], alpha: 1 };
const DEFAULT_LINE: Paint = { rgb: [31, 78, 121], alpha: 1 };
const NULL_GREY: Paint = { rgb: [187, 187, 187], alpha: 1 };
/** Plotly's default colour sequence start, for traces without a colour. */
const SEQUENCE = ['#1f77b4', '#ff7f0e', '#2ca02c', '#d62728', '#9467bd', '#8c564b'];

const obj = (v: unknown): Json => (v !== null && typeof v === 'object' && !Array.isArray(v) ? (v as Json) : {});
const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);
const str = (v: unknown): string => (typeof v === 'string' ? v : '');
const titleOf = (v: unknown): string => (typeof v === 'string' ? v : str(obj(v).text)).replace(/<br\s*\/?>/gi, ' ').replace(/<[^>]*>/g, '');

function numbers(v: unknown): (number | null)[] {
  if (ArrayBuffer.isView(v) && !(v instanceof DataView)) return Array.from(v as unknown as ArrayLike<number>, (x) => (Number.isFinite(x) ? x : null));
  if (Array.isArray(v)) return v.map((x) => num(x));
  return [];
}

function rows(v: unknown): (number | null)[][] {
  return Array.isArray(v) ? v.map((row) => numbers(row)) : [];
}

function scaleOf(v: unknown): Scale | null {
  if (!Array.isArray(v) || v.length < 2) return null;
  const out: Scale = [];
  for (const stop of v) {
    if (!Array.isArray(stop) || typeof stop[0] !== 'number' || typeof stop[1] !== 'string') return null;
    out.push([stop[0], stop[1]]);
  }
  return out;
}

/** The colour of value t in [0, 1] on a scale (stops linear in RGB, as plotly blends them). */
function onScale(scale: Scale, t: number): Paint {
  if (scale.every(([, c]) => /^#[0-9a-f]{6}$/i.test(c))) {
    const lut = colourTable(scale);
    const i = 3 * Math.round(Math.min(1, Math.max(0, t)) * (lut.length / 3 - 1));
    return { rgb: [lut[i], lut[i + 1], lut[i + 2]], alpha: 1 };
  }
  let best = scale[0];
  for (const stop of scale) if (stop[0] <= t) best = stop;
  return parseColour(best[1]) ?? DEFAULT_LINE;
}

/** About `count` round tick values (1, 2, 5 times a power of ten) over [lo, hi]. */
export function niceTicks(lo: number, hi: number, count = 6): number[] {
  if (!(hi > lo)) return [lo];
  const raw = (hi - lo) / count;
  const base = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 2.5, 5, 10].map((m) => m * base).find((s) => s >= raw) ?? 10 * base;
  const out: number[] = [];
  for (let v = Math.ceil(lo / step - 1e-9) * step; v <= hi + step * 1e-9; v += step) out.push(Math.abs(v) < step * 1e-9 ? 0 : v);
  return out;
}

export function tickLabel(v: number): string {
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e4 || a < 1e-3) return v.toExponential(1);
  return String(Number(v.toPrecision(4)));
}

interface Axis {
  lo: number;
  hi: number;
  /** Data value -> pixel. */
  at(v: number): number;
  ticks: { value: number; label: string }[];
  title: string;
}

function extent(values: Iterable<number | null>): [number, number] | null {
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of values) {
    if (v === null || !Number.isFinite(v)) continue;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  return lo <= hi ? [lo, hi] : null;
}

/** Every coordinate the traces put on an axis ('x', 'y' or 'y2'), to fit an axis with no range. */
function* coordinates(traces: Json[], which: 'x' | 'y' | 'y2'): Generator<number | null> {
  for (const t of traces) {
    const onY2 = t.yaxis === 'y2';
    if ((which === 'y2') !== onY2 && which !== 'x') continue;
    if (t.opacity === 0 || t.visible === false) continue;
    const values = which === 'x' ? numbers(t.x) : numbers(t.y);
    if (str(t.type) === 'heatmap' || str(t.type) === 'contour') {
      // Cell centres; the cells reach half a step further.
      const e = extent(values);
      if (e !== null && values.length > 1) {
        const step = (e[1] - e[0]) / (values.length - 1);
        yield e[0] - step / 2;
        yield e[1] + step / 2;
      }
      continue;
    }
    yield* values;
  }
}

function buildAxis(layoutAxis: Json, traces: Json[], which: 'x' | 'y' | 'y2', from: number, to: number, padded: boolean): Axis | null {
  const range = numbers(layoutAxis.range);
  let lo: number;
  let hi: number;
  if (range.length === 2 && range[0] !== null && range[1] !== null && range[0] !== range[1]) {
    [lo, hi] = [range[0], range[1]];
  } else {
    const e = extent(coordinates(traces, which));
    if (e === null) return null;
    [lo, hi] = e;
    if (hi === lo) [lo, hi] = [lo - 1, hi + 1];
    else if (padded) {
      const pad = 0.05 * (hi - lo);
      [lo, hi] = [lo - pad, hi + pad];
    }
  }
  const tickvals = numbers(layoutAxis.tickvals);
  const ticktext = Array.isArray(layoutAxis.ticktext) ? layoutAxis.ticktext.map((t) => String(t)) : [];
  const ticks =
    tickvals.length > 0
      ? tickvals.flatMap((v, i) => (v === null ? [] : [{ value: v, label: ticktext[i] ?? tickLabel(v) }]))
      : niceTicks(Math.min(lo, hi), Math.max(lo, hi), num(layoutAxis.dtick) === 1 ? Math.min(8, Math.abs(hi - lo)) : 6).map((value) => ({ value, label: tickLabel(value) }));
  const at = (v: number): number => from + ((v - lo) / (hi - lo)) * (to - from);
  return { lo, hi, at, ticks: ticks.filter((t) => t.value >= Math.min(lo, hi) - 1e-9 && t.value <= Math.max(lo, hi) + 1e-9), title: titleOf(layoutAxis.title) };
}

/** Splits a title into lines that fit `width` pixels at `scale`, breaking after ' — ' or ' · ' where it can. */
function wrap(text: string, width: number, scale: number): string[] {
  const lines: string[] = [];
  let rest = text.trim();
  while (rest && textWidth(rest, scale) > width && lines.length < 2) {
    let cut = -1;
    for (const sep of [' — ', ' · ', ', ', ' ']) {
      for (let i = rest.indexOf(sep); i > 0; i = rest.indexOf(sep, i + 1)) if (textWidth(rest.slice(0, i), scale) <= width) cut = Math.max(cut, i);
      if (cut > 0) break;
    }
    if (cut <= 0) break;
    lines.push(rest.slice(0, cut).trim());
    rest = rest.slice(cut).replace(/^\s*[—·,]?\s*/, '');
  }
  lines.push(rest);
  return lines;
}

interface Legend {
  name: string;
  paint: Paint;
  mark: 'line' | 'dot' | 'ring' | 'square' | 'cross';
  dashed: boolean;
}

/** The picture of a figure, `width` x `height` pixels (default 760 x 480). */
export function drawFigure(figure: DrawableFigure, width = WIDTH, height = HEIGHT): Pixels {
  const layout = obj(figure.layout);
  const traces = figure.data.map(obj).filter((t) => t.visible !== false);
  const px = new Pixels(width, height);
  const title = titleOf(layout.title);
  const titleLines = title ? wrap(title, width - 24, 2) : [];
  const hasY2 = Object.keys(obj(layout.yaxis2)).length > 0;

  // Legend entries: traces that ask for one, or all named traces when the layout places a legend.
  const legend: Legend[] = [];
  const legendWanted = Object.keys(obj(layout.legend)).length > 0;
  traces.forEach((t, i) => {
    const name = titleOf(t.name);
    const scatter = str(t.type) === 'scatter' || str(t.type) === 'scattergl' || t.type === undefined;
    if (!name || !scatter || t.showlegend === false || (!legendWanted && t.showlegend !== true)) return;
    const marker = obj(t.marker);
    const line = obj(t.line);
    const mode = str(t.mode) || 'lines';
    const filled = str(t.fill) !== '' && str(t.fill) !== 'none';
    const paint = (filled ? parseColour(t.fillcolor) : null) ?? parseColour(marker.color) ?? parseColour(line.color) ?? parseColour(SEQUENCE[i % SEQUENCE.length]) ?? DEFAULT_LINE;
    const symbol = str(marker.symbol);
    const mark = filled || symbol === 'square' ? 'square' : symbol.startsWith('x') ? 'cross' : symbol.includes('open') && !mode.includes('lines') ? 'ring' : mode.includes('lines') ? 'line' : 'dot';
    legend.push({ name, paint, mark, dashed: str(line.dash) !== '' && str(line.dash) !== 'solid' });
  });

  const top = 14 + titleLines.length * (GLYPH_HEIGHT * 2 + 6) + 8;
  const legendRows = legend.length ? 1 + Math.floor(legend.reduce((w, e) => w + textWidth(e.name, 1) + 34, 0) / (width - 80)) : 0;
  const bottom = height - 48 - legendRows * 16;
  const left = 74;
  const right = width - (hasY2 ? 70 : 24);
  const plotArea: [number, number, number, number] = [left, top, right, bottom];

  const xLayout = obj(layout.xaxis);
  const yLayout = obj(layout.yaxis);
  // Axes fitted to the data are padded as plotly pads them: scatter plots a little, maps not at all.
  const padded = !traces.some((t) => str(t.type) === 'heatmap' && t.opacity !== 0);
  const x = buildAxis(xLayout, traces, 'x', left, right, padded);
  let y = buildAxis(yLayout, traces, 'y', bottom, top, padded);
  const y2 = hasY2 ? buildAxis(obj(layout.yaxis2), traces, 'y2', bottom, top, true) : null;
  if (x === null || y === null) {
    px.text(width / 2, height / 2, title || 'no data', TEXT, { scale: 2, anchor: 'middle', baseline: 'middle' });
    return px;
  }
  // Equal scales when asked (a Brillouin zone keeps its shape): shrink the longer side.
  if (str(yLayout.scaleanchor) === 'x') {
    const ppuX = (right - left) / Math.abs(x.hi - x.lo);
    const ppuY = (bottom - top) / Math.abs(y.hi - y.lo);
    if (ppuX > ppuY) {
      const w = ppuY * Math.abs(x.hi - x.lo);
      const l = left + ((right - left) - w) / 2;
      plotArea[0] = l;
      plotArea[2] = l + w;
      x.at = (v: number) => l + ((v - x.lo) / (x.hi - x.lo)) * w;
    } else {
      const h = ppuX * Math.abs(y.hi - y.lo);
      const t = top + ((bottom - top) - h) / 2;
      plotArea[1] = t;
      plotArea[3] = t + h;
      y = { ...y, at: (v: number) => t + h - ((v - y!.lo) / (y!.hi - y!.lo)) * h };
    }
  }
  const [pl, pt, pr, pb] = plotArea;
  const yAxis = y;
  const along = (ref: unknown, v: number, axis: 'x' | 'y'): number => {
    if (str(ref) === 'paper') return axis === 'x' ? pl + v * (pr - pl) : pb - v * (pb - pt);
    return axis === 'x' ? x.at(v) : yAxis.at(v);
  };

  // Grid lines under everything.
  const gridOn = (a: Json) => a.showgrid !== false;
  if (gridOn(xLayout)) for (const t of x.ticks) px.fillRect(Math.round(x.at(t.value)), pt, Math.round(x.at(t.value)) + 1, pb, GRID);
  if (gridOn(yLayout)) for (const t of yAxis.ticks) px.fillRect(pl, Math.round(yAxis.at(t.value)), pr, Math.round(yAxis.at(t.value)) + 1, GRID);

  px.clipTo(plotArea);
  // Shapes drawn below the traces (filled rectangles).
  const shapes = (Array.isArray(layout.shapes) ? layout.shapes : []).map(obj);
  for (const s of shapes) {
    if (str(s.type) !== 'rect') continue;
    const fill = parseColour(s.fillcolor);
    const [x0, x1, y0, y1] = [num(s.x0), num(s.x1), num(s.y0), num(s.y1)];
    if (fill && x0 !== null && x1 !== null && y0 !== null && y1 !== null) px.fillRect(along(s.xref, x0, 'x'), along(s.yref, y0, 'y'), along(s.xref, x1, 'x'), along(s.yref, y1, 'y'), fill);
  }
  // The raster (a map of bricks) and heatmaps.
  if (figure.raster) drawRaster(px, figure.raster, x.at, yAxis.at);
  for (const t of traces) if (str(t.type) === 'heatmap' && t.opacity !== 0) drawHeatmap(px, t, x.at, yAxis.at);
  for (const s of shapes) {
    if (str(s.type) !== 'line') continue;
    const paint = parseColour(obj(s.line).color) ?? AXIS;
    const w = num(obj(s.line).width) ?? 1;
    const [x0, x1, y0, y1] = [num(s.x0), num(s.x1), num(s.y0), num(s.y1)];
    if (x0 !== null && x1 !== null && y0 !== null && y1 !== null) px.segment(along(s.xref, x0, 'x'), along(s.yref, y0, 'y'), along(s.xref, x1, 'x'), along(s.yref, y1, 'y'), w, paint);
  }
  // Filled areas under every line: a trace filled 'tonexty' down to the scatter trace before it
  // (a band between two curves).
  let previous: Json | null = null;
  for (const t of traces) {
    if (str(t.type) !== 'scatter' && str(t.type) !== 'scattergl') continue;
    const paint = parseColour(t.fillcolor);
    if (paint !== null && str(t.fill) === 'tonexty' && previous !== null) {
      const ys = t.yaxis === 'y2' && y2 ? y2 : yAxis;
      const points = (trace: Json) => {
        const yv = numbers(trace.y);
        return numbers(trace.x).flatMap((a, k) => (a === null || yv[k] === null || yv[k] === undefined ? [] : [[x.at(a), ys.at(yv[k] as number)]]));
      };
      const outline = [...points(t), ...points(previous).reverse()];
      px.polygon(outline.map((p) => p[0]), outline.map((p) => p[1]), paint);
    }
    previous = t;
  }
  // Scatter traces: lines first, then markers, in trace order.
  traces.forEach((t, i) => {
    if (str(t.type) !== 'scatter' && str(t.type) !== 'scattergl') return;
    const ys = t.yaxis === 'y2' && y2 ? y2 : yAxis;
    const xs = numbers(t.x);
    const yv = numbers(t.y);
    const mode = str(t.mode) || (xs.length > 20 ? 'lines' : 'lines+markers');
    const line = obj(t.line);
    const marker = obj(t.marker);
    const fallback = parseColour(SEQUENCE[i % SEQUENCE.length]) ?? DEFAULT_LINE;
    const opacity = num(t.opacity) ?? 1;
    if (mode.includes('lines') && num(line.width) !== 0) {
      const stroke = parseColour(line.color) ?? fallback;
      const paint = { ...stroke, alpha: stroke.alpha * opacity };
      const dash = str(line.dash);
      const step = str(line.shape) === 'hv';
      const lx: (number | null)[] = [];
      const ly: (number | null)[] = [];
      for (let k = 0; k < xs.length; k++) {
        const a = xs[k];
        const b = yv[k];
        if (a === null || b === null) {
          lx.push(null);
          ly.push(null);
          continue;
        }
        if (step && k > 0 && xs[k - 1] !== null && yv[k - 1] !== null) {
          lx.push(x.at(a));
          ly.push(ys.at(yv[k - 1] as number));
        }
        lx.push(x.at(a));
        ly.push(ys.at(b));
      }
      px.polyline(lx, ly, num(line.width) ?? 2, paint, dash === 'dash' ? [6, 4] : dash === 'dot' ? [2, 3] : null);
    }
    if (mode.includes('markers')) {
      // A trace drawn whole beyond the axes (cliponaxis: false), as plotly does: within the picture.
      if (t.cliponaxis === false) px.clipTo(null);
      drawMarkers(px, xs, yv, marker, x.at, ys.at, fallback);
      px.clipTo(plotArea);
    }
  });
  for (const s of shapes) {
    if (str(s.type) !== 'circle') continue;
    const [x0, x1, y0, y1] = [num(s.x0), num(s.x1), num(s.y0), num(s.y1)];
    if (x0 === null || x1 === null || y0 === null || y1 === null) continue;
    const cx = (along(s.xref, x0, 'x') + along(s.xref, x1, 'x')) / 2;
    const cy = (along(s.yref, y0, 'y') + along(s.yref, y1, 'y')) / 2;
    const r = Math.max(4, Math.abs(along(s.xref, x1, 'x') - along(s.xref, x0, 'x')) / 2);
    const fill = parseColour(s.fillcolor);
    if (fill) px.disc(cx, cy, r, fill);
    px.ring(cx, cy, r, num(obj(s.line).width) ?? 2, parseColour(obj(s.line).color) ?? AXIS);
  }
  px.clipTo(null);

  // Frame, ticks, labels and titles.
  for (const [x0, y0, x1, y1] of [[pl, pb, pr, pb], [pl, pt, pl, pb], [pl, pt, pr, pt], [pr, pt, pr, pb]] as const) px.segment(x0, y0, x1, y1, 1, AXIS);
  for (const t of x.ticks) {
    const at = x.at(t.value);
    px.segment(at, pb, at, pb + 5, 1, AXIS);
    px.text(at, pb + 9, t.label, TEXT, { anchor: 'middle', scale: t.label.length <= 2 && /[A-ZΓ]/.test(t.label) ? 2 : 1 });
  }
  for (const t of yAxis.ticks) {
    const at = yAxis.at(t.value);
    px.segment(pl - 5, at, pl, at, 1, AXIS);
    px.text(pl - 8, at, t.label, TEXT, { anchor: 'end', baseline: 'middle' });
  }
  if (y2) {
    for (const t of y2.ticks) {
      const at = y2.at(t.value);
      px.segment(pr, at, pr + 5, at, 1, AXIS);
      px.text(pr + 8, at, t.label, TEXT, { baseline: 'middle' });
    }
    if (y2.title) px.text(width - 10, (pt + pb) / 2, y2.title, TEXT, { vertical: true, anchor: 'middle', baseline: 'bottom' });
  }
  if (x.title) px.text((pl + pr) / 2, pb + 26, x.title, TEXT, { anchor: 'middle', scale: 1 });
  if (yAxis.title) px.text(12, (pt + pb) / 2, yAxis.title, TEXT, { vertical: true, anchor: 'middle' });
  titleLines.forEach((line, i) => px.text(width / 2, 12 + i * (GLYPH_HEIGHT * 2 + 6), line, TEXT, { scale: 2, anchor: 'middle' }));

  // Annotations (text at a data or paper position).
  for (const a of (Array.isArray(layout.annotations) ? layout.annotations : []).map(obj)) {
    const ax = num(a.x);
    const ay = num(a.y);
    const text = titleOf(a.text);
    if (ax === null || ay === null || !text) continue;
    const anchor = str(a.xanchor) === 'right' ? 'end' : str(a.xanchor) === 'left' ? 'start' : 'middle';
    px.text(along(a.xref, ax, 'x'), along(a.yref, ay, 'y'), text, TEXT, { anchor, baseline: 'middle' });
  }

  // Legend row(s) under the axis title.
  let lx = 74;
  let ly = height - 14 - legendRows * 16 + 8;
  for (const entry of legend) {
    const w = textWidth(entry.name, 1) + 34;
    if (lx + w > width - 10 && lx > 74) {
      lx = 74;
      ly += 16;
    }
    const cy = ly + 3;
    if (entry.mark === 'line') px.segment(lx, cy, lx + 18, cy, 2, entry.paint, entry.dashed ? [5, 3] : null);
    else if (entry.mark === 'square') px.fillRect(lx + 3, cy - 6, lx + 15, cy + 6, entry.paint);
    else if (entry.mark === 'cross') cross(px, lx + 9, cy, 5, 2, entry.paint);
    else if (entry.mark === 'ring') px.ring(lx + 9, cy, 4, 2, entry.paint);
    else px.disc(lx + 9, cy, 3, entry.paint);
    px.text(lx + 24, ly, entry.name, TEXT);
    lx += w;
  }
  return px;
}

function cross(px: Pixels, cx: number, cy: number, r: number, width: number, paint: Paint): void {
  px.segment(cx - r, cy - r, cx + r, cy + r, width, paint);
  px.segment(cx - r, cy + r, cx + r, cy - r, width, paint);
}

function drawMarkers(px: Pixels, xs: (number | null)[], ys: (number | null)[], marker: Json, ax: (v: number) => number, ay: (v: number) => number, fallback: Paint): void {
  const size = num(marker.size) ?? 6;
  const symbol = str(marker.symbol);
  const colours = numbers(marker.color);
  const scale = scaleOf(marker.colorscale);
  const cmin = num(marker.cmin) ?? -1;
  const cmax = num(marker.cmax) ?? 1;
  const single = parseColour(marker.color) ?? fallback;
  const edge = parseColour(obj(marker.line).color);
  const edgeWidth = num(obj(marker.line).width) ?? 0;
  for (let k = 0; k < xs.length; k++) {
    const a = xs[k];
    const b = ys[k];
    if (a === null || b === null) continue;
    const c = colours[k];
    const paint = scale && c !== undefined && c !== null ? onScale(scale, (c - cmin) / (cmax - cmin || 1)) : single;
    const cx = ax(a);
    const cy = ay(b);
    if (symbol.startsWith('x')) {
      // The gap-closing cross: a wide outline under a narrow stroke, as plotly draws it.
      if (edge && edgeWidth > 0) cross(px, cx, cy, size / 2, edgeWidth + 1, edge);
      cross(px, cx, cy, size / 2, 1.5, single);
    } else if (symbol === 'square') {
      px.fillRect(cx - size / 2, cy - size / 2, cx + size / 2, cy + size / 2, paint);
    } else if (symbol.includes('open')) {
      px.ring(cx, cy, size / 2, 1, paint);
    } else {
      px.disc(cx, cy, size / 2, paint);
    }
  }
}

/** A heatmap trace: cells centred on x, y, coloured by z over [zmin, zmax]; null cells grey. */
function drawHeatmap(px: Pixels, t: Json, ax: (v: number) => number, ay: (v: number) => number): void {
  const xs = numbers(t.x);
  const ys = numbers(t.y);
  const z = rows(t.z);
  const scale = scaleOf(t.colorscale);
  if (scale === null || xs.length === 0 || ys.length === 0 || z.length !== ys.length) return;
  const flat = z.flat();
  const range = extent(flat) ?? [0, 1];
  const zmin = num(t.zmin) ?? range[0];
  const zmax = num(t.zmax) ?? range[1];
  const edges = (c: (number | null)[]): number[] => {
    const v = c.map((q) => q ?? 0);
    if (v.length === 1) return [v[0] - 0.5, v[0] + 0.5];
    const out = [v[0] - (v[1] - v[0]) / 2];
    for (let i = 0; i + 1 < v.length; i++) out.push((v[i] + v[i + 1]) / 2);
    out.push(v[v.length - 1] + (v[v.length - 1] - v[v.length - 2]) / 2);
    return out;
  };
  const ex = edges(xs);
  const ey = edges(ys);
  for (let j = 0; j < ys.length; j++) {
    for (let i = 0; i < xs.length; i++) {
      const v = z[j][i];
      const paint = v === null || v === undefined ? NULL_GREY : onScale(scale, (v - zmin) / (zmax - zmin || 1));
      px.fillRect(ax(ex[i]), ay(ey[j + 1]), ax(ex[i + 1]), ay(ey[j]), paint);
    }
  }
}

/** The figure's raster, stretched over its data rectangle (nearest brick per pixel). */
function drawRaster(px: Pixels, raster: Raster, ax: (v: number) => number, ay: (v: number) => number): void {
  const colours = rasterPixels(raster);
  const left = ax(raster.x[0]);
  const right = ax(raster.x[1]);
  const topPx = ay(raster.y[1]);
  const bottomPx = ay(raster.y[0]);
  const x0 = Math.max(0, Math.floor(Math.min(left, right)));
  const x1 = Math.min(px.width, Math.ceil(Math.max(left, right)));
  const y0 = Math.max(0, Math.floor(Math.min(topPx, bottomPx)));
  const y1 = Math.min(px.height, Math.ceil(Math.max(topPx, bottomPx)));
  for (let y = y0; y < y1; y++) {
    const row = Math.min(raster.height - 1, Math.max(0, Math.floor(((y + 0.5 - topPx) / (bottomPx - topPx)) * raster.height)));
    for (let x = x0; x < x1; x++) {
      const col = Math.min(raster.width - 1, Math.max(0, Math.floor(((x + 0.5 - left) / (right - left)) * raster.width)));
      const o = 4 * (row * raster.width + col);
      px.blend(x, y, { rgb: [colours[o], colours[o + 1], colours[o + 2]], alpha: 1 });
    }
  }
}
