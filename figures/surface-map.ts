/**
 * Constant-energy map of a 3D model's surface: the spectral function at one energy over the surface
 * zone (fractions of the surface reciprocal vectors, -1/2 to 1/2), on a logarithmic colour scale
 * relative to the largest weight shown, the bottom and top terminations and the bulk projection side
 * by side (spectral.ts), with the bulk Weyl nodes projected onto the zone and marked by chirality in
 * each panel: a Fermi arc ends at projections of nodes of opposite chirality. A drag step previews
 * the picture with the nodes sketched over it (widgets/src/preview.ts).
 */
import type { ViewResult } from '../contract/protocol.js';
import type { Data } from './plotly-json.js';
import type { Sketch } from './picture.js';
import { BASE_LAYOUT, energyUnit, fmt, gridOf, ResultShapeError, titled, unitText, type Figure, type FigureContext, type Table } from './common.js';
import { colourBarTrace, largestWeight, panelAnnotations, panelGeometry, panelRaster, panelWeights, PANELS, cutText, spectralSummary } from './spectral.js';

export interface NodeShape {
  kPar: number[];
  chirality: number | null;
}

interface MapData {
  n1: number;
  n2: number;
  energy: number;
  /** bottom, top, bulk: point (j1, j2) at j2 * n1 + j1. */
  weights: ArrayLike<number>[];
  nodes: NodeShape[];
}

function read(result: ViewResult): MapData {
  const [n1, n2] = gridOf(result);
  const energy = result.energy;
  if (typeof energy !== 'number') throw new ResultShapeError(result.kind, 'energy', energy);
  const nodes = result.nodes;
  if (!Array.isArray(nodes) || !nodes.every((n: Partial<NodeShape>) => Array.isArray(n?.kPar) && n.kPar.length === 2 && (n.chirality === null || typeof n.chirality === 'number'))) {
    throw new ResultShapeError(result.kind, 'nodes', nodes);
  }
  return { n1, n2, energy, weights: panelWeights(result, n1 * n2), nodes: nodes as NodeShape[] };
}

/** How a node of each chirality is marked. */
const NODE_MARKS = [
  { chirality: 1, name: 'Weyl node, chirality +1', marker: { symbol: 'triangle-up' as const, size: 13, color: '#b3261e', line: { width: 1, color: '#ffffff' } } },
  { chirality: -1, name: 'Weyl node, chirality −1', marker: { symbol: 'triangle-down' as const, size: 13, color: '#1f4e9c', line: { width: 1, color: '#ffffff' } } },
  { chirality: null, name: 'Weyl node, chirality uncertain', marker: { symbol: 'circle-open' as const, size: 11, color: '#555555', line: { width: 2, color: '#555555' } } },
];

/** Ticks of each panel (its edges, ±1/2, would crowd the neighbouring panel's). */
const TICKS = [-0.25, 0, 0.25];

export function surfaceMapFigure(result: ViewResult, ctx: FigureContext): Figure {
  const { n1, n2, energy, weights, nodes } = read(result);
  const dx = 1 / n1;
  const dy = 1 / n2;
  const geometry = panelGeometry(n1, -0.5, dx);
  const stride = geometry.left(1) - geometry.left(0);
  const peak = largestWeight(weights);
  const y: [number, number] = [-0.5 - dy / 2, -0.5 + (n2 - 1) * dy + dy / 2];
  const raster = panelRaster(geometry, n2, y, peak, (p, c, r) => weights[p][r * n1 + c]);

  // Hover values at rest: one invisible heatmap over the panels (see surface-spectrum.ts).
  const xs: number[] = [];
  for (let p = 0; p < PANELS.length; p++) for (let c = 0; c < n1; c++) xs.push(geometry.at(p, c));
  let rows: number[][] | null = null;
  const hoverRows = () =>
    (rows ??= Array.from({ length: n2 }, (_, r) => xs.map((_, i) => Number(weights[Math.floor(i / n1)][r * n1 + (i % n1)].toPrecision(3)))));
  const data: Data[] = [
    {
      type: 'heatmap',
      x: xs,
      y: Array.from({ length: n2 }, (_, r) => -0.5 + r * dy),
      get z() {
        return hoverRows();
      },
      opacity: 0,
      showscale: false,
      hovertemplate: 'k₂ = %{y:.3f} b̄₂<br>A = %{z:.3g}<extra></extra>',
      name: 'spectral function',
    },
    colourBarTrace(),
  ];
  const sketch: Sketch = { dots: [], lines: [] };
  for (const mark of NODE_MARKS) {
    const own = nodes.filter((n) => n.chirality === mark.chirality);
    if (own.length === 0) continue;
    const x: number[] = [];
    const yy: number[] = [];
    for (let p = 0; p < PANELS.length; p++) {
      for (const n of own) {
        x.push(n.kPar[0] + p * stride);
        yy.push(n.kPar[1]);
      }
    }
    sketch.dots.push({ x, y: yy, colour: mark.marker.color, size: 10 });
    data.push({
      type: 'scatter',
      mode: 'markers',
      x,
      y: yy,
      marker: mark.marker,
      cliponaxis: false,
      name: mark.name,
      hovertemplate: `${mark.name}<br>k̄₂ = %{y:.3f} b̄₂<extra></extra>`,
    });
  }

  const tickvals: number[] = [];
  const ticktext: string[] = [];
  for (let p = 0; p < PANELS.length; p++) {
    for (const t of TICKS) {
      tickvals.push(t + p * stride);
      ticktext.push(String(t));
    }
  }
  const unit = energyUnit(ctx.spec);
  const signs = nodes.map((n) => (n.chirality === null ? '?' : n.chirality > 0 ? '+' : '−')).join(', ');
  const nodeText = nodes.length === 0 ? 'no Weyl nodes projected' : `${nodes.length} Weyl node${nodes.length > 1 ? 's' : ''} projected (${signs})`;
  const summary = spectralSummary(result, unit, `E = ${fmt(energy)}${unitText(unit)} · ${nodeText} · max A ${fmt(peak)}`);
  const xRange: [number, number] = [raster.x[0], raster.x[1]];
  // Which marker traces there are (the legend); where the nodes are is the sketch's to draw.
  const nodeKey = NODE_MARKS.map((mark) => nodes.filter((n) => n.chirality === mark.chirality).length);
  return {
    data,
    layout: {
      ...BASE_LAYOUT,
      plot_bgcolor: 'rgba(0,0,0,0)',
      title: titled(`Surface map at E = ${fmt(energy)}${unitText(unit)} — ${cutText(result)} · ${nodeText}`),
      xaxis: { title: { text: 'k₁ [b̄₁], per panel' }, range: xRange, zeroline: false, showgrid: false, tickmode: 'array', tickvals, ticktext },
      yaxis: { title: { text: 'k₂ [b̄₂]' }, range: y, zeroline: false, showgrid: false },
      annotations: panelAnnotations(geometry),
      showlegend: nodes.length > 0,
      legend: { orientation: 'h', x: 0, y: -0.18 },
    },
    summary,
    invariant: null,
    gapless: false,
    raster,
    // A drag step draws the nodes as dots over the picture (they move with the model's parameters).
    sketch,
    frameKey: JSON.stringify([n1, n2, y, xRange, nodeKey]),
  };
}

export function surfaceMapTable(result: ViewResult): Table {
  const { n1, n2, weights } = read(result);
  const rows: number[][] = [];
  for (let j2 = 0; j2 < n2; j2++) {
    for (let j1 = 0; j1 < n1; j1++) rows.push([-0.5 + j1 / n1, -0.5 + j2 / n2, ...weights.map((w) => w[j2 * n1 + j1])]);
  }
  return { columns: ['k1 [surface b1]', 'k2 [surface b2]', ...PANELS.map((panel) => `A ${panel.name}`)], rows };
}
