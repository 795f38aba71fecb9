/**
 * Ribbon spectrum: energies of the cut-open model against the momentum along the ribbon, each
 * state coloured by where it lives: red on the first edge, blue on the last, grey in the bulk.
 */
import type { Data } from './plotly-json.js';
import type { ViewResult } from '../contract/protocol.js';
import { BASE_LAYOUT, boundaryWeightedStates, energyUnit, fmt, numberArray, titled, unitText, withUnit, type Figure, type FigureContext, type Table } from './common.js';

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

function read(result: ViewResult): RibbonData {
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

export function ribbonFigure(result: ViewResult, ctx: FigureContext): Figure {
  const r = read(result);
  const unit = energyUnit(ctx.spec);
  const data: Data[] = [
    boundaryWeightedStates(r.x, r.bandCount, r.energies, [r.first, r.last], { title: 'edge weight<br>first − last', ends: ['first', 'last'] },
      `k = %{x:.3f}<br>E = %{y:.4f}${unitText(unit)}<br>first edge %{customdata[0]:.2f}, last edge %{customdata[1]:.2f}<extra></extra>`),
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

export function ribbonTable(result: ViewResult): Table {
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
