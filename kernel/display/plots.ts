/**
 * Plotly figures for plottable engine results, by `kind`, with a cheap static fallback (SVG for
 * line and point plots, PNG for maps) for front ends without the plotly renderer. Written against
 * the result shapes in src/ (BandsResult, RibbonSpectrumResult, CurvatureResult,
 * WannierFlowResult, PhaseMapResult); a result missing the fields it needs simply gets no plot.
 */

import { encodePng } from '../png.js';
import type { ResultLike } from './summary.js';

export interface Figure {
  data: Record<string, unknown>[];
  layout: Record<string, unknown>;
}

export interface Plot {
  figure: Figure;
  fallback: { mime: 'image/svg+xml' | 'image/png'; data: string } | null;
}

type Numbers = ArrayLike<number>;

function isNumbers(value: unknown): value is Numbers {
  return ArrayBuffer.isView(value) || (Array.isArray(value) && value.every((v) => typeof v === 'number'));
}

interface PathLike {
  distance: Numbers;
  labels: { label: string; distance: number }[];
  breaks: number[];
}

function pathOf(value: unknown): PathLike | null {
  const p = value as Partial<PathLike> | null;
  return p && isNumbers(p.distance) && Array.isArray(p.labels) && Array.isArray(p.breaks) ? (p as PathLike) : null;
}

const LAYOUT = { margin: { l: 60, r: 20, t: 30, b: 50 }, width: 640, height: 420, showlegend: false };

// --- static fallbacks -------------------------------------------------------------------------------
interface Series {
  x: (number | null)[];
  y: (number | null)[];
}

function extent(values: Iterable<number | null>): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of values) if (v !== null && Number.isFinite(v)) [lo, hi] = [Math.min(lo, v), Math.max(hi, v)];
  if (!Number.isFinite(lo)) return [0, 1];
  return lo === hi ? [lo - 1, hi + 1] : [lo, hi];
}

/** Lines (null breaks a line) or dots, on simple axes. */
function svgPlot(series: Series[], mode: 'lines' | 'markers', title: string): string {
  const W = 640;
  const H = 420;
  const m = { l: 50, r: 15, t: 25, b: 30 };
  const [x0, x1] = extent(series.flatMap((s) => s.x));
  const [y0, y1] = extent(series.flatMap((s) => s.y));
  const sx = (x: number): number => m.l + ((x - x0) / (x1 - x0)) * (W - m.l - m.r);
  const sy = (y: number): number => H - m.b - ((y - y0) / (y1 - y0)) * (H - m.t - m.b);
  const parts: string[] = [];
  for (const s of series) {
    if (mode === 'lines') {
      let d = '';
      let pen = false;
      for (let i = 0; i < s.x.length; i++) {
        const x = s.x[i];
        const y = s.y[i];
        if (x === null || y === null) {
          pen = false;
          continue;
        }
        d += `${pen ? 'L' : 'M'}${sx(x).toFixed(1)},${sy(y).toFixed(1)}`;
        pen = true;
      }
      parts.push(`<path d="${d}" fill="none" stroke="#1f4e79" stroke-width="1.3"/>`);
    } else {
      for (let i = 0; i < s.x.length; i++) {
        const x = s.x[i];
        const y = s.y[i];
        if (x !== null && y !== null) parts.push(`<circle cx="${sx(x).toFixed(1)}" cy="${sy(y).toFixed(1)}" r="1.6" fill="#1f4e79"/>`);
      }
    }
  }
  const label = (v: number): string => (Math.abs(v) >= 1e3 || (Math.abs(v) < 1e-2 && v !== 0) ? v.toExponential(1) : v.toFixed(2));
  return (
    `<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}" viewBox="0 0 ${W} ${H}" font-family="sans-serif" font-size="11">` +
    `<rect x="${m.l}" y="${m.t}" width="${W - m.l - m.r}" height="${H - m.t - m.b}" fill="none" stroke="#888"/>` +
    `<text x="${m.l}" y="16">${title.replace(/[<&]/g, '')}</text>` +
    `<text x="4" y="${m.t + 10}">${label(y1)}</text><text x="4" y="${H - m.b}">${label(y0)}</text>` +
    `<text x="${m.l}" y="${H - 10}">${label(x0)}</text><text x="${W - m.r - 40}" y="${H - 10}">${label(x1)}</text>` +
    parts.join('') +
    '</svg>'
  );
}

/** A diverging blue-white-red map of `z` (rows bottom to top), symmetric about zero. */
function pngMap(z: (number | null)[][], cellPixels: number): string {
  const rows = z.length;
  const cols = z[0]?.length ?? 0;
  const limit = Math.max(1e-300, ...z.flat().map((v) => (v === null || !Number.isFinite(v) ? 0 : Math.abs(v))));
  const w = cols * cellPixels;
  const h = rows * cellPixels;
  const rgba = new Uint8Array(w * h * 4);
  for (let py = 0; py < h; py++) {
    const row = z[rows - 1 - Math.floor(py / cellPixels)];
    for (let px = 0; px < w; px++) {
      const v = row[Math.floor(px / cellPixels)];
      const o = (py * w + px) * 4;
      if (v === null || !Number.isFinite(v)) {
        rgba.set([160, 160, 160, 255], o);
        continue;
      }
      const t = Math.max(-1, Math.min(1, v / limit));
      const fade = Math.round(255 * (1 - Math.abs(t)));
      rgba.set(t >= 0 ? [255, fade, fade, 255] : [fade, fade, 255, 255], o);
    }
  }
  return encodePng(w, h, rgba).toString('base64');
}

function grid(values: ArrayLike<number | null>, n1: number, n2: number): (number | null)[][] {
  return Array.from({ length: n2 }, (_, b) => Array.from({ length: n1 }, (_, a) => values[b * n1 + a] ?? null));
}

// --- figures by kind ------------------------------------------------------------------------------
/** Bands or ribbon spectra along a path: one line per band, breaks at path jumps. */
function spectrumPlot(result: ResultLike, title: string): Plot | null {
  const path = pathOf(result.path);
  const count = result.bandCount;
  const energies = result.energies;
  if (!path || typeof count !== 'number' || !isNumbers(energies) || count < 1) return null;
  const points = path.distance.length;
  const breaks = new Set(path.breaks);
  const edges = result.edges as { first?: unknown; last?: unknown } | undefined;
  const edgeColour = edges && isNumbers(edges.first) && isNumbers(edges.last) ? { first: edges.first, last: edges.last } : null;
  const series: Series[] = [];
  for (let b = 0; b < count; b++) {
    const x: (number | null)[] = [];
    const y: (number | null)[] = [];
    for (let p = 0; p < points; p++) {
      if (breaks.has(p) && p > 0) {
        x.push(null);
        y.push(null);
      }
      x.push(path.distance[p]);
      y.push(energies[p * count + b]);
    }
    series.push({ x, y });
  }
  const axis = {
    tickvals: path.labels.map((l) => l.distance),
    ticktext: path.labels.map((l) => l.label),
    showgrid: true,
  };
  let data: Record<string, unknown>[];
  if (edgeColour && points > 1) {
    // Ribbon: every state a dot coloured by which edge holds it (first edge +1, last edge -1).
    // Rounded to what a screen resolves: a wide ribbon has tens of thousands of states.
    const round = (v: number, scale: number): number => Math.round(v * scale) / scale;
    const x: number[] = [];
    const y: number[] = [];
    const c: number[] = [];
    for (let p = 0; p < points; p++) {
      for (let b = 0; b < count; b++) {
        const i = p * count + b;
        x.push(round(path.distance[p], 1e5));
        y.push(round(energies[i], 1e5));
        c.push(round(edgeColour.first[i] - edgeColour.last[i], 100));
      }
    }
    data = [{ type: 'scattergl', mode: 'markers', x, y, marker: { size: 3, color: c, cmin: -1, cmax: 1, colorscale: 'RdBu', colorbar: { title: 'edge' } }, hoverinfo: 'x+y' }];
  } else {
    data = series.map((s, b) => ({ type: 'scatter', mode: points > 1 ? 'lines' : 'markers', x: s.x, y: s.y, name: `band ${b}`, line: { width: 1.5 } }));
  }
  return {
    figure: { data, layout: { ...LAYOUT, title: { text: title }, xaxis: axis, yaxis: { title: { text: 'energy' }, zeroline: false } } },
    fallback: { mime: 'image/svg+xml', data: svgPlot(series, points > 1 ? 'lines' : 'markers', title) },
  };
}

function curvaturePlot(result: ResultLike): Plot | null {
  const [n1, n2] = Array.isArray(result.grid) ? (result.grid as number[]) : [];
  const { k1, k2, values } = result;
  if (!n1 || !n2 || !isNumbers(k1) || !isNumbers(k2) || !isNumbers(values) || values.length !== n1 * n2) return null;
  const z = grid(values, n1, n2);
  const title = `Berry curvature, bands ${JSON.stringify(result.bands)}${typeof result.total === 'number' ? `, C = ${result.total}` : ''}`;
  return {
    figure: {
      data: [{ type: 'heatmap', x: Array.from(k1), y: Array.from(k2), z, colorscale: 'RdBu', reversescale: true, zmid: 0, colorbar: { title: 'Ω' } }],
      layout: { ...LAYOUT, title: { text: title }, xaxis: { title: { text: 'k₁ (rad)' } }, yaxis: { title: { text: 'k₂ (rad)' }, scaleanchor: 'x' } },
    },
    fallback: { mime: 'image/png', data: pngMap(z, Math.max(1, Math.floor(400 / Math.max(n1, n2)))) },
  };
}

function wannierPlot(result: ResultLike): Plot | null {
  const { across, centres, gapMidpoint } = result;
  if (!isNumbers(across) || !isNumbers(centres) || across.length === 0) return null;
  const perPoint = Math.round(centres.length / across.length);
  const x: number[] = [];
  const y: number[] = [];
  for (let i = 0; i < across.length; i++) for (let j = 0; j < perPoint; j++) [x[x.length], y[y.length]] = [across[i], centres[i * perPoint + j]];
  const data: Record<string, unknown>[] = [{ type: 'scatter', mode: 'markers', x, y, marker: { size: 4 }, name: 'centres' }];
  if (isNumbers(gapMidpoint)) data.push({ type: 'scatter', mode: 'markers', x: Array.from(across), y: Array.from(gapMidpoint), marker: { size: 3, symbol: 'diamond-open' }, name: 'largest-gap midpoint' });
  const title = `Wannier-centre flow${typeof result.winding === 'number' ? `, winding ${result.winding}` : ''}`;
  return {
    figure: { data, layout: { ...LAYOUT, title: { text: title }, xaxis: { title: { text: 'k (rad)' } }, yaxis: { title: { text: 'centre' }, range: [0, 1] } } },
    fallback: { mime: 'image/svg+xml', data: svgPlot([{ x, y }], 'markers', title) },
  };
}

function phaseMapPlot(result: ResultLike): Plot | null {
  const axes = result.axes as { param: string; values: number[] }[] | undefined;
  const values = result.values as (number | null)[] | undefined;
  if (!Array.isArray(axes) || !Array.isArray(values) || axes.length < 1 || !axes.every((a) => Array.isArray(a.values))) return null;
  const quantity = String(result.invariant ?? 'value');
  if (axes.length === 1) {
    const series = { x: axes[0].values, y: values };
    return {
      figure: {
        data: [{ type: 'scatter', mode: 'lines+markers', x: series.x, y: series.y, line: { shape: 'hv' }, name: quantity }],
        layout: { ...LAYOUT, title: { text: `${quantity} against ${axes[0].param}` }, xaxis: { title: { text: axes[0].param } }, yaxis: { title: { text: quantity } } },
      },
      fallback: { mime: 'image/svg+xml', data: svgPlot([series], 'lines', `${quantity} against ${axes[0].param}`) },
    };
  }
  const [a0, a1] = axes;
  if (values.length !== a0.values.length * a1.values.length) return null;
  const z = grid(values, a0.values.length, a1.values.length);
  return {
    figure: {
      data: [{ type: 'heatmap', x: a0.values, y: a1.values, z, colorscale: 'RdBu', reversescale: true, zmid: 0, colorbar: { title: quantity }, hoverongaps: false }],
      layout: { ...LAYOUT, title: { text: `${quantity} phase map (grey: gapless)` }, xaxis: { title: { text: a0.param } }, yaxis: { title: { text: a1.param } } },
    },
    fallback: { mime: 'image/png', data: pngMap(z, Math.max(1, Math.floor(400 / Math.max(a0.values.length, a1.values.length)))) },
  };
}

export function plotFor(result: ResultLike): Plot | null {
  switch (result.kind) {
    case 'bands':
      return spectrumPlot(result, 'bands');
    case 'ribbon':
      return spectrumPlot(result, typeof result.name === 'string' ? result.name : 'ribbon spectrum');
    case 'curvature':
      return curvaturePlot(result);
    case 'wannier-flow':
      return wannierPlot(result);
    case 'phase-map':
      return phaseMapPlot(result);
    default:
      return null;
  }
}
