/**
 * Band structure along a k-path: labelled high-symmetry ticks, the chosen bands highlighted and
 * the gap above them shaded and annotated.
 */
import type { Data, Layout } from './plotly-json.js';
import type { ViewResult } from '../contract/protocol.js';
import { BASE_LAYOUT, energyUnit, fmt, numberArray, titled, unitText, withUnit, type Figure, type FigureContext, type Table } from './common.js';

interface PathInfo {
  count: number;
  distance: ArrayLike<number>;
  labels: { label: string; index: number; distance: number }[];
  breaks: number[];
}

interface BandsData {
  path: PathInfo;
  bandCount: number;
  energies: ArrayLike<number>;
  group: { lo: number; hi: number } | null;
}

function read(result: ViewResult): BandsData {
  const path = result.path as PathInfo | undefined;
  const energies = numberArray(result, 'energies');
  const bandCount = result.bandCount;
  if (!path || typeof bandCount !== 'number' || energies.length !== path.count * bandCount) {
    throw new Error(`bands result: ${energies.length} energies for ${path?.count} k-points and ${String(bandCount)} bands`);
  }
  const group = (result.group as { lo: number; hi: number } | null | undefined) ?? null;
  return { path, bandCount, energies, group };
}

/** Bands to draw strongly: the `highlight` option if given, else the request's band group. */
function highlighted(ctx: FigureContext, group: BandsData['group'], bandCount: number): Set<number> {
  const option = ctx.options.highlight;
  if (Array.isArray(option)) return new Set(option.filter((b): b is number => Number.isInteger(b) && b >= 0 && b < bandCount));
  if (typeof option === 'number' && Number.isInteger(option)) return new Set([option]);
  if (group) return new Set(Array.from({ length: group.hi - group.lo + 1 }, (_, i) => group.lo + i));
  return new Set();
}

/** The gap above band `hi`: [top of band hi, bottom of band hi + 1] over the path, or null. */
export function gapAbove(energies: ArrayLike<number>, count: number, bandCount: number, hi: number): [number, number] | null {
  if (hi < 0 || hi + 1 >= bandCount) return null;
  let top = -Infinity;
  let bottom = Infinity;
  for (let p = 0; p < count; p++) {
    top = Math.max(top, energies[p * bandCount + hi]);
    bottom = Math.min(bottom, energies[p * bandCount + hi + 1]);
  }
  return [top, bottom];
}

export function bandsFigure(result: ViewResult, ctx: FigureContext): Figure {
  const { path, bandCount, energies, group } = read(result);
  const strong = highlighted(ctx, group, bandCount);
  const unit = energyUnit(ctx.spec);
  const breaks = new Set(path.breaks);
  const data: Data[] = [];
  for (let n = 0; n < bandCount; n++) {
    const x: (number | null)[] = [];
    const y: (number | null)[] = [];
    for (let p = 0; p < path.count; p++) {
      if (breaks.has(p) && p > 0) {
        x.push(null);
        y.push(null);
      }
      x.push(path.distance[p]);
      y.push(energies[p * bandCount + n]);
    }
    const isStrong = strong.has(n);
    data.push({
      type: 'scatter',
      mode: 'lines',
      x,
      y,
      name: `band ${n}`,
      showlegend: false,
      line: { color: isStrong ? '#c0392b' : '#5a6b85', width: isStrong ? 2.6 : 1.4 },
      hovertemplate: `band ${n}<br>E = %{y:.4f}${unitText(unit)}<extra></extra>`,
    });
  }

  const shapes: NonNullable<Layout['shapes']> = path.labels.map((l) => ({
    type: 'line' as const,
    xref: 'x' as const,
    yref: 'paper' as const,
    x0: l.distance,
    x1: l.distance,
    y0: 0,
    y1: 1,
    line: { color: '#bbb', width: 1 },
  }));
  const annotations: NonNullable<Layout['annotations']> = [];
  const top = group ? group.hi : strong.size ? Math.max(...strong) : -1;
  const gap = gapAbove(energies, path.count, bandCount, top);
  let summary = `${bandCount} bands`;
  const gapless = result.checks.gapless === true;
  if (gap) {
    const [lo, hi] = gap;
    const direct = result.checks.minGap;
    if (hi > lo) {
      shapes.push({ type: 'rect', xref: 'paper', yref: 'y', x0: 0, x1: 1, y0: lo, y1: hi, fillcolor: 'rgba(192,57,43,0.08)', line: { width: 0 } });
      annotations.push({ xref: 'paper', yref: 'y', x: 0.99, y: (lo + hi) / 2, xanchor: 'right', showarrow: false, text: `gap ${fmt(hi - lo)}${unitText(unit)}` });
    }
    summary = hi > lo ? `gap above band ${top}: ${fmt(hi - lo)}${unitText(unit)}` : `bands ${top} and ${top + 1} overlap in energy`;
    if (typeof direct === 'number') summary += ` · min direct gap ${fmt(direct)}`;
  }
  if (gapless) summary += ' · gapless';
  const last = path.count > 0 ? path.distance[path.count - 1] : 1;
  return {
    data,
    layout: {
      ...BASE_LAYOUT,
      title: titled(`Bands — ${summary}`),
      xaxis: {
        title: { text: `k along ${path.labels.map((l) => l.label).join('–') || 'the path'} (Cartesian |Δk|)` },
        tickmode: 'array',
        tickvals: path.labels.map((l) => l.distance),
        ticktext: path.labels.map((l) => l.label),
        range: [0, last],
        zeroline: false,
      },
      yaxis: { title: { text: withUnit('E', unit) }, zeroline: false },
      shapes,
      annotations,
    },
    summary,
    invariant: null,
    gapless,
  };
}

export function bandsTable(result: ViewResult): Table {
  const { path, bandCount, energies } = read(result);
  const columns = ['distance', ...Array.from({ length: bandCount }, (_, n) => `E${n}`)];
  const rows = Array.from({ length: path.count }, (_, p) => [path.distance[p], ...Array.from({ length: bandCount }, (__, n) => energies[p * bandCount + n])]);
  return { columns, rows };
}
