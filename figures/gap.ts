/**
 * The direct gap of a band group over the Brillouin zone: a line along k in 1D, a map over the
 * reduced zone in 2D (dark where the gap is small), with the smallest gap marked, crossed out when
 * the gap closes. A 3D gap is drawn on the k3 plane through its minimum.
 */
import type { Data } from './plotly-json.js';
import type { ViewResult } from '../contract/protocol.js';
import { BASE_LAYOUT, CLOSING_MARKER, energyUnit, fmt, gapText, numberArray, titled, unitText, withUnit, type Figure, type FigureContext, type Table } from './common.js';

/** Light where the gap is wide, dark where it closes. */
const GAP_SCALE: [number, string][] = [
  [0, '#1b1b3a'],
  [0.25, '#4a3f8c'],
  [0.6, '#9fb6dd'],
  [1, '#f4f7fb'],
];

interface GapData {
  grid: number[];
  gap: ArrayLike<number>;
  /** Where the smallest gap is, in units of the reciprocal lattice. */
  at: number[];
}

function read(result: ViewResult): GapData {
  const grid = result.grid;
  const gap = numberArray(result, 'gap');
  const at = (result.at as { fractions?: number[] } | undefined)?.fractions;
  if (!Array.isArray(grid) || grid.length < 1 || grid.length > 3 || gap.length !== grid.reduce((n: number, g: number) => n * g, 1) || !Array.isArray(at)) {
    throw new Error(`gap result: ${gap.length} gaps for grid ${JSON.stringify(grid)}`);
  }
  return { grid: grid as number[], gap, at };
}

/** Sample j of n along one direction, in units of the reciprocal lattice (k = -pi + 2 pi j / n). */
const fraction = (j: number, n: number): number => -0.5 + j / n;

export function gapFigure(result: ViewResult, ctx: FigureContext): Figure {
  const { grid, gap, at } = read(result);
  const unit = energyUnit(ctx.spec);
  const gapless = result.checks.gapless === true;
  const marker = gapless ? CLOSING_MARKER : { size: 9, color: '#d9822b', line: { width: 1.5, color: '#ffffff' } };
  const summary = gapText(result, unit);
  const data: Data[] = [];
  let xaxis: Record<string, unknown>;
  let yaxis: Record<string, unknown>;
  if (grid.length === 1) {
    const n = grid[0];
    data.push({ type: 'scatter', mode: 'lines', x: Array.from({ length: n }, (_, j) => fraction(j, n)), y: Array.from(gap), line: { color: '#3b6ea8', width: 2 }, name: 'gap' });
    data.push({ type: 'scatter', mode: 'markers', x: [at[0]], y: [result.checks.minGap ?? 0], marker, cliponaxis: false, name: gapless ? 'gap closes' : 'smallest gap' });
    xaxis = { title: { text: 'k [b]' }, range: [-0.5, 0.5], zeroline: false };
    yaxis = { title: { text: withUnit('direct gap', unit) }, rangemode: 'tozero', zeroline: false };
  } else {
    const [n1, n2] = grid;
    const n3 = grid[2] ?? 1;
    // The k3 plane through the minimum (the only plane in 2D); last direction fastest.
    const plane = grid.length === 3 ? Math.round((at[2] + 0.5) * n3) % n3 : 0;
    const z = Array.from({ length: n2 }, (_, j) => Array.from({ length: n1 }, (__, i) => gap[(i * n2 + j) * n3 + plane]));
    data.push({
      type: 'heatmap',
      x: Array.from({ length: n1 }, (_, i) => fraction(i, n1)),
      y: Array.from({ length: n2 }, (_, j) => fraction(j, n2)),
      z,
      zmin: 0,
      colorscale: GAP_SCALE,
      colorbar: { title: { text: withUnit('gap', unit) } },
      hovertemplate: `k₁ = %{x:.3f} b₁<br>k₂ = %{y:.3f} b₂<br>gap %{z:.4g}${unitText(unit)}<extra></extra>`,
      name: 'direct gap',
    });
    data.push({ type: 'scatter', mode: 'markers', x: [at[0]], y: [at[1]], marker, cliponaxis: false, name: gapless ? 'gap closes' : 'smallest gap', showlegend: false });
    xaxis = { title: { text: 'k₁ [b₁]' }, zeroline: false, showgrid: false, constrain: 'domain' };
    yaxis = { title: { text: grid.length === 3 ? `k₂ [b₂] (plane k₃ = ${fmt(fraction(plane, n3))} b₃)` : 'k₂ [b₂]' }, zeroline: false, showgrid: false, scaleanchor: 'x', constrain: 'domain' };
  }
  return {
    data,
    layout: { ...BASE_LAYOUT, title: titled(`Direct gap — ${summary}`), xaxis, yaxis },
    summary,
    invariant: null,
    gapless,
  };
}

export function gapTable(result: ViewResult): Table {
  const { grid, gap } = read(result);
  const columns = [...grid.map((_, d) => `k${d + 1} [b${d + 1}]`), 'gap'];
  const rows: number[][] = [];
  for (let flat = 0; flat < gap.length; flat++) {
    const index: number[] = [];
    let rest = flat;
    for (let d = grid.length - 1; d >= 0; d--) {
      index[d] = rest % grid[d];
      rest = Math.floor(rest / grid[d]);
    }
    rows.push([...index.map((j, d) => fraction(j, grid[d])), gap[flat]]);
  }
  return { columns, rows };
}
