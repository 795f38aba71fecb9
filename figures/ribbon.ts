/**
 * Ribbon spectrum: energies of the cut-open model against the momentum along the ribbon, each
 * state coloured by where it lives: red on the first edge, blue on the last, grey in the bulk.
 */
import type { Data } from './plotly-json.js';
import type { DiagnosticResult } from '../contract/protocol.js';
import { BASE_LAYOUT, energyUnit, fmt, numberArray, titled, unitText, withUnit, type Figure, type FigureContext, type Table } from './common.js';

interface RibbonData {
  x: number[];
  xTitle: string;
  tickvals?: number[];
  ticktext?: string[];
  count: number;
  bandCount: number;
  energies: ArrayLike<number>;
  first: ArrayLike<number>;
  last: ArrayLike<number>;
  definition: string;
  name: string;
}

interface PathInfo {
  dim: number;
  count: number;
  fractions: ArrayLike<number>;
  distance: ArrayLike<number>;
  labels: { label: string; distance: number }[];
}

function read(result: DiagnosticResult): RibbonData {
  const path = result.path as PathInfo | undefined;
  const bandCount = result.bandCount;
  const energies = numberArray(result, 'energies');
  const edges = result.edges as { first?: ArrayLike<number>; last?: ArrayLike<number>; definition?: string } | undefined;
  if (!path || typeof bandCount !== 'number' || !edges?.first || !edges.last || energies.length !== path.count * bandCount) {
    throw new Error(`ribbon result: ${energies.length} energies for ${path?.count} momenta and ${String(bandCount)} states, edges ${edges ? 'present' : 'missing'}`);
  }
  const alongRibbon = path.dim === 1;
  return {
    x: alongRibbon ? Array.from(path.fractions) : Array.from(path.distance),
    xTitle: alongRibbon ? 'k along the ribbon [b]' : 'k along the path',
    ...(alongRibbon ? {} : { tickvals: path.labels.map((l) => l.distance), ticktext: path.labels.map((l) => l.label) }),
    count: path.count,
    bandCount,
    energies,
    first: edges.first,
    last: edges.last,
    definition: edges.definition ?? '',
    name: typeof result.name === 'string' ? result.name : 'ribbon',
  };
}

/** Red (first edge) - grey (bulk) - blue (last edge), by the difference of the two edge weights. */
const EDGE_SCALE: [number, string][] = [
  [0, '#1f4e9c'],
  [0.5, '#b8b8b8'],
  [1, '#b3261e'],
];

export function ribbonFigure(result: DiagnosticResult, ctx: FigureContext): Figure {
  const r = read(result);
  const x: number[] = [];
  const y: number[] = [];
  const colour: number[] = [];
  const custom: [number, number][] = [];
  for (let p = 0; p < r.count; p++) {
    for (let n = 0; n < r.bandCount; n++) {
      const i = p * r.bandCount + n;
      x.push(r.x[p]);
      y.push(r.energies[i]);
      colour.push(r.first[i] - r.last[i]);
      // Hover shows two decimals; three keep a saved figure of tens of thousands of states small.
      custom.push([Math.round(r.first[i] * 1000) / 1000, Math.round(r.last[i] * 1000) / 1000]);
    }
  }
  const unit = energyUnit(ctx.spec);
  const data: Data[] = [
    {
      type: 'scatter',
      mode: 'markers',
      x,
      y,
      customdata: custom,
      marker: {
        size: 3.5,
        color: colour,
        colorscale: EDGE_SCALE,
        cmin: -1,
        cmax: 1,
        colorbar: { title: { text: 'edge weight<br>first − last' }, tickvals: [-1, 0, 1], ticktext: ['last', 'bulk', 'first'] },
      },
      name: 'states',
      hovertemplate: `k = %{x:.3f}<br>E = %{y:.4f}${unitText(unit)}<br>first edge %{customdata[0]:.2f}, last edge %{customdata[1]:.2f}<extra></extra>`,
    },
  ];
  const gap = result.checks.minGap;
  const summary = `${r.name} · ${r.bandCount} states${typeof gap === 'number' ? ` · smallest gap ${fmt(gap)}${unitText(unit)}` : ''}`;
  return {
    data,
    layout: {
      ...BASE_LAYOUT,
      title: titled(`Ribbon spectrum — ${r.name}`),
      xaxis: {
        title: { text: r.xTitle },
        zeroline: false,
        ...(r.tickvals ? { tickmode: 'array' as const, tickvals: r.tickvals, ticktext: r.ticktext } : {}),
      },
      yaxis: { title: { text: withUnit('E', unit) }, zeroline: false },
    },
    summary,
    invariant: null,
    gapless: result.checks.gapless === true,
  };
}

export function ribbonTable(result: DiagnosticResult): Table {
  const r = read(result);
  const rows: number[][] = [];
  for (let p = 0; p < r.count; p++) {
    for (let n = 0; n < r.bandCount; n++) {
      const i = p * r.bandCount + n;
      rows.push([r.x[p], n, r.energies[i], r.first[i], r.last[i]]);
    }
  }
  return { columns: [r.xTitle, 'state', 'energy', 'first-edge weight', 'last-edge weight'], rows };
}
