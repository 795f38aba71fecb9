/**
 * Maps over a finite sample, one value per cell (src/realspace/): the local Chern marker
 * ('local-marker', a diverging scale centred on 0, clipped at a fixed span so that drags compare)
 * and the local density of states at one energy ('local-density', a sequential scale relative to
 * its largest value). Cells sit at their Cartesian centres: cell + mean orbital position, through
 * the model's lattice vectors. When every cell of a plane was computed and the vectors lie along
 * x and y (a square or rectangular lattice), the map is a raster, so a drag step only recolours an
 * image; otherwise each cell is a coloured marker. A 1D sample is a line over its cells; a 3D sample
 * shows its middle layer.
 */
import type { Data } from './plotly-json.js';
import type { ViewResult, ModelSpecView } from '../contract/protocol.js';
import type { Raster } from './picture.js';
import { BASE_LAYOUT, DIVERGING, ResultShapeError, fmt, numberArray, optionalNumber, titled, type Figure, type FigureContext, type Table } from './common.js';

/** White to deep red, for values from 0 up (our own stops). */
export const SEQUENTIAL: [number, string][] = [
  [0, '#f7f7f7'],
  [0.3, '#f2c57c'],
  [0.6, '#d9662b'],
  [0.85, '#8c1d18'],
  [1, '#3b0a0a'],
];

/** Where the colour-bar heatmap sits: far outside any sample's axis range. */
const OUTSIDE = 1e9;

interface Cell {
  index: number[];
  x: number;
  y: number;
  value: number;
  edge: number;
  error: number | null;
}

interface SampleMap {
  kind: 'local-marker' | 'local-density';
  sizes: number[];
  dim: number;
  /** Every reported cell, in result order. */
  all: Cell[];
  /** The cells drawn: all of a 1D or 2D sample, the middle layer of a 3D one. */
  shown: Cell[];
  /** Lattice vectors a1, a2 in the plane (Cartesian x, y). */
  a: [number, number][];
  centroid: number[];
  /** Axis titles: Cartesian x, y, or cell indices when the lattice is not known. */
  axes: [string, string];
}

function sizesOf(result: ViewResult): number[] {
  const s = result.sizes;
  if (Array.isArray(s) && s.length >= 1 && s.length <= 3 && s.every((n) => Number.isInteger(n) && n > 0)) return s as number[];
  throw new ResultShapeError(result.kind, 'sizes', s);
}

function read(result: ViewResult, spec: ModelSpecView, field: 'marker' | 'density'): SampleMap {
  const sizes = sizesOf(result);
  const dim = sizes.length;
  const cells = numberArray(result, 'cells');
  const values = numberArray(result, field);
  const edges = numberArray(result, 'edgeDistance');
  const errors = result.standardError === null || result.standardError === undefined ? null : numberArray(result, 'standardError');
  const count = values.length;
  if (cells.length !== count * dim || edges.length !== count || (errors !== null && errors.length !== count)) {
    throw new Error(`${result.kind} result: ${cells.length / dim} cells, ${count} values, ${edges.length} edge distances`);
  }
  // A result whose model is not known (no lattice vectors) is drawn in cell indices.
  const cartesian = spec.vectors.length >= Math.min(dim, 2);
  const vec = (j: number): [number, number] => {
    if (!cartesian) return j === 0 ? [1, 0] : [0, 1];
    const v = spec.vectors[j] ?? [];
    return [v[0] ?? 0, v[1] ?? 0];
  };
  const a: [number, number][] = dim === 1 ? [vec(0), [0, 1]] : [vec(0), vec(1)];
  const centroid = Array.from({ length: dim }, (_, j) => spec.orbitals.reduce((s, o) => s + (o.position[j] ?? 0), 0) / Math.max(1, spec.orbitals.length));
  const all: Cell[] = [];
  for (let c = 0; c < count; c++) {
    const index = Array.from({ length: dim }, (_, j) => cells[c * dim + j]);
    const r0 = index[0] + centroid[0];
    const r1 = dim >= 2 ? index[1] + centroid[1] : 0;
    all.push({
      index,
      x: r0 * a[0][0] + r1 * a[1][0],
      y: r0 * a[0][1] + r1 * a[1][1],
      value: values[c] ?? NaN,
      edge: edges[c],
      error: errors === null ? null : errors[c],
    });
  }
  const middle = Math.floor((sizes[2] ?? 1) / 2);
  const shown = dim === 3 ? all.filter((cell) => cell.index[2] === middle) : all;
  return { kind: result.kind as SampleMap['kind'], sizes, dim, all, shown, a, centroid, axes: cartesian ? ['x', 'y'] : ['cell i₁', 'cell i₂'] };
}

/** The reported cell deepest inside the sample (ties: nearest the middle of the index box). */
export function centreCell(cells: Cell[], sizes: number[]): Cell | null {
  let best: Cell | null = null;
  let bestOff = Infinity;
  for (const cell of cells) {
    const off = cell.index.reduce((s, i, j) => s + (i - (sizes[j] - 1) / 2) ** 2, 0);
    if (best === null || cell.edge > best.edge || (cell.edge === best.edge && off < bestOff)) {
      best = cell;
      bestOff = off;
    }
  }
  return best;
}

/**
 * The bricks of a plane of cells when they fill the L1 x L2 box and a1, a2 lie along x and y:
 * values row-major from the top row. Null otherwise (markers are drawn instead).
 */
function brickGrid(m: SampleMap): { width: number; height: number; grid: (Cell | null)[] } | null {
  if (m.dim === 1) return null;
  const [a1, a2] = m.a;
  if (!(a1[0] > 0 && a1[1] === 0 && a2[0] === 0 && a2[1] > 0)) return null;
  const [width, height] = m.sizes;
  if (m.shown.length !== width * height) return null;
  const grid: (Cell | null)[] = new Array(width * height).fill(null);
  for (const cell of m.shown) grid[(height - 1 - cell.index[1]) * width + cell.index[0]] = cell;
  return grid.every((c) => c !== null) ? { width, height, grid } : null;
}

interface Scale {
  /** Colour of a value: the value mapped to [lo, hi] of the scale. */
  range: [number, number];
  colorscale: [number, string][];
  /** The value a brick shows (the marker itself; the density relative to its largest value). */
  shown(value: number): number;
  barTitle: string;
  hover: string;
}

function mapFigure(m: SampleMap, scale: Scale, title: string, boundary: string): Pick<Figure, 'data' | 'layout' | 'raster' | 'frameKey'> {
  const data: Data[] = [];
  // The title names the sample; the summary (header, caption) says what it shows.
  const layoutBase = { ...BASE_LAYOUT, plot_bgcolor: 'rgba(0,0,0,0)', title: titled(`${title} — ${m.sizes.join(' × ')} cells, ${boundary}`) };
  if (m.dim === 1) {
    const cells = [...m.shown].sort((p, q) => p.x - q.x);
    data.push({
      type: 'scatter',
      mode: 'lines+markers',
      x: cells.map((c) => c.x),
      y: cells.map((c) => c.value),
      line: { color: '#1f4e9c', width: 1.5 },
      marker: { size: 5, color: '#1f4e9c' },
      name: scale.hover,
      hovertemplate: `x = %{x:.3f}<br>${scale.hover} = %{y:.4g}<extra></extra>`,
    });
    return { data, layout: { ...layoutBase, xaxis: { title: { text: m.axes[0] }, zeroline: false }, yaxis: { title: { text: scale.hover } } } };
  }
  data.push({
    // The colour bar: a two-brick heatmap far outside the axis ranges (the picture has none of its own).
    type: 'heatmap',
    x: [OUTSIDE, OUTSIDE + 1],
    y: [OUTSIDE],
    z: [[scale.range[0], scale.range[1]]],
    zmin: scale.range[0],
    zmax: scale.range[1],
    colorscale: scale.colorscale,
    colorbar: { title: { text: scale.barTitle } },
    hoverinfo: 'skip',
    name: 'colour scale',
  });
  const bricks = brickGrid(m);
  const plane = m.dim === 3 ? ` (layer ${Math.floor(m.sizes[2] / 2)} of ${m.sizes[2]})` : '';
  const axes = (xRange: [number, number], yRange: [number, number]) => ({
    xaxis: { title: { text: `${m.axes[0]}${plane}` }, range: xRange, zeroline: false, showgrid: false, constrain: 'domain' as const },
    yaxis: { title: { text: m.axes[1] }, range: yRange, zeroline: false, showgrid: false, scaleanchor: 'x' as const, constrain: 'domain' as const },
  });
  if (bricks !== null) {
    const { width, height, grid } = bricks;
    const dx = m.a[0][0];
    const dy = m.a[1][1];
    const x0 = m.centroid[0] * dx;
    const y0 = m.centroid[1] * dy;
    const xs = Array.from({ length: width }, (_, i) => x0 + i * dx);
    const ys = Array.from({ length: height }, (_, j) => y0 + j * dy);
    const values = new Float32Array(width * height);
    grid.forEach((cell, i) => (values[i] = scale.shown((cell as Cell).value)));
    const raster: Raster = {
      width,
      height,
      values,
      x: [xs[0] - dx / 2, xs[width - 1] + dx / 2],
      y: [ys[0] - dy / 2, ys[height - 1] + dy / 2],
      range: scale.range,
      colorscale: scale.colorscale,
    };
    // Hover: an invisible heatmap over the bricks, built when plotly first reads it (at rest).
    let rows: Float64Array[] | null = null;
    const hoverRows = (): Float64Array[] =>
      (rows ??= ys.map((_, j) => Float64Array.from({ length: width }, (_v, i) => (grid[(height - 1 - j) * width + i] as Cell).value)));
    data.unshift({
      type: 'heatmap',
      x: xs,
      y: ys,
      get z() {
        return hoverRows() as unknown as number[][];
      },
      opacity: 0,
      showscale: false,
      hovertemplate: `x = %{x:.3f}<br>y = %{y:.3f}<br>${scale.hover} = %{z:.4g}<extra></extra>`,
      name: title,
    });
    const xRange = raster.x;
    const yRange = raster.y;
    return {
      data,
      layout: { ...layoutBase, ...axes(xRange, yRange) },
      raster,
      frameKey: JSON.stringify([m.kind, m.sizes, raster.x, raster.y, raster.range, scale.barTitle]),
    };
  }
  // Any other lattice, or some cells only: one coloured marker per cell.
  const xs = m.shown.map((c) => c.x);
  const ys = m.shown.map((c) => c.y);
  const span = Math.max(Math.max(...xs) - Math.min(...xs), Math.max(...ys) - Math.min(...ys), 1);
  const pad = (v: number[]): [number, number] => [Math.min(...v) - 0.06 * span - 0.5, Math.max(...v) + 0.06 * span + 0.5];
  const across = Math.max(...m.sizes.slice(0, 2));
  data.unshift({
    type: 'scatter',
    mode: 'markers',
    x: xs,
    y: ys,
    text: m.shown.map((c) => `cell (${c.index.join(', ')})`),
    marker: {
      size: Math.max(4, Math.min(22, Math.round(360 / across))),
      symbol: 'square',
      color: m.shown.map((c) => scale.shown(c.value)),
      colorscale: scale.colorscale,
      cmin: scale.range[0],
      cmax: scale.range[1],
      line: { width: 0 },
    },
    customdata: m.shown.map((c) => c.value),
    name: title,
    hovertemplate: `%{text}<br>x = %{x:.3f}, y = %{y:.3f}<br>${scale.hover} = %{customdata:.4g}<extra></extra>`,
  });
  return { data, layout: { ...layoutBase, ...axes(pad(xs), pad(ys)) } };
}

/** What the sample's disorder was, in a few words. */
function disorderText(result: ViewResult): string {
  const d = result.disorder as
    | { seed?: number; onsite?: { width?: number }; bond?: { width?: number }; vacancies?: { fraction?: number }; displacement?: { width?: number } }
    | undefined;
  if (d === undefined) return '';
  const parts: string[] = [];
  if (d.onsite?.width) parts.push(`W = ${fmt(d.onsite.width)}`);
  if (d.bond?.width) parts.push(`bond ${fmt(d.bond.width)}`);
  if (d.vacancies?.fraction) parts.push(`vacancies ${fmt(d.vacancies.fraction)}`);
  if (d.displacement?.width) parts.push(`displacement ${fmt(d.displacement.width)}`);
  return parts.length === 0 ? 'clean sample' : `${parts.join(', ')}, seed ${d.seed ?? 0}`;
}

function warningText(result: ViewResult): string {
  const n = result.checks?.warnings?.length ?? 0;
  return n === 0 ? '' : ` · ${n} warning${n === 1 ? '' : 's'}`;
}

const allOpen = (result: ViewResult) => Array.isArray(result.boundary) && result.boundary.every((b) => b === 'open');

/** "open", "periodic" or "open × periodic". */
function boundaryText(result: ViewResult): string {
  const b = Array.isArray(result.boundary) ? (result.boundary as unknown[]).map(String) : [];
  return b.length === 0 ? 'open' : b.every((x) => x === b[0]) ? b[0] : b.join(' × ');
}

/** The clean crystal's Chern number beside a marker (src/views.ts adds it): a number, null when withheld, absent when not computed. */
function cleanChern(result: ViewResult): number | null | undefined {
  if (!('cleanChern' in result)) return undefined;
  return optionalNumber(result, 'cleanChern');
}

/** The marker's colour span: +-2 and at least twice the clean C, fixed while only disorder moves. */
function markerSpan(clean: number | null | undefined): number {
  return Math.max(2, 2 * Math.abs(clean ?? 0));
}

export function markerFigure(result: ViewResult, ctx: FigureContext): Figure {
  const m = read(result, ctx.spec, 'marker');
  const clean = cleanChern(result);
  const gapless = result.checks.gapless === true;
  const centre = centreCell(m.all, m.sizes);
  const total = optionalNumber(result, 'total');
  const parts: string[] = [];
  if (gapless) parts.push('markers withheld: no gap at E_F');
  else if (centre !== null) parts.push(`centre ${fmt(centre.value)} (${centre.edge} cell${centre.edge === 1 ? '' : 's'} from the edge)`);
  if (clean !== undefined) parts.push(clean === null ? 'clean C withheld' : `clean C = ${fmt(clean)}`);
  if (total !== null) parts.push(`Σ ${fmt(total)}${allOpen(result) ? ' (0 on an open sample)' : ''}`);
  parts.push(disorderText(result));
  const method = result.method === 'chebyshev' ? ` · Chebyshev` : '';
  const summary = `${parts.filter(Boolean).join(' · ')}${method}${warningText(result)}`;
  const span = markerSpan(clean);
  const scale: Scale = {
    range: [-span, span],
    colorscale: DIVERGING,
    shown: (v) => v,
    barTitle: `marker (±${fmt(span)})`,
    hover: 'marker',
  };
  return { ...mapFigure(m, scale, 'Local Chern marker', boundaryText(result)), summary, invariant: null, gapless };
}

export function densityFigure(result: ViewResult, ctx: FigureContext): Figure {
  const m = read(result, ctx.spec, 'density');
  const energy = optionalNumber(result, 'energy');
  let peak = 0;
  for (const c of m.shown) if (c.value > peak) peak = c.value;
  const centre = centreCell(m.all, m.sizes);
  const parts: string[] = [];
  if (energy !== null) parts.push(`E = ${fmt(energy)}`);
  if (centre !== null) {
    const err = centre.error === null ? '' : ` ± ${fmt(centre.error)}`;
    parts.push(`centre ${fmt(centre.value)}${err} (${centre.edge} cell${centre.edge === 1 ? '' : 's'} from the edge)`);
  }
  parts.push(`max ${fmt(peak)}`);
  parts.push(disorderText(result));
  const resolution = optionalNumber(result, 'resolution');
  const method = result.method === 'dense' ? 'exact' : `Chebyshev N = ${String(result.order)}${resolution === null ? '' : `, resolution ${fmt(resolution)}`}`;
  const summary = `${parts.filter(Boolean).join(' · ')} · ${method}${warningText(result)}`;
  const norm = peak > 0 ? 1 / peak : 0;
  const scale: Scale = m.dim === 1
    ? { range: [0, peak], colorscale: SEQUENTIAL, shown: (v) => v, barTitle: 'ρ', hover: 'ρ' }
    : { range: [0, 1], colorscale: SEQUENTIAL, shown: (v) => v * norm, barTitle: 'ρ / max ρ', hover: 'ρ' };
  return { ...mapFigure(m, scale, 'Local density of states', boundaryText(result)), summary, invariant: null, gapless: false };
}

function table(m: SampleMap, value: string): Table {
  const index = ['i1', 'i2', 'i3'].slice(0, m.dim);
  const withError = m.all.some((c) => c.error !== null);
  return {
    columns: [...index, 'x', 'y', value, ...(withError ? ['standard error'] : []), 'cells from edge'],
    rows: m.all.map((c) => [...c.index, c.x, c.y, c.value, ...(withError ? [c.error] : []), c.edge]),
  };
}

export function markerTable(result: ViewResult, ctx: FigureContext): Table {
  return table(read(result, ctx.spec, 'marker'), 'marker');
}

export function densityTable(result: ViewResult, ctx: FigureContext): Table {
  return table(read(result, ctx.spec, 'density'), 'density [states per energy]');
}

/** Each member of a disorder ensemble by its seed, the mean and its standard error (a band). */
export function ensembleFigure(result: ViewResult): Figure {
  const { seeds, values, mean, error, of, nulls } = readEnsemble(result);
  const xs: number[] = [];
  const ys: number[] = [];
  const missing: number[] = [];
  for (let i = 0; i < values.length; i++) {
    if (Number.isNaN(values[i])) missing.push(seeds[i]);
    else {
      xs.push(seeds[i]);
      ys.push(values[i]);
    }
  }
  const lo = seeds.length ? Math.min(...Array.from(seeds)) - 0.5 : 0;
  const hi = seeds.length ? Math.max(...Array.from(seeds)) + 0.5 : 1;
  const data: Data[] = [];
  if (mean !== null) {
    const e = error ?? 0;
    data.push({
      type: 'scatter',
      mode: 'lines',
      x: [lo, hi, hi, lo, lo],
      y: [mean - e, mean - e, mean + e, mean + e, mean - e],
      fill: 'toself',
      fillcolor: 'rgba(31,78,156,0.15)',
      line: { width: 0 },
      name: 'mean ± standard error',
      hoverinfo: 'skip',
    });
    data.push({ type: 'scatter', mode: 'lines', x: [lo, hi], y: [mean, mean], line: { color: '#1f4e9c', width: 2 }, name: 'mean', hovertemplate: `mean ${fmt(mean)} ± ${fmt(e)}<extra></extra>` });
  }
  data.push({ type: 'scatter', mode: 'markers', x: xs, y: ys, marker: { size: 7, color: '#a1221b' }, name: of, hovertemplate: `seed %{x}<br>${of} = %{y:.4g}<extra></extra>` });
  if (missing.length > 0) {
    data.push({ type: 'scatter', mode: 'markers', x: missing, y: missing.map(() => mean ?? 0), marker: { symbol: 'x-thin-open', size: 10, color: '#555', line: { width: 2 } }, name: 'no value (gapless or singular)', hovertemplate: 'seed %{x}: no value<extra></extra>' });
  }
  const head = mean === null ? `${of}: no member gave a value` : `${of} mean ${fmt(mean)} ± ${fmt(error ?? 0)}`;
  const summary = `${head} over ${values.length - nulls} of ${values.length} samples${nulls > 0 ? ` (${nulls} without a value)` : ''}${warningText(result)}`;
  return {
    data,
    layout: {
      ...BASE_LAYOUT,
      title: titled(`Disorder ensemble — ${of}`),
      xaxis: { title: { text: 'seed' }, range: [lo, hi], zeroline: false },
      yaxis: { title: { text: of }, zeroline: false },
      showlegend: true,
    },
    summary,
    invariant: null,
    gapless: false,
  };
}

function readEnsemble(result: ViewResult) {
  const seeds = numberArray(result, 'seeds');
  const values = numberArray(result, 'values');
  if (seeds.length !== values.length) throw new Error(`ensemble result: ${seeds.length} seeds for ${values.length} values`);
  let nulls = 0;
  for (let i = 0; i < values.length; i++) if (Number.isNaN(values[i])) nulls++;
  const members = result.members === undefined ? Array.from(values, (_, i) => i) : numberArray(result, 'members');
  return { seeds, values, members, mean: optionalNumber(result, 'mean'), error: optionalNumber(result, 'standardError'), of: String(result.of ?? 'value'), nulls };
}

export function ensembleTable(result: ViewResult): Table {
  const { seeds, values, members, of } = readEnsemble(result);
  return { columns: ['member', 'seed', of], rows: Array.from(values, (v, i) => [members[i], seeds[i], Number.isNaN(v) ? null : v]) };
}
