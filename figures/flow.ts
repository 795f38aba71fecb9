/**
 * Wannier-centre flow: hybrid Wannier centres (Wilson loops along k2) against the transverse
 * momentum k1, the largest-gap line, and the winding (Chern number) or Z2 index in the title.
 */
import type { Data } from './plotly-json.js';
import type { ViewResult } from '../contract/protocol.js';
import { BASE_LAYOUT, energyUnit, fmt, gapText, numberArray, optionalNumber, titled, type Figure, type FigureContext, type Table } from './common.js';
import { integerOrValue } from './curvature.js';

const CENTRE_COLOUR = '#1f4e9c';
const CENTRE_SIZE = 4;
const GAP_COLOUR = '#c0392b';

interface FlowData {
  /** Transverse momenta in units of b1 (k1 / 2pi). */
  x: number[];
  /** Centres per momentum (m each, in [0, 1), units of a2). */
  m: number;
  centres: ArrayLike<number>;
  gapMidpoint: ArrayLike<number>;
  winding: number | null;
  z2: number | null;
}

function read(result: ViewResult): FlowData {
  const across = numberArray(result, 'across');
  const centres = numberArray(result, 'centres');
  const gapMidpoint = numberArray(result, 'gapMidpoint');
  const m = across.length > 0 ? centres.length / across.length : 0;
  if (!Number.isInteger(m) || m < 1 || gapMidpoint.length !== across.length) {
    throw new Error(`wannier-flow result: ${centres.length} centres and ${gapMidpoint.length} gap midpoints for ${across.length} momenta`);
  }
  return {
    x: Array.from(across, (k) => k / (2 * Math.PI)),
    m,
    centres,
    gapMidpoint,
    winding: integerOrValue(optionalNumber(result, 'winding')),
    z2: optionalNumber(result, 'z2'),
  };
}

/** A periodic line on [0, 1): break it (null) where it wraps, so no vertical stroke crosses the plot. */
export function wrapBreaks(x: number[], y: ArrayLike<number>): { x: (number | null)[]; y: (number | null)[] } {
  const outX: (number | null)[] = [];
  const outY: (number | null)[] = [];
  for (let i = 0; i < x.length; i++) {
    if (i > 0 && Math.abs(y[i] - y[i - 1]) > 0.5) {
      outX.push(null);
      outY.push(null);
    }
    outX.push(x[i]);
    outY.push(y[i]);
  }
  return { x: outX, y: outY };
}

export function flowFigure(result: ViewResult, ctx: FigureContext): Figure {
  const { x, m, centres, gapMidpoint, winding, z2 } = read(result);
  const px: number[] = [];
  const py: number[] = [];
  for (let i = 0; i < x.length; i++) {
    for (let j = 0; j < m; j++) {
      px.push(x[i]);
      py.push(centres[i * m + j]);
    }
  }
  const mid = wrapBreaks(x, gapMidpoint);
  const data: Data[] = [
    {
      type: 'scatter',
      mode: 'markers',
      x: px,
      y: py,
      marker: { size: CENTRE_SIZE, color: CENTRE_COLOUR },
      name: 'Wannier centres',
      hovertemplate: 'k₁ = %{x:.3f} b₁<br>x̄₂ = %{y:.4f} a₂<extra></extra>',
    },
    {
      type: 'scatter',
      mode: 'lines',
      x: mid.x,
      y: mid.y,
      line: { color: GAP_COLOUR, width: 2, dash: 'dash' },
      name: 'largest gap',
      connectgaps: false,
      hovertemplate: 'largest-gap midpoint<br>k₁ = %{x:.3f}, x̄₂ = %{y:.4f}<extra></extra>',
    },
  ];
  const gapless = result.checks.gapless === true;
  const unit = energyUnit(ctx.spec);
  let invariant: number | null = null;
  let head: string;
  if (z2 !== null && !gapless) {
    invariant = z2;
    head = `Z₂ = ${fmt(z2)}`;
  } else if (winding !== null && !gapless) {
    invariant = winding;
    head = `winding ${fmt(winding)}`;
  } else {
    head = z2 !== null || 'z2' in result ? 'Z₂ withheld' : 'winding withheld';
  }
  const summary = `${head} · ${gapText(result, unit)}`;
  return {
    data,
    layout: {
      ...BASE_LAYOUT,
      title: titled(`Wannier-centre flow — ${summary}`),
      xaxis: { title: { text: 'k₁ [b₁]' }, range: [-0.5, 0.5], zeroline: false },
      yaxis: { title: { text: 'Wannier centre x̄₂ [a₂]' }, range: [0, 1], zeroline: false },
      legend: { orientation: 'h', x: 0, y: -0.18 },
    },
    summary,
    invariant,
    gapless,
    sketch: {
      dots: [{ x: px, y: py, colour: CENTRE_COLOUR, size: CENTRE_SIZE }],
      lines: [{ x: mid.x, y: mid.y, colour: GAP_COLOUR, width: 2, dashed: true }],
    },
    frameKey: JSON.stringify([x.length, m, z2 !== null || 'z2' in result]),
  };
}

export function flowTable(result: ViewResult): Table {
  const { x, m, centres, gapMidpoint } = read(result);
  const columns = ['k1 [b1]', ...Array.from({ length: m }, (_, j) => `centre ${j} [a2]`), 'largest-gap midpoint [a2]'];
  const rows = x.map((k, i) => [k, ...Array.from({ length: m }, (_, j) => centres[i * m + j]), gapMidpoint[i]]);
  return { columns, rows };
}
