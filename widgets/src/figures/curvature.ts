/**
 * Berry-curvature map over the Brillouin zone: a heatmap in reduced momentum (units of the
 * reciprocal lattice), a diverging colour scale pinned to zero, the Chern number and minimum gap
 * in the title, the first-zone boundary on non-square lattices, and the gap-closing k when gapless.
 */
import { boundaryReduced } from '../geometry.js';
import type { Data } from '../plotly.js';
import type { DiagnosticResult } from '../protocol.js';
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
  type Figure,
  type FigureContext,
  type Table,
} from './common.js';

/** Reduced coordinate of grid point i of n on [-1/2, 1/2): the engine samples k = -pi + 2pi i/n. */
export function gridAxis(n: number): number[] {
  return Array.from({ length: n }, (_, i) => -0.5 + i / n);
}

interface CurvatureData {
  n1: number;
  n2: number;
  /** Curvature at (i1, i2), stored i1-major: omega[i1 * n2 + i2]. */
  omega: ArrayLike<number>;
  chern: number | null;
}

function read(result: DiagnosticResult): CurvatureData {
  const [n1, n2] = gridOf(result);
  const omega = numberArray(result, 'curvature');
  if (omega.length !== n1 * n2) throw new Error(`curvature result: ${omega.length} values for a ${n1}x${n2} grid`);
  return { n1, n2, omega, chern: optionalNumber(result, 'chern') };
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

export function curvatureFigure(result: DiagnosticResult, ctx: FigureContext): Figure {
  const { n1, n2, omega, chern } = read(result);
  const corners = ctx.spec.vectors.length >= 2 && ctx.spec.periodic >= 2 ? boundaryReduced(ctx.spec.vectors) : null;
  const [t1, t2] = tiling(corners);

  // Periodic copies of the torus so a hexagonal zone is covered; rows are k2, columns k1.
  const base1 = gridAxis(n1);
  const base2 = gridAxis(n2);
  const x: number[] = [];
  for (let s = t1.from; s < t1.to; s++) for (const v of base1) x.push(v + s);
  const y: number[] = [];
  for (let s = t2.from; s < t2.to; s++) for (const v of base2) y.push(v + s);
  const z: number[][] = y.map((_, r) => {
    const i2 = r % n2;
    return x.map((__, c) => omega[(c % n1) * n2 + i2]);
  });
  let peak = 0;
  for (let i = 0; i < omega.length; i++) peak = Math.max(peak, Math.abs(omega[i]));

  const data: Data[] = [
    {
      type: 'heatmap',
      x,
      y,
      z,
      zmid: 0,
      zmin: -peak || -1,
      zmax: peak || 1,
      colorscale: DIVERGING,
      colorbar: { title: { text: 'Ω (reduced)' } },
      hovertemplate: 'k₁ = %{x:.3f} b₁<br>k₂ = %{y:.3f} b₂<br>Ω = %{z:.4g}<extra></extra>',
      name: 'Berry curvature',
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
      x: [at[0] / (2 * Math.PI)],
      y: [at[1] / (2 * Math.PI)],
      marker: CLOSING_MARKER,
      name: 'gap closes',
      hovertemplate: 'gap closes here<br>k = (%{x:.3f}, %{y:.3f})<extra></extra>',
      showlegend: false,
    });
  }

  const unit = energyUnit(ctx.spec);
  const invariant = gapless ? null : chern;
  const head = invariant === null ? 'C withheld' : `C = ${fmt(invariant)}`;
  const summary = `${head} · ${gapText(result, unit)}`;
  const xRange: [number, number] = corners ? [t1.from - 0.5, t1.to - 0.5] : [-0.5, 0.5];
  const yRange: [number, number] = corners ? [t2.from - 0.5, t2.to - 0.5] : [-0.5, 0.5];
  return {
    data,
    layout: {
      ...BASE_LAYOUT,
      title: { text: `Berry curvature — ${summary}` },
      xaxis: { title: { text: 'k₁ [b₁]' }, range: xRange, zeroline: false, constrain: 'domain' },
      yaxis: { title: { text: 'k₂ [b₂]' }, range: yRange, zeroline: false, scaleanchor: 'x', constrain: 'domain' },
    },
    summary,
    invariant,
    gapless,
  };
}

export function curvatureTable(result: DiagnosticResult): Table {
  const { n1, n2, omega } = read(result);
  const a1 = gridAxis(n1);
  const a2 = gridAxis(n2);
  const rows: number[][] = [];
  for (let i1 = 0; i1 < n1; i1++) for (let i2 = 0; i2 < n2; i2++) rows.push([a1[i1], a2[i2], omega[i1 * n2 + i2]]);
  return { columns: ['k1 [b1]', 'k2 [b2]', 'curvature'], rows };
}
