/**
 * Berry-curvature map over the Brillouin zone: a heatmap in reduced momentum (units of the
 * reciprocal lattice), a diverging colour scale pinned to zero, the Chern number and minimum gap
 * in the title, the first-zone boundary on non-square lattices, and the gap-closing k when gapless.
 */
import { boundaryReduced } from './geometry.js';
import type { Data } from './plotly-json.js';
import type { ViewResult } from '../contract/protocol.js';
import type { Raster } from './picture.js';
import {
  BASE_LAYOUT,
  CLOSING_MARKER,
  DIVERGING,
  energyUnit,
  fmt,
  gapText,
  gridOf,
  numberArray,
  optionalNumber,
  titled,
  type Figure,
  type FigureContext,
  type Table,
} from './common.js';

interface CurvatureData {
  n1: number;
  n2: number;
  /** Sample momenta in units of the reciprocal lattice (k / 2pi). */
  x1: number[];
  x2: number[];
  /** Curvature per rad^2 at (k1[a], k2[b]), stored k2-major: omega[b * n1 + a]. */
  omega: ArrayLike<number>;
  chern: number | null;
}

function read(result: ViewResult): CurvatureData {
  const [n1, n2] = gridOf(result);
  const omega = numberArray(result, 'values');
  const k1 = numberArray(result, 'k1');
  const k2 = numberArray(result, 'k2');
  if (omega.length !== n1 * n2 || k1.length !== n1 || k2.length !== n2) {
    throw new Error(`curvature result: ${omega.length} values, ${k1.length} x ${k2.length} momenta for a ${n1}x${n2} grid`);
  }
  const turns = (k: ArrayLike<number>) => Array.from(k, (v) => v / (2 * Math.PI));
  return { n1, n2, x1: turns(k1), x2: turns(k2), omega, chern: integerOrValue(optionalNumber(result, 'total')) };
}

/** Where the colour-bar heatmap sits: far outside any reduced-momentum axis range. */
const OUTSIDE = 1e6;

/** A lattice Chern number is an integer up to rounding; show it as one. */
export function integerOrValue(value: number | null): number | null {
  if (value === null) return null;
  const nearest = Math.round(value);
  return Math.abs(value - nearest) < 1e-6 ? nearest : value;
}

/** How many times to repeat the torus along each axis so the first zone fits in the picture. */
function tiling(corners: [number, number][] | null): { from: number; to: number }[] {
  if (corners === null) return [{ from: 0, to: 1 }, { from: 0, to: 1 }];
  return [0, 1].map((axis) => {
    const lo = Math.min(...corners.map((c) => c[axis]));
    const hi = Math.max(...corners.map((c) => c[axis]));
    return { from: Math.floor(lo + 0.5), to: Math.ceil(hi + 0.5) };
  });
}

export function curvatureFigure(result: ViewResult, ctx: FigureContext): Figure {
  const { n1, n2, x1, x2, omega, chern } = read(result);
  const corners = ctx.spec.vectors.length >= 2 && ctx.spec.periodic >= 2 ? boundaryReduced(ctx.spec.vectors) : null;
  const [t1, t2] = tiling(corners);

  // Periodic copies of the torus, cropped to the picture, so a hexagonal zone is covered.
  const span = (axis: 0 | 1): [number, number] => {
    if (corners === null) return [-0.5, 0.5];
    const lo = Math.min(...corners.map((c) => c[axis]));
    const hi = Math.max(...corners.map((c) => c[axis]));
    const pad = 0.06 * (hi - lo);
    return [lo - pad, hi + pad];
  };
  const xRange = span(0);
  const yRange = span(1);
  const cover = (base: number[], tiles: { from: number; to: number }, [lo, hi]: [number, number], step: number) => {
    const out: { value: number; index: number }[] = [];
    for (let s = tiles.from; s < tiles.to; s++) {
      base.forEach((v, index) => {
        if (v + s >= lo - step && v + s <= hi + step) out.push({ value: v + s, index });
      });
    }
    return out;
  };
  const xs = cover(x1, t1, xRange, 1 / n1);
  const ys = cover(x2, t2, yRange, 1 / n2);
  const x = xs.map((p) => p.value);
  const y = ys.map((p) => p.value);
  let peak = 0;
  for (let i = 0; i < omega.length; i++) peak = Math.max(peak, Math.abs(omega[i]));
  // The picture: bricks coloured by omega / max|omega| (top row first), drawn by the view as an
  // image, so a drag step recolours it without a plotly replot. The colour bar is relative for the
  // same reason; the title states max|omega|.
  const width = xs.length;
  const height = ys.length;
  const relative = new Float32Array(width * height);
  const norm = peak > 0 ? 1 / peak : 0;
  for (let r = 0; r < height; r++) {
    const base = ys[height - 1 - r].index * n1;
    for (let c = 0; c < width; c++) relative[r * width + c] = omega[base + xs[c].index] * norm;
  }
  const dx = 1 / n1;
  const dy = 1 / n2;
  const raster: Raster = {
    width,
    height,
    values: relative,
    x: [x[0] - dx / 2, x[width - 1] + dx / 2],
    y: [y[0] - dy / 2, y[height - 1] + dy / 2],
    range: [-1, 1],
    colorscale: DIVERGING,
  };
  // Hover values: an invisible heatmap over the same bricks (typed rows: plotly reads them as is).
  // Built when first read: a drag step draws only the picture, and plotly reads z at rest.
  let rows: Float64Array[] | null = null;
  const hoverRows = (): Float64Array[] =>
    (rows ??= ys.map((row) => {
      const out = new Float64Array(width);
      const base = row.index * n1;
      for (let c = 0; c < width; c++) out[c] = omega[base + xs[c].index];
      return out;
    }));

  const data: Data[] = [
    {
      type: 'heatmap',
      x,
      y,
      // plotly's types list only nested arrays; its heatmap reads typed rows the same way.
      get z() {
        return hoverRows() as unknown as number[][];
      },
      opacity: 0,
      showscale: false,
      hovertemplate: 'k₁ = %{x:.3f} b₁<br>k₂ = %{y:.3f} b₂<br>Ω = %{z:.4g} rad⁻²<extra></extra>',
      name: 'Berry curvature',
    },
    {
      // The colour bar, for the picture: a two-brick heatmap far outside the axis ranges.
      type: 'heatmap',
      x: [OUTSIDE, OUTSIDE + 1],
      y: [OUTSIDE],
      z: [[-1, 1]],
      zmin: -1,
      zmax: 1,
      colorscale: DIVERGING,
      colorbar: { title: { text: 'Ω / max|Ω|' } },
      hoverinfo: 'skip',
      name: 'colour scale',
    },
  ];
  if (corners !== null) {
    data.push({
      type: 'scatter',
      mode: 'lines',
      x: [...corners.map((c) => c[0]), corners[0][0]],
      y: [...corners.map((c) => c[1]), corners[0][1]],
      line: { color: '#222', width: 2 },
      hoverinfo: 'skip',
      name: 'Brillouin zone',
      showlegend: false,
    });
  }
  const gapless = result.checks.gapless === true;
  const at = result.checks.minGapAt;
  if (gapless && at && at.length >= 2) {
    data.push({
      type: 'scatter',
      mode: 'markers',
      x: [at[0]],
      y: [at[1]],
      marker: CLOSING_MARKER,
      // Drawn whole also where the gap closes on the edge of the picture.
      cliponaxis: false,
      name: 'gap closes',
      hovertemplate: 'gap closes here<br>k = (%{x:.3f}, %{y:.3f})<extra></extra>',
      showlegend: false,
    });
  }

  const unit = energyUnit(ctx.spec);
  const invariant = gapless ? null : chern;
  const head = invariant === null ? 'C withheld' : `C = ${fmt(invariant)}`;
  const summary = `${head} · ${gapText(result, unit)} · max|Ω| ${fmt(peak)} rad⁻²`;
  return {
    data,
    layout: {
      ...BASE_LAYOUT,
      // Transparent: a drag step draws the new picture under plotly's drawing (widgets/src/preview.ts).
      plot_bgcolor: 'rgba(0,0,0,0)',
      title: titled(`Berry curvature — ${summary}`),
      // No grid lines: they would draw over the picture (a layout image sits under them).
      xaxis: { title: { text: 'k₁ [b₁]' }, range: xRange, zeroline: false, showgrid: false, constrain: 'domain' },
      yaxis: { title: { text: 'k₂ [b₂]' }, range: yRange, zeroline: false, showgrid: false, scaleanchor: 'x', constrain: 'domain' },
    },
    summary,
    invariant,
    gapless,
    raster,
    frameKey: JSON.stringify([n1, n2, width, height, raster.x, raster.y, xRange, yRange, corners, gapless ? at : null]),
  };
}

export function curvatureTable(result: ViewResult): Table {
  const { n1, n2, x1, x2, omega } = read(result);
  const rows: number[][] = [];
  for (let b = 0; b < n2; b++) for (let a = 0; a < n1; a++) rows.push([x1[a], x2[b], omega[b * n1 + a]]);
  return { columns: ['k1 [b1]', 'k2 [b2]', 'curvature [rad^-2]'], rows };
}
