/**
 * Surface (or edge) spectral function A(k_par, E) of a half-infinite sample: momentum along the
 * surface path against energy, on a logarithmic colour scale relative to the largest weight shown,
 * the bottom and top terminations and the bulk projection side by side (spectral.ts). The picture is
 * a raster, so a drag step recolours it without a plotly replot.
 */
import type { ViewResult } from '../contract/protocol.js';
import type { Data } from './plotly-json.js';
import { BASE_LAYOUT, energyUnit, fmt, numberArray, ResultShapeError, titled, withUnit, type Figure, type FigureContext, type Table } from './common.js';
import { colourBarTrace, largestWeight, panelAnnotations, panelGeometry, panelRaster, panelWeights, PANELS, cutText, spectralSummary } from './spectral.js';

interface PathShape {
  dim: number;
  count: number;
  fractions: ArrayLike<number>;
  labels: { label: string; index: number }[];
}

interface SpectrumData {
  boundary: string;
  path: PathShape;
  energies: ArrayLike<number>;
  /** bottom, top, bulk; k-major: weight of point p at energy e is w[p * energies.length + e]. */
  weights: ArrayLike<number>[];
}

function read(result: ViewResult): SpectrumData {
  const path = result.path as Partial<PathShape> | undefined;
  if (!path || typeof path.count !== 'number' || typeof path.dim !== 'number' || !Array.isArray(path.labels) || path.fractions === undefined) {
    throw new ResultShapeError(result.kind, 'path', path);
  }
  const energies = numberArray(result, 'energies');
  const boundary = typeof result.boundary === 'string' ? result.boundary : 'surface';
  return { boundary, path: path as PathShape, energies, weights: panelWeights(result, path.count * energies.length) };
}

/** Column positions of the path: an edge's momenta in units of b (-1/2 to 1/2), a surface path's points evenly. */
function columns(path: PathShape): { x0: number; dx: number; xTitle: string } {
  const dx = 1 / Math.max(1, path.count - 1);
  return path.dim === 1 ? { x0: path.fractions[0], dx, xTitle: 'k along the edge [b], per panel' } : { x0: 0, dx, xTitle: 'k along the surface path, per panel' };
}

export function surfaceSpectrumFigure(result: ViewResult, ctx: FigureContext): Figure {
  const { boundary, path, energies, weights } = read(result);
  const ne = energies.length;
  const { x0, dx, xTitle } = columns(path);
  const geometry = panelGeometry(path.count, x0, dx);
  const peak = largestWeight(weights);
  const dy = ne > 1 ? (energies[ne - 1] - energies[0]) / (ne - 1) : 1;
  const y: [number, number] = [energies[0] - dy / 2, energies[ne - 1] + dy / 2];
  const raster = panelRaster(geometry, ne, y, peak, (p, c, r) => weights[p][c * ne + r]);

  // Hover values: one invisible heatmap over the three panels (gaps empty), built when first read:
  // a drag step draws only the picture, and plotly reads z at rest. Three significant digits keep a
  // saved figure small.
  const xs: number[] = [];
  const source: { p: number; c: number }[] = [];
  for (let p = 0; p < PANELS.length; p++) {
    for (let c = 0; c < path.count; c++) {
      xs.push(geometry.at(p, c));
      source.push({ p, c });
    }
  }
  let rows: (number | null)[][] | null = null;
  const hoverRows = () =>
    (rows ??= Array.from({ length: ne }, (_, e) => source.map(({ p, c }) => Number(weights[p][c * ne + e].toPrecision(3)))));
  const unit = energyUnit(ctx.spec);
  const data: Data[] = [
    {
      type: 'heatmap',
      x: xs,
      y: Array.from(energies),
      get z() {
        return hoverRows() as number[][];
      },
      opacity: 0,
      showscale: false,
      hovertemplate: `E = %{y:.4f}<br>A = %{z:.3g}<extra></extra>`,
      name: 'spectral function',
    },
    colourBarTrace(),
  ];

  const tickvals: number[] = [];
  const ticktext: string[] = [];
  for (let p = 0; p < PANELS.length; p++) {
    for (const l of path.labels) {
      tickvals.push(geometry.at(p, l.index));
      ticktext.push(l.label);
    }
  }
  const lead = `${boundary} spectral function · max A ${fmt(peak)}`;
  const summary = spectralSummary(result, unit, lead);
  const xRange: [number, number] = [raster.x[0], raster.x[1]];
  return {
    data,
    layout: {
      ...BASE_LAYOUT,
      // Transparent: a drag step draws the new picture under plotly's drawing (widgets/src/preview.ts).
      plot_bgcolor: 'rgba(0,0,0,0)',
      title: titled(`${boundary === 'surface' ? 'Surface' : boundary === 'edge' ? 'Edge' : 'End'} spectral function — ${cutText(result)} · η = ${fmt(result.eta as number)}`),
      xaxis: { title: { text: xTitle }, range: xRange, zeroline: false, showgrid: false, tickmode: 'array', tickvals, ticktext },
      yaxis: { title: { text: withUnit('E', unit) }, range: y, zeroline: false, showgrid: false },
      annotations: panelAnnotations(geometry),
    },
    summary,
    invariant: null,
    gapless: false,
    raster,
    frameKey: JSON.stringify([path.count, ne, y, xRange, tickvals, ticktext, xTitle, unit]),
  };
}

export function surfaceSpectrumTable(result: ViewResult): Table {
  const { path, energies, weights } = read(result);
  const ne = energies.length;
  const rows: number[][] = [];
  for (let p = 0; p < path.count; p++) {
    const k = Array.from({ length: path.dim }, (_, i) => path.fractions[p * path.dim + i]);
    for (let e = 0; e < ne; e++) rows.push([p, ...k, energies[e], ...weights.map((w) => w[p * ne + e])]);
  }
  const kColumns = Array.from({ length: path.dim }, (_, i) => `k${i + 1} [surface b${i + 1}]`);
  return { columns: ['path point', ...kColumns, 'energy', ...PANELS.map((panel) => `A ${panel.name}`)], rows };
}
