/**
 * Phase map over one or two parameters: the invariant as discrete colours with a legend, the gap
 * as contour lines, gapless grid points crossed out, refined boundary points, and the current
 * parameter point as a marker the user can drag (the view enables shape dragging for this figure).
 * A map of a quantity that is not quantised (a gap, a disorder average) is drawn as a continuous
 * colour map instead, with a colour bar. An average carries its standard errors: a curve is drawn
 * inside a band of ±2 SE, a 2D map hatches the cells whose mean lies within 2 SE of a half-integer
 * (undecided between the two integers beside it) and its hover reads mean ± SE.
 */
import type { Data, Layout } from './plotly-json.js';
import type { ViewResult } from '../contract/protocol.js';
import { BASE_LAYOUT, CLOSING_MARKER, energyUnit, fmt, titled, unitText, withUnit, type Figure, type FigureContext, type Table } from './common.js';

interface Axis {
  param: string;
  values: number[];
}

/** A crossing of a half-integer between two grid points of an averaged map (the engine's LevelCrossing). */
interface Crossing {
  at: Record<string, number>;
  level: number;
  resolved: boolean;
}

interface PhaseMapData {
  quantity: string;
  quantised: boolean;
  axes: Axis[];
  values: (number | null)[];
  gaps: number[];
  boundaries: { at: Record<string, number> }[];
  /** An averaged map's standard errors (null where none); absent for other maps and maps saved before they were kept. */
  standardErrors?: (number | null)[];
  crossings: Crossing[];
  /** A map of an ensemble: the diagnostic averaged. */
  averaged?: string;
}

/**
 * How many standard errors wide the band is, and how far from a half-integer a mean must lie to be
 * decided: the engine's RESOLVING_ERRORS (src/scan/sweep.ts), which rules its crossings.
 */
export const ERROR_BAND = 2;

function read(result: ViewResult): PhaseMapData {
  const axes = result.axes as Axis[] | undefined;
  const values = result.values as (number | null)[] | undefined;
  const gaps = result.gaps as number[] | ArrayLike<number> | undefined;
  const expected = axes ? axes.reduce((n, a) => n * (a.values?.length ?? 0), 1) : -1;
  if (!axes || (axes.length !== 1 && axes.length !== 2) || !values || !gaps || values.length !== expected || gaps.length !== expected) {
    throw new Error(`phase-map result: ${values?.length} values and ${gaps?.length} gaps for axes ${JSON.stringify(axes?.map((a) => [a.param, a.values?.length]))}`);
  }
  const errors = result.standardErrors as (number | null)[] | ArrayLike<number> | undefined;
  if (errors !== undefined && (errors === null || typeof errors !== 'object' || errors.length !== expected)) {
    throw new Error(`phase-map result: ${(errors as ArrayLike<number> | null)?.length} standard errors for ${expected} values`);
  }
  // A map saved before the field was renamed names its quantity `invariant`.
  const named = typeof result.quantity === 'string' ? result.quantity : result.invariant;
  const quantity = typeof named === 'string' ? named : 'quantity';
  return {
    quantity,
    // Older saved maps carry no flag: only their gap maps were continuous.
    quantised: typeof result.quantised === 'boolean' ? result.quantised : quantity !== 'gap',
    axes,
    values,
    gaps: Array.from(gaps),
    boundaries: (result.boundaries as { at: Record<string, number> }[] | undefined) ?? [],
    ...(errors !== undefined ? { standardErrors: Array.from(errors as ArrayLike<number | null>, (e) => (typeof e === 'number' && Number.isFinite(e) ? e : null)) } : {}),
    ...(typeof result.averaged === 'string' ? { averaged: result.averaged } : {}),
    crossings: Array.isArray(result.crossings) ? (result.crossings as Crossing[]).filter((c) => c !== null && typeof c === 'object' && typeof c.level === 'number') : [],
  };
}

const SYMBOL: Record<string, string> = {
  chern: 'C', z2: 'Z₂', winding: 'W', majorana: 'M', gap: 'gap', bott: 'B', 'spin-bott': 'B_s', 'chain-winding': 'W', ensemble: 'mean',
};
/** A continuous map's colours: low light, high dark. */
const CONTINUOUS: [number, string][] = [[0, '#f4f1ea'], [0.5, '#7fa6c9'], [1, '#1f3d63']];
/** Colours per invariant value: trivial (0) light, the others distinct. */
const TRIVIAL = '#e9e6df';
const PALETTE = ['#3b6ea8', '#d9822b', '#4f9a5a', '#b5445b', '#7d5ba6', '#8c6d31', '#5b9aa8', '#c4a000'];

export function phaseColours(distinct: number[]): Map<number, string> {
  const out = new Map<number, string>();
  let next = 0;
  for (const v of distinct) out.set(v, v === 0 ? TRIVIAL : PALETTE[next++ % PALETTE.length]);
  return out;
}

/** The name of the draggable current-point shape (the view finds it by this name). */
export const PHASE_POINT_SHAPE = 'current-point';

export function phaseMapFigure(result: ViewResult, ctx: FigureContext): Figure {
  const m = read(result);
  if (!m.quantised) return continuousMapFigure(m, ctx);
  const sym = SYMBOL[m.quantity] ?? m.quantity;
  const distinct = [...new Set(m.values.filter((v): v is number => v !== null))].sort((a, b) => a - b);
  const colours = phaseColours(distinct);
  const label = (v: number | null) => (v === null ? 'gapless' : `${sym} = ${fmt(v)}`);
  const unit = energyUnit(ctx.spec);
  const unitOf = (param: string) => ctx.spec.parameters[param]?.unit ?? '';
  const data: Data[] = [];
  const shapes: NonNullable<Layout['shapes']> = [];
  const [ax0, ax1] = m.axes;
  const here0 = ctx.values[ax0.param];

  if (ax1 === undefined) {
    // One axis: the invariant as a step line, the gap on a second axis.
    data.push({
      type: 'scatter',
      mode: 'lines+markers',
      x: ax0.values,
      y: m.values,
      line: { shape: 'hv', color: '#3b6ea8' },
      name: sym,
      hovertemplate: `${ax0.param} = %{x:.4g}<br>${sym} = %{y}<extra></extra>`,
    });
    data.push({ type: 'scatter', mode: 'lines', x: ax0.values, y: m.gaps, yaxis: 'y2', line: { color: '#888', dash: 'dot' }, name: 'gap' });
    if (Number.isFinite(here0)) {
      shapes.push({ type: 'line', name: PHASE_POINT_SHAPE, xref: 'x', yref: 'paper', x0: here0, x1: here0, y0: 0, y1: 1, line: { color: '#d40000', width: 3 } });
    }
  } else {
    const n0 = ax0.values.length;
    const index = new Map(distinct.map((v, i) => [v, i]));
    const z = ax1.values.map((_, j) => ax0.values.map((__, i) => {
      const v = m.values[j * n0 + i];
      return v === null ? null : (index.get(v) as number);
    }));
    const text = ax1.values.map((_, j) => ax0.values.map((__, i) => label(m.values[j * n0 + i])));
    const k = Math.max(distinct.length, 1);
    const scale: [number, string][] = [];
    distinct.forEach((v, i) => {
      scale.push([i / k, colours.get(v)!], [(i + 1) / k, colours.get(v)!]);
    });
    data.push({
      type: 'heatmap',
      x: ax0.values,
      y: ax1.values,
      z,
      text,
      zmin: -0.5,
      zmax: k - 0.5,
      colorscale: scale.length ? scale : [[0, TRIVIAL], [1, TRIVIAL]],
      showscale: false,
      name: sym,
      hovertemplate: `${ax0.param} = %{x:.4g}<br>${ax1.param} = %{y:.4g}<br>%{text}<extra></extra>`,
    });
    const gapGrid = ax1.values.map((_, j) => ax0.values.map((__, i) => m.gaps[j * n0 + i]));
    data.push({
      type: 'contour',
      x: ax0.values,
      y: ax1.values,
      z: gapGrid,
      ncontours: 6,
      contours: { coloring: 'lines', showlabels: true, labelfont: { size: 10, color: '#333' } },
      line: { width: 1 },
      colorscale: [[0, '#333'], [1, '#333']],
      showscale: false,
      name: 'gap',
      hovertemplate: `gap %{z:.3g}${unitText(unit)}<extra></extra>`,
    });
    const here1 = ctx.values[ax1.param];
    if (Number.isFinite(here0) && Number.isFinite(here1)) {
      const r0 = 0.02 * Math.abs(ax0.values[n0 - 1] - ax0.values[0]);
      const r1 = 0.02 * Math.abs(ax1.values[ax1.values.length - 1] - ax1.values[0]);
      shapes.push({
        type: 'circle',
        name: PHASE_POINT_SHAPE,
        xref: 'x',
        yref: 'y',
        x0: here0 - r0,
        x1: here0 + r0,
        y0: here1 - r1,
        y1: here1 + r1,
        fillcolor: '#ffffff',
        line: { color: '#d40000', width: 3 },
      });
    }
  }
  // Legend entries for the discrete colours.
  for (const v of distinct) {
    data.push({ type: 'scatter', mode: 'markers', x: [null], y: [null], marker: { symbol: 'square', size: 14, color: colours.get(v) }, name: label(v), showlegend: true, hoverinfo: 'skip' });
  }
  if (ax1 !== undefined) {
    const n0 = ax0.values.length;
    const gx: number[] = [];
    const gy: number[] = [];
    m.values.forEach((v, idx) => {
      if (v === null) {
        gx.push(ax0.values[idx % n0]);
        gy.push(ax1.values[Math.floor(idx / n0)]);
      }
    });
    if (gx.length) data.push({ type: 'scatter', mode: 'markers', x: gx, y: gy, marker: CLOSING_MARKER, cliponaxis: false, name: 'gapless', hovertemplate: 'gapless<extra></extra>' });
    const bx = m.boundaries.map((b) => b.at[ax0.param]);
    const by = m.boundaries.map((b) => b.at[ax1.param]);
    if (bx.length) data.push({ type: 'scatter', mode: 'markers', x: bx, y: by, marker: { size: 4, color: '#111' }, name: 'boundary', hovertemplate: 'boundary<extra></extra>' });
  }

  const hereLabel = m.axes.map((a) => `${a.param} = ${fmt(ctx.values[a.param])}`).join(', ');
  const here = locate(m, ctx.values);
  const summary = `${distinct.map(label).join(', ') || 'no gapped point'} · here (${hereLabel}): ${here === undefined ? 'outside the map' : label(here)}`;
  return {
    data,
    layout: {
      ...BASE_LAYOUT,
      title: titled(`Phase map of ${sym} — ${distinct.length} phase${distinct.length === 1 ? '' : 's'}`),
      xaxis: { title: { text: withUnit(ax0.param, unitOf(ax0.param)) }, zeroline: false },
      yaxis: ax1
        ? { title: { text: withUnit(ax1.param, unitOf(ax1.param)) }, zeroline: false }
        : { title: { text: sym }, zeroline: false, dtick: 1 },
      ...(ax1 ? {} : { yaxis2: { title: { text: withUnit('gap', unit) }, overlaying: 'y' as const, side: 'right' as const, zeroline: false } }),
      shapes,
      legend: { orientation: 'h', x: 0, y: -0.2 },
    },
    summary,
    invariant: here ?? null,
    // Gapless grid points are part of the picture (crossed out); the flag is for the current point.
    gapless: here === null,
  };
}

/** A map of a quantity that is not quantised: values as a colour map (2D) or a curve (1D). */
function continuousMapFigure(m: PhaseMapData, ctx: FigureContext): Figure {
  const sym = m.averaged !== undefined ? `mean ${m.averaged}` : SYMBOL[m.quantity] ?? m.quantity;
  const [ax0, ax1] = m.axes;
  const unitOf = (param: string) => ctx.spec.parameters[param]?.unit ?? '';
  const finite = m.values.filter((v): v is number => v !== null && Number.isFinite(v));
  const range = finite.length ? `${fmt(Math.min(...finite))} to ${fmt(Math.max(...finite))}` : 'no value';
  const n0 = ax0.values.length;
  const errors = m.standardErrors;
  const data: Data[] = [];
  if (ax1 === undefined) {
    if (errors !== undefined) data.push(...errorBand(ax0.values, m.values, errors));
    data.push({
      type: 'scatter', mode: 'lines+markers', x: ax0.values, y: m.values, line: { color: PALETTE[0] }, marker: { color: PALETTE[0] }, name: sym,
      ...(errors !== undefined
        ? { text: m.values.map((v, i) => meanText(v, errors[i])), hovertemplate: `${ax0.param} = %{x:.4g}<br>${sym} = %{text}<extra></extra>` }
        : { hovertemplate: `${ax0.param} = %{x:.4g}<br>${sym} = %{y:.4g}<extra></extra>` }),
    });
    if (errors !== undefined) {
      // The half-integers the band reaches: where a mean is undecided between two integers.
      const reach = m.values.flatMap((v, i) => (v === null ? [] : [v - ERROR_BAND * (errors[i] ?? 0), v + ERROR_BAND * (errors[i] ?? 0)]));
      // A trace, not layout shapes: a phase-map widget makes its shapes draggable.
      const levels = halfIntegers(Math.min(...reach), Math.max(...reach));
      const [x0, x1] = [ax0.values[0], ax0.values[n0 - 1]];
      if (levels.length > 0) {
        data.unshift({
          type: 'scatter', mode: 'lines', name: 'half-integers', showlegend: false, hoverinfo: 'skip', line: { color: '#8a8a8a', width: 1, dash: 'dot' },
          x: levels.flatMap(() => [x0, x1, null]), y: levels.flatMap((h) => [h, h, null]),
        });
      }
      data.push(...crossingMarkers(m.crossings, ax0.param, null, true));
    }
  } else {
    data.push({
      type: 'heatmap',
      x: ax0.values,
      y: ax1.values,
      z: ax1.values.map((_, j) => ax0.values.map((__, i) => m.values[j * n0 + i])),
      ...(errors !== undefined ? { text: ax1.values.map((_, j) => ax0.values.map((__, i) => meanText(m.values[j * n0 + i], errors[j * n0 + i]))) } : {}),
      colorscale: CONTINUOUS,
      colorbar: { title: { text: sym } },
      name: sym,
      hovertemplate: `${ax0.param} = %{x:.4g}<br>${ax1.param} = %{y:.4g}<br>${sym} = ${errors !== undefined ? '%{text}' : '%{z:.4g}'}<extra></extra>`,
    });
    if (errors !== undefined) {
      const hatch = undecidedHatching(ax0.values, ax1.values, m.values, errors);
      if (hatch !== null) data.push(hatch);
      data.push(...crossingMarkers(m.crossings, ax0.param, ax1.param, false));
    }
  }
  const here = locate(m, ctx.values);
  const hereError = errors !== undefined ? locateIndex(m, ctx.values) : undefined;
  const hereText = here === undefined ? '' : ` · here: ${here === null ? 'none' : errors !== undefined && hereError !== undefined ? meanText(here, errors[hereError]) : fmt(here)}`;
  const resolved = m.crossings.filter((c) => c.resolved).length;
  const crossingText = errors === undefined || m.crossings.length === 0 ? '' : ` · crossings of a half-integer: ${resolved} resolved, ${m.crossings.length - resolved} within ${ERROR_BAND} SE`;
  return {
    data,
    layout: {
      ...BASE_LAYOUT,
      title: titled(`Map of ${sym} — ${range}`),
      xaxis: { title: { text: withUnit(ax0.param, unitOf(ax0.param)) }, zeroline: false },
      yaxis: { title: { text: ax1 ? withUnit(ax1.param, unitOf(ax1.param)) : sym }, zeroline: false },
      ...(errors !== undefined ? { legend: { orientation: 'h', x: 0, y: -0.2 } } : {}),
    },
    summary: `${sym}: ${range}${hereText}${crossingText}`,
    invariant: null,
    gapless: false,
  };
}

/** "0.625 ± 0.062 (1 SE)", or the mean alone when it has no error. */
function meanText(mean: number | null, error: number | null): string {
  if (mean === null) return 'none';
  return error === null ? `${fmt(mean)} (no error)` : `${fmt(mean)} ± ${fmt(error, 2)} (1 SE)`;
}

/** The half-integers in [lo, hi]. */
function halfIntegers(lo: number, hi: number): number[] {
  const out: number[] = [];
  if (!Number.isFinite(lo) || !Number.isFinite(hi)) return out;
  for (let k = Math.ceil(lo - 0.5); k + 0.5 <= hi && out.length < 16; k++) out.push(k + 0.5);
  return out;
}

/**
 * The band mean ± ERROR_BAND SE of a 1D averaged map: its lower edge (no line, no legend) and its
 * upper edge filled down to it. A point without an error has a band of no width; one without a
 * mean is left out.
 */
function errorBand(xs: number[], means: (number | null)[], errors: (number | null)[]): Data[] {
  const kept = means.flatMap((v, i) => (v === null ? [] : [i]));
  const edge = (sign: number) => kept.map((i) => (means[i] as number) + sign * ERROR_BAND * (errors[i] ?? 0));
  const x = kept.map((i) => xs[i]);
  const common = { type: 'scatter', mode: 'lines', x, line: { width: 0, color: BAND_FILL }, hoverinfo: 'skip' };
  return [
    { ...common, y: edge(-1), name: `mean − ${ERROR_BAND} SE`, showlegend: false },
    { ...common, y: edge(+1), name: `mean ± ${ERROR_BAND} SE`, fill: 'tonexty', fillcolor: BAND_FILL, showlegend: true },
  ];
}

const BAND_FILL = 'rgba(59, 110, 168, 0.22)';
const HATCH = 'rgba(40, 40, 40, 0.6)';

/**
 * Diagonal strokes over every cell whose mean lies within ERROR_BAND standard errors of a
 * half-integer (or has no error): one trace of line segments broken by nulls, three per cell, so
 * neighbouring cells' strokes join into a hatched region. Null when no cell is undecided.
 */
function undecidedHatching(xs: number[], ys: number[], means: (number | null)[], errors: (number | null)[]): Data | null {
  // The grid is even: every cell reaches half a step either side of its point.
  const halfStep = (v: number[]) => (v.length > 1 ? Math.abs(v[v.length - 1] - v[0]) / (v.length - 1) / 2 : 0.5);
  const [hx0, hy0] = [halfStep(xs), halfStep(ys)];
  const hx: (number | null)[] = [];
  const hy: (number | null)[] = [];
  means.forEach((mean, n) => {
    if (mean === null) return;
    const e = errors[n];
    const nearest = Math.round(mean - 0.5) + 0.5;
    if (e !== null && Math.abs(mean - nearest) > ERROR_BAND * e) return;
    const i = n % xs.length;
    const j = Math.floor(n / xs.length);
    const [l, r, b, t] = [xs[i] - hx0, xs[i] + hx0, ys[j] - hy0, ys[j] + hy0];
    const mx = (l + r) / 2;
    const my = (b + t) / 2;
    hx.push(l, r, null, l, mx, null, mx, r, null);
    hy.push(b, t, null, my, t, null, b, my, null);
  });
  if (hx.length === 0) return null;
  return { type: 'scatter', mode: 'lines', x: hx, y: hy, line: { color: HATCH, width: 1 }, name: `within ${ERROR_BAND} SE of a half-integer`, showlegend: true, hoverinfo: 'skip' };
}

/** Markers where the mean crosses a half-integer: filled when the errors resolve it, open when not (1D only). */
function crossingMarkers(crossings: Crossing[], p0: string, p1: string | null, withUnresolved: boolean): Data[] {
  const trace = (list: Crossing[], name: string, marker: Record<string, unknown>): Data[] =>
    list.length === 0 ? [] : [{
      type: 'scatter', mode: 'markers', name, showlegend: true, marker, cliponaxis: false,
      x: list.map((c) => c.at[p0]),
      y: list.map((c) => (p1 === null ? c.level : c.at[p1])),
      hovertemplate: `${p0} = %{x:.4g}<br>${name}<extra></extra>`,
    }];
  return [
    ...trace(crossings.filter((c) => c.resolved), 'crossing resolved', { size: 7, color: '#1a1a1a' }),
    ...(withUnresolved ? trace(crossings.filter((c) => !c.resolved), `crossing within ${ERROR_BAND} SE`, { size: 9, symbol: 'circle-open', color: '#b5445b', line: { width: 2, color: '#b5445b' } }) : []),
  ];
}

/** The map's value at the grid point nearest to the current parameters; undefined outside. */
function locate(m: PhaseMapData, values: Record<string, number>): number | null | undefined {
  const n = locateIndex(m, values);
  return n === undefined ? undefined : m.values[n];
}

/** The index of the grid point nearest to the current parameters; undefined outside. */
function locateIndex(m: PhaseMapData, values: Record<string, number>): number | undefined {
  const idx: number[] = [];
  for (const a of m.axes) {
    const v = values[a.param];
    const lo = Math.min(a.values[0], a.values[a.values.length - 1]);
    const hi = Math.max(a.values[0], a.values[a.values.length - 1]);
    if (!Number.isFinite(v) || v < lo || v > hi) return undefined;
    let best = 0;
    a.values.forEach((x, i) => {
      if (Math.abs(x - v) < Math.abs(a.values[best] - v)) best = i;
    });
    idx.push(best);
  }
  return idx.length === 1 ? idx[0] : idx[1] * m.axes[0].values.length + idx[0];
}

export function phaseMapTable(result: ViewResult): Table {
  const m = read(result);
  const n0 = m.axes[0].values.length;
  const rows = m.values.map((v, idx) => [
    m.axes[0].values[idx % n0],
    ...(m.axes[1] ? [m.axes[1].values[Math.floor(idx / n0)]] : []),
    v,
    m.gaps[idx],
    ...(m.standardErrors !== undefined ? [m.standardErrors[idx]] : []),
  ]);
  return { columns: [...m.axes.map((a) => a.param), m.quantity, 'gap', ...(m.standardErrors !== undefined ? ['standard error'] : [])], rows };
}
