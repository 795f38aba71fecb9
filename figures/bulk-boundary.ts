/**
 * The bulk–boundary check at a glance: the modes counted at the energy on each edge of the ribbon,
 * at the momentum where they cross it, pointing the way they move (right or left along +A_1), the
 * invariant they are checked against and the verdict in the title (the engine's own words). A
 * chain's two ends and a slab's two surfaces are drawn as their counts beside what the invariant
 * requires.
 */
import type { ViewResult } from '../contract/protocol.js';
import type { Data } from './plotly-json.js';
import { BASE_LAYOUT, fmt, ResultShapeError, titled, type Figure, type FigureContext, type Table } from './common.js';
import { cutText, warningText } from './spectral.js';

interface ModeShape {
  k: number;
  velocity: number;
  weight: number;
}

interface EdgeShape {
  modes: ModeShape[];
  net: number;
  pairs: number | null;
  expected: number | null;
  agrees: boolean | null;
}

interface CheckData {
  energy: number;
  verdict: string;
  summary: string;
  invariant: { kind: string; value: number | null; certified: boolean };
  edges: { first: EdgeShape; last: EdgeShape };
}

const EDGES = [
  { field: 'first', name: 'first edge (layer 0)', y: 1, colour: '#b3261e' },
  { field: 'last', name: 'last edge', y: 0, colour: '#1f4e9c' },
] as const;

function isEdge(e: unknown): e is EdgeShape {
  const edge = e as Partial<EdgeShape> | null;
  return edge !== null && typeof edge === 'object' && Array.isArray(edge.modes) && typeof edge.net === 'number' &&
    edge.modes.every((m) => typeof m?.k === 'number' && typeof m.velocity === 'number' && typeof m.weight === 'number');
}

function read(result: ViewResult): CheckData {
  const { energy, verdict, summary, invariant, edges } = result as Record<string, unknown>;
  if (typeof energy !== 'number') throw new ResultShapeError(result.kind, 'energy', energy);
  if (typeof verdict !== 'string') throw new ResultShapeError(result.kind, 'verdict', verdict);
  if (typeof summary !== 'string') throw new ResultShapeError(result.kind, 'summary', summary);
  const inv = invariant as CheckData['invariant'] | undefined;
  if (!inv || typeof inv.kind !== 'string') throw new ResultShapeError(result.kind, 'invariant', invariant);
  const e = edges as Partial<CheckData['edges']> | undefined;
  if (!e || !isEdge(e.first) || !isEdge(e.last)) throw new ResultShapeError(result.kind, 'edges', edges);
  return { energy, verdict, summary, invariant: inv, edges: e as CheckData['edges'] };
}

/** The verdict's colour in the title: agreement green, extra trivial modes amber, the rest red. */
const VERDICT_COLOUR: Record<string, string> = { agree: '#1b7a3a', 'extra-modes': '#a86400', disagree: '#b3261e', undetermined: '#555555' };

/** The two ends of a chain or the two surfaces of a slab: what was counted on each, and what the invariant requires. */
interface CountShape {
  net?: number;
  count?: number;
  expected: number | null;
  agrees: boolean | null;
}

function countsOf(result: ViewResult): [string, CountShape][] | null {
  const sides = (result.ends ?? result.surfaces) as Record<string, CountShape> | undefined;
  if (sides === undefined || sides === null || typeof sides !== 'object') return null;
  const named = Object.entries(sides).filter(([, c]) => c !== null && typeof c === 'object' && (typeof c.net === 'number' || typeof c.count === 'number'));
  return named.length === 2 ? named : null;
}

function countsFigure(result: ViewResult, sides: [string, CountShape][]): Figure {
  const verdict = String(result.verdict);
  const counted = sides.map(([, c]) => (typeof c.net === 'number' ? c.net : (c.count as number)));
  const what = result.ends !== undefined ? 'end' : 'surface';
  const data: Data[] = [
    // Scatter only: the still pictures (snapshot/) and the lean plotly build draw no other trace type for this.
    { type: 'scatter', mode: 'markers', x: sides.map(([name]) => name), y: counted, name: 'counted', marker: { size: 18, color: '#3b6ea8' }, hovertemplate: `%{x} ${what}: %{y} counted<extra></extra>` },
    { type: 'scatter', mode: 'markers', x: sides.map(([name]) => name), y: sides.map(([, c]) => c.expected), name: 'the invariant requires', marker: { symbol: 'circle-open', size: 26, color: '#222', line: { width: 2 } } },
  ];
  return {
    data,
    layout: {
      ...BASE_LAYOUT,
      title: titled(`Bulk–boundary check — <span style="color:${VERDICT_COLOUR[verdict] ?? '#222'}">${verdict}</span>`),
      xaxis: { title: { text: what } },
      yaxis: { title: { text: result.ends !== undefined ? 'end modes (net)' : 'surface states counted' }, zeroline: true },
      height: 300,
    },
    summary: `${verdict} · ${String(result.summary)}${warningText(result)}`,
    invariant: (result.invariant as { value?: number | null } | undefined)?.value ?? null,
    gapless: result.checks?.gapless === true,
  };
}

export function bulkBoundaryFigure(result: ViewResult, _ctx: FigureContext): Figure {
  const sides = result.edges === undefined ? countsOf(result) : null;
  if (sides !== null) return countsFigure(result, sides);
  const r = read(result);
  const data: Data[] = [];
  for (const edge of EDGES) {
    const modes = r.edges[edge.field].modes;
    for (const [direction, symbol, sign] of [['right mover', 'triangle-right', 1], ['left mover', 'triangle-left', -1]] as const) {
      const own = modes.filter((m) => Math.sign(m.velocity) === sign);
      if (own.length === 0) continue;
      data.push({
        type: 'scatter',
        mode: 'markers',
        x: own.map((m) => m.k),
        y: own.map(() => edge.y),
        customdata: own.map((m) => [m.velocity, m.weight]),
        marker: { symbol, size: 16, color: edge.colour },
        cliponaxis: false,
        name: `${edge.name}: ${direction}s`,
        showlegend: false,
        hovertemplate: `${edge.name}, ${direction}<br>k = %{x:.3f} b<br>dE/dk = %{customdata[0]:.3g}<br>edge weight %{customdata[1]:.2f}<extra></extra>`,
      });
    }
  }
  // The direction in words too: a still picture draws every marker as a dot.
  const count = (e: EdgeShape) => {
    const right = e.modes.filter((m) => m.velocity > 0).length;
    return `${right} right, ${e.modes.length - right} left${r.invariant.kind === 'z2' ? `, ${e.pairs ?? 0} Kramers pair(s)` : ''}`;
  };
  const notes = EDGES.map((edge) => ({
    x: -0.53, y: edge.y + 0.3, xref: 'x' as const, yref: 'y' as const, xanchor: 'left' as const, showarrow: false as const,
    text: `${edge.name}: ${count(r.edges[edge.field])}`,
  }));
  const summary = `${r.verdict} · ${r.summary} · ${cutText(result)} · E = ${fmt(r.energy)}${warningText(result)}`;
  const value = r.invariant.value;
  return {
    data,
    layout: {
      ...BASE_LAYOUT,
      title: titled(`Bulk–boundary check — <span style="color:${VERDICT_COLOUR[r.verdict] ?? '#222'}">${r.verdict}</span>`),
      xaxis: { title: { text: 'k where the mode crosses E [b]' }, range: [-0.55, 0.55], zeroline: true },
      yaxis: { title: { text: 'edge' }, range: [-0.6, 1.6], tickmode: 'array', tickvals: EDGES.map((e) => e.y), ticktext: EDGES.map((e) => e.field), zeroline: false, showgrid: false },
      annotations: notes,
      height: 300,
    },
    summary,
    invariant: value,
    gapless: result.checks?.gapless === true,
  };
}

export function bulkBoundaryTable(result: ViewResult): Table {
  const sides = result.edges === undefined ? countsOf(result) : null;
  if (sides !== null) {
    return { columns: ['boundary', 'counted', 'the invariant requires', 'agrees'], rows: sides.map(([name, c]) => [name, typeof c.net === 'number' ? c.net : (c.count as number), c.expected ?? '', c.agrees === null ? '' : String(c.agrees)]) };
  }
  const r = read(result);
  const rows: (number | string)[][] = [];
  for (const edge of EDGES) for (const m of r.edges[edge.field].modes) rows.push([edge.field, m.k, m.velocity, Math.sign(m.velocity), m.weight]);
  return { columns: ['edge', 'k [b]', 'velocity dE/dk', 'direction (+1 right, -1 left)', 'edge weight'], rows };
}
