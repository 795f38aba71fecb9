/**
 * Phase map over one or two parameters: the invariant as discrete colours with a legend, the gap
 * as contour lines, gapless grid points crossed out, refined boundary points, and the current
 * parameter point as a marker the user can drag (the view enables shape dragging for this figure).
 * A map of a quantity that is not quantised (a gap, a disorder average) is drawn as a continuous
 * colour map instead, with a colour bar.
 */
import type { Data, Layout } from './plotly-json.js';
import type { ViewResult } from '../contract/protocol.js';
import { BASE_LAYOUT, CLOSING_MARKER, energyUnit, fmt, titled, unitText, withUnit, type Figure, type FigureContext, type Table } from './common.js';

interface Axis {
  param: string;
  values: number[];
}

interface PhaseMapData {
  quantity: string;
  quantised: boolean;
  axes: Axis[];
  values: (number | null)[];
  gaps: number[];
  boundaries: { at: Record<string, number> }[];
}

function read(result: ViewResult): PhaseMapData {
  const axes = result.axes as Axis[] | undefined;
  const values = result.values as (number | null)[] | undefined;
  const gaps = result.gaps as number[] | ArrayLike<number> | undefined;
  const expected = axes ? axes.reduce((n, a) => n * (a.values?.length ?? 0), 1) : -1;
  if (!axes || (axes.length !== 1 && axes.length !== 2) || !values || !gaps || values.length !== expected || gaps.length !== expected) {
    throw new Error(`phase-map result: ${values?.length} values and ${gaps?.length} gaps for axes ${JSON.stringify(axes?.map((a) => [a.param, a.values?.length]))}`);
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
  const sym = SYMBOL[m.quantity] ?? m.quantity;
  const [ax0, ax1] = m.axes;
  const unitOf = (param: string) => ctx.spec.parameters[param]?.unit ?? '';
  const finite = m.values.filter((v): v is number => v !== null && Number.isFinite(v));
  const range = finite.length ? `${fmt(Math.min(...finite))} to ${fmt(Math.max(...finite))}` : 'no value';
  const n0 = ax0.values.length;
  const data: Data[] = ax1 === undefined
    ? [{ type: 'scatter', mode: 'lines+markers', x: ax0.values, y: m.values, line: { color: PALETTE[0] }, name: sym, hovertemplate: `${ax0.param} = %{x:.4g}<br>${sym} = %{y:.4g}<extra></extra>` }]
    : [{
        type: 'heatmap',
        x: ax0.values,
        y: ax1.values,
        z: ax1.values.map((_, j) => ax0.values.map((__, i) => m.values[j * n0 + i])),
        colorscale: CONTINUOUS,
        colorbar: { title: { text: sym } },
        name: sym,
        hovertemplate: `${ax0.param} = %{x:.4g}<br>${ax1.param} = %{y:.4g}<br>${sym} = %{z:.4g}<extra></extra>`,
      }];
  const here = locate(m, ctx.values);
  const hereText = here === undefined ? '' : ` · here: ${here === null ? 'none' : fmt(here)}`;
  return {
    data,
    layout: {
      ...BASE_LAYOUT,
      title: titled(`Map of ${sym} — ${range}`),
      xaxis: { title: { text: withUnit(ax0.param, unitOf(ax0.param)) }, zeroline: false },
      yaxis: { title: { text: ax1 ? withUnit(ax1.param, unitOf(ax1.param)) : sym }, zeroline: false },
    },
    summary: `${sym}: ${range}${hereText}`,
    invariant: null,
    gapless: false,
  };
}

/** The map's value at the grid point nearest to the current parameters; undefined outside. */
function locate(m: PhaseMapData, values: Record<string, number>): number | null | undefined {
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
  const flat = idx.length === 1 ? idx[0] : idx[1] * m.axes[0].values.length + idx[0];
  return m.values[flat];
}

export function phaseMapTable(result: ViewResult): Table {
  const m = read(result);
  const n0 = m.axes[0].values.length;
  const rows = m.values.map((v, idx) => [
    m.axes[0].values[idx % n0],
    ...(m.axes[1] ? [m.axes[1].values[Math.floor(idx / n0)]] : []),
    v,
    m.gaps[idx],
  ]);
  return { columns: [...m.axes.map((a) => a.param), m.quantity, 'gap'], rows };
}
