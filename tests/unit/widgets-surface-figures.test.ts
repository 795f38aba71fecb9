// Result -> figure for the edge and surface kinds, on real engine results (small grids).
// Sources beside each check:
//   Qi, Wu & Zhang, PRB 74, 085308 (2006): QWZ has one chiral mode per edge, opposite edges move
//     oppositely, the direction set by the sign of C; C(lower) = +1 at u = -1, -1 at u = +1
//     (shared/references.md, in our convention).
//   Wan, Turner, Vishwanath & Savrasov, PRB 83, 205101 (2011): a Fermi arc ends at the surface
//     projections of Weyl nodes of opposite chirality.
//   Fu, Kane & Mele, PRL 98, 106803 (2007): a strong 3D topological insulator has an odd number of
//     surface Dirac cones (cubicTI at M/B = 2: inverted at Γ only, one cone at Γ̄).
import { describe, expect, it } from 'vitest';
import { runFigure as run } from './figure-runs.js';
import { compute, cubicTI, qwz, ssh, twoBandWeyl } from '../../src/index.js';
import { displayOutputs } from '../../kernel/display/index.js';
import { PLOTLY_MIME, WIDGET_KINDS } from '../../contract/protocol.js';
import { checkWidgetOptions, widgetState } from '../../kernel/widget-state.js';
import { diagnosticStateProblem } from '../../contract/state-check.js';
import { putBuffers, removeBuffers, unpackArrays } from '../../contract/wire.js';
import { computeView } from '../../src/views.js';
import { figureFor, figureTitle, tableFor, toCsv } from '../../figures/index.js';
import { DECADES, PANELS } from '../../figures/spectral.js';
import type { ViewResult } from '../../contract/protocol.js';

/** Folds a difference of momenta (units of b) into [-1/2, 1/2). */
const wrap = (d: number) => d - Math.floor(d + 0.5);

/**
 * From a surface spectrum's CSV table: the momentum of the largest weight of one panel at each of
 * two energies (the lowest and the highest of the window), and the sign of dE/dk of the ridge.
 */
function ridgeDirection(rows: (number | string | null)[][], column: number): number {
  const energies = [...new Set(rows.map((r) => r[2] as number))].sort((a, b) => a - b);
  const peakAt = (e: number) => {
    let best = -Infinity;
    let k = NaN;
    for (const r of rows) if (r[2] === e && (r[column] as number) > best) [best, k] = [r[column] as number, r[1] as number];
    return k;
  };
  const lo = energies[0];
  const hi = energies[energies.length - 1];
  return Math.sign(wrap(peakAt(hi) - peakAt(lo)) / (hi - lo));
}

describe('surface-spectrum figure', () => {
  const options = { cut: 1, energyRange: [-0.3, 0.3], energyCount: 13, nk: 121, eta: 0.01 };

  it('QWZ: the three panels side by side in one picture on a log scale relative to the largest weight, named and ticked', () => {
    const { figure, traces, result } = run(qwz(), 'surface-spectrum', options, { u: -1 });
    expect(figureTitle('surface-spectrum')).toBe('Surface spectral function');
    expect(traces.map((t) => t.name)).toEqual(['spectral function', 'colour scale']);
    const raster = figure.raster!;
    expect(raster.height).toBe(13);
    // Three panels of 121 columns with gaps between them.
    expect(raster.width).toBeGreaterThan(3 * 121);
    expect(raster.range).toEqual([-DECADES, 0]);
    expect(Math.max(...Array.from(raster.values))).toBeCloseTo(0, 6);
    // Brick (top row = highest energy, column c of the bottom panel) is log10(A / max A).
    const bottom = result.bottom as Float64Array;
    const peak = Math.max(...(['bottom', 'top', 'bulk'] as const).flatMap((f) => Array.from(result[f] as Float64Array)));
    const c = 40;
    expect(raster.values[c]).toBeCloseTo(Math.max(-DECADES, Math.log10(bottom[c * 13 + 12] / peak)), 5);
    const notes = (figure.layout.annotations as { text: string }[]).map((a) => a.text);
    expect(notes).toEqual(PANELS.map((p) => p.name));
    const ticks = (figure.layout.xaxis as { ticktext: string[] }).ticktext;
    expect(ticks).toEqual(['X', 'Γ', 'X', 'X', 'Γ', 'X', 'X', 'Γ', 'X']);
    expect(figure.summary).toMatch(/^edge spectral function · max A .* · cut \(0 1\) · η = 0\.01 \(units of the hopping\)$/);
    expect(figure.invariant).toBeNull();
  });

  it('QWZ: the weight at E = 0 on the bottom and top terminations runs at opposite velocities, flipped with the sign of C (Qi, Wu & Zhang 2006)', () => {
    for (const [u, C] of [[-1, 1], [1, -1]] as const) {
      const { result, ctx } = run(qwz(), 'surface-spectrum', options, { u });
      const table = tableFor(result, ctx);
      expect(table.columns).toEqual(['path point', 'k1 [surface b1]', 'energy', 'A bottom termination', 'A top termination', 'A bulk projection']);
      const bottom = ridgeDirection(table.rows, 3);
      const top = ridgeDirection(table.rows, 4);
      expect(bottom).toBe(-top);
      // Our convention (DEVELOPERS.md, bulk–boundary check): the net chirality on the bottom (first)
      // edge is -o C, o = sign(A1 x A2) = +1 for this cut.
      expect(bottom).toBe(-C);
      // The same count by the ribbon's own eigenvalues: its first edge moves the same way.
      const check = computeView({ kind: 'bulk-boundary', model: qwz(), params: { u }, cut: 1, energy: 0, width: 24 }) as unknown as { edges: { first: { net: number } } };
      expect(Math.sign(check.edges.first.net)).toBe(bottom);
    }
  });

  it('a drag step keeps the frame; another energy window changes it; the CSV has a row per (k, E)', () => {
    const a = run(qwz(), 'surface-spectrum', options, { u: -1 });
    const b = run(qwz(), 'surface-spectrum', options, { u: -1.2 });
    const c = run(qwz(), 'surface-spectrum', { ...options, energyRange: [-0.5, 0.5] }, { u: -1 });
    expect(a.figure.frameKey).toBe(b.figure.frameKey);
    expect(c.figure.frameKey).not.toBe(a.figure.frameKey);
    const csv = toCsv(tableFor(a.result, a.ctx)).trim().split('\n');
    expect(csv).toHaveLength(1 + 121 * 13);
  });

  it('warnings are stated in the summary', () => {
    const { figure } = run(qwz(), 'surface-spectrum', { ...options, nk: 11, maxSteps: 1 }, { u: -1 });
    expect(figure.summary).toMatch(/ · \d+ warnings?: decimation did not converge/);
  });
});

describe('surface-map figure', () => {
  it('Weyl model: nodes marked by chirality in every panel, the arc on the bottom termination joins them (Wan et al. 2011)', () => {
    const k0 = Math.PI / 2;
    const { figure, traces, result } = run(twoBandWeyl(), 'surface-map', { cut: 0, grid: 32, energy: 0 }, { k0 });
    expect(figureTitle('surface-map')).toBe('Constant-energy surface map');
    // Nodes at (0, 0, ±k0) (catalogue, common practice): on the (1 0 0) surface at k̄ = (0, ±k0 / 2pi).
    const plus = traces.find((t) => t.name === 'Weyl node, chirality +1') as { x: number[]; y: number[] };
    const minus = traces.find((t) => t.name === 'Weyl node, chirality −1') as { x: number[]; y: number[] };
    expect(plus.x).toHaveLength(3);
    expect(minus.x).toHaveLength(3);
    expect(Math.abs(plus.y[0])).toBeCloseTo(k0 / (2 * Math.PI), 4);
    expect(minus.y[0]).toBeCloseTo(-plus.y[0], 4);
    expect(plus.x[0]).toBeCloseTo(0, 4);
    expect(figure.summary).toMatch(/^E = 0 .* · 2 Weyl nodes projected \([+−], [+−]\) · max A .* · cut \(1 0 0\) · η = /);

    // Along k̄1 = 0 of the bottom panel: weight on one of the two segments the nodes cut the line
    // into, and hardly any on the other.
    const raster = figure.raster!;
    const n = 32;
    const column = n / 2; // k̄1 = 0
    const onLine = (j2: number) => raster.values[(n - 1 - j2) * raster.width + column];
    const nodeK = Math.abs(plus.y[0]);
    const inside: number[] = [];
    const outside: number[] = [];
    for (let j2 = 0; j2 < n; j2++) {
      const k = -0.5 + j2 / n;
      if (Math.abs(Math.abs(k) - nodeK) < 0.07) continue;
      (Math.abs(k) < nodeK ? inside : outside).push(onLine(j2));
    }
    const mean = (xs: number[]) => xs.reduce((s, x) => s + x, 0) / xs.length;
    // Decades apart (the raster is log10 A / max A).
    expect(Math.abs(mean(inside) - mean(outside))).toBeGreaterThan(1);
    const bottom = result.bottom as Float64Array;
    expect(Math.max(...Array.from(bottom))).toBeGreaterThan(0);
  });

  it('a drag step keeps the frame while the nodes move, sketched as dots where plotly draws the markers; the CSV lists every point of the zone', () => {
    const a = run(twoBandWeyl(), 'surface-map', { cut: 0, grid: 16, energy: 0 }, { k0: 1.5 });
    const b = run(twoBandWeyl(), 'surface-map', { cut: 0, grid: 16, energy: 0 }, { k0: 1.2 });
    const c = run(twoBandWeyl(), 'surface-map', { cut: 0, grid: 16, energy: 0.2 }, { k0: 1.2 });
    expect(b.figure.frameKey).toBe(a.figure.frameKey);
    // A new grid is a new frame.
    expect(run(twoBandWeyl(), 'surface-map', { cut: 0, grid: 12, energy: 0 }, { k0: 1.5 }).figure.frameKey).not.toBe(a.figure.frameKey);
    expect(c.figure.frameKey).toBe(b.figure.frameKey);
    for (const { figure, traces } of [a, b]) {
      const markers = traces.filter((t) => t.name?.startsWith('Weyl node')) as { x: number[]; y: number[] }[];
      expect(figure.sketch!.dots.map((d) => [Array.from(d.x), Array.from(d.y)])).toEqual(markers.map((t) => [t.x, t.y]));
    }
    expect(b.figure.sketch!.dots[0].y[0]).not.toBeCloseTo(a.figure.sketch!.dots[0].y[0], 3);
    const table = tableFor(a.result, a.ctx);
    expect(table.rows).toHaveLength(256);
    expect(table.columns).toEqual(['k1 [surface b1]', 'k2 [surface b2]', 'A bottom termination', 'A top termination', 'A bulk projection']);
  });
});

describe('slab-spectrum and bulk-boundary figures', () => {
  it('slab of the strong TI: the in-gap states at Γ̄ live on the surfaces (Fu, Kane & Mele 2007)', () => {
    const { traces, figure } = run(cubicTI(), 'slab-spectrum', { cut: 2, width: 12, nk: 6 }, { M: 2, B: 1 });
    const states = traces[0] as { x: number[]; y: number[]; customdata: [number, number][] };
    const gammaX = (figure.layout.xaxis as { tickvals: number[]; ticktext: string[] }).tickvals[(figure.layout.xaxis as { ticktext: string[] }).ticktext.indexOf('Γ')];
    const inGap = states.y.map((e, i) => ({ e, i })).filter(({ e, i }) => Math.abs(e) < 0.3 && Math.abs(states.x[i] - gammaX) < 1e-9);
    expect(inGap.length).toBeGreaterThan(0);
    // Bottom plus top weight on the outer plane of each side.
    for (const { i } of inGap) expect(states.customdata[i][0] + states.customdata[i][1]).toBeGreaterThan(0.5);
    expect(figure.summary).toMatch(/ · cut \(0 0 1\) · 12 planes, 48 states per k · surfaces: outer 1 plane$/);
    expect(figureTitle('slab-spectrum')).toBe('Slab spectrum');
  });

  it('bulk–boundary: one right- or left-moving mode per edge of QWZ, opposite on the two edges, the verdict in the title', () => {
    const { traces, figure, result, ctx } = run(qwz(), 'bulk-boundary', { cut: 1, energy: 0, width: 24 }, { u: -1 });
    const names = traces.map((t) => t.name);
    // C = +1: the first edge carries -C (our convention, DEVELOPERS.md): a left mover; the last a right mover.
    expect(names).toEqual(['first edge (layer 0): left movers', 'last edge: right movers']);
    expect(figure.invariant).toBe(1);
    expect(String((figure.layout.title as { text: string }).text)).toContain('agree');
    expect(figure.summary).toMatch(/^agree · .* · cut \(0 1\) · E = 0$/);
    const table = tableFor(result, ctx);
    expect(table.rows.map((r) => [r[0], r[3]])).toEqual([['first', -1], ['last', 1]]);
  });

  it('bulk–boundary of a chain: the count at each end beside what the winding number requires (SSH, w > v: W = 1; Su, Schrieffer & Heeger 1979)', () => {
    const { traces, figure, result, ctx } = run(ssh(), 'bulk-boundary', { cut: 0 }, { v: 0.5, w: 1 });
    const [counted, required] = traces as unknown as { x: string[]; y: (number | null)[] }[];
    expect(counted.x).toEqual(['first', 'last']);
    // One end mode per end, opposite sublattice polarisation on the two ends (N_A - N_B = +-W).
    expect(counted.y.map((n) => Math.abs(n ?? NaN))).toEqual([1, 1]);
    expect(counted.y).toEqual(required.y);
    expect(String((figure.layout.title as { text: string }).text)).toContain('agree');
    expect(tableFor(result, ctx).rows.map((r) => r[3])).toEqual(['true', 'true']);
  });

  it('names the missing field of a malformed result', () => {
    const { result, ctx } = run(qwz(), 'surface-spectrum', { cut: 1, energyCount: 3, nk: 5 }, { u: -1 });
    expect(() => figureFor({ ...result, top: new Float64Array(2) }, ctx)).toThrow(/surface-spectrum result: field "top"/);
    expect(() => figureFor({ ...result, cut: undefined }, ctx)).toThrow(/field "cut"/);
  });
});

describe('what a cell shows', () => {
  it('each edge and surface result displays its summary, then its figure as plotly JSON, a PNG and a line of text', () => {
    const results = [
      compute({ kind: 'surface-spectrum', model: qwz(), params: { u: -1 }, cut: 1, energyCount: 41 }),
      compute({ kind: 'surface-map', model: twoBandWeyl(), cut: 0, grid: 24, energy: 0 }),
      compute({ kind: 'slab-spectrum', model: cubicTI(), cut: 2, width: 6, nk: 4 }),
      compute({ kind: 'bulk-boundary', model: qwz(), params: { u: -1 }, cut: 1 }),
    ];
    for (const result of results) {
      const outputs = displayOutputs(result);
      expect(outputs).toHaveLength(2);
      const figure = outputs[1].data;
      expect(String(figure['text/plain'])).toMatch(new RegExp(`^${result.kind} figure: .*cut \\(`));
      expect(String(figure['image/png']).length).toBeGreaterThan(1000);
      const plotly = figure[PLOTLY_MIME] as { data: unknown[]; layout: { images?: unknown[] } };
      expect(plotly.data.length).toBeGreaterThan(0);
      // The maps travel as a picture (a layout image), not as visible heatmaps.
      if (result.kind.startsWith('surface-')) expect(plotly.layout.images).toHaveLength(1);
      // A default-sized spectrum (201 k x 41 E x 3 panels) stays well under a few megabytes.
      expect(JSON.stringify(plotly).length).toBeLessThan(3e6);
    }
  });
});

describe('the surface widgets: options and state', () => {
  it('are widget kinds whose options are their requests\' fields; a misspelt one names the closest', () => {
    expect(WIDGET_KINDS).toEqual(expect.arrayContaining(['surface-spectrum', 'surface-map']));
    expect(() => checkWidgetOptions('surface-map', { cut: 0, grid: 32, energy: 0, eta: 0.05, nodes: true })).not.toThrow();
    expect(() => checkWidgetOptions('surface-spectrum', { cut: 1, energyRange: [-1, 1], energyCount: 40, nk: 60 })).not.toThrow();
    expect(() => checkWidgetOptions('surface-map', { cut: 0, energi: 0 })).toThrow(/^energi: unknown option for a "surface-map" widget; did you mean "energy"/);
  });

  it('the synced state travels with binary buffers and comes back drawing the same figure; its saved form passes the state check', () => {
    const spec = twoBandWeyl();
    const options = { cut: 0, grid: 16, energy: 0 };
    const { result, ctx, figure } = run(spec, 'surface-map', options, { k0: 1.2 });
    const state = widgetState({ kind: 'surface-map', spec, options, values: ctx.values, result: result as never, error: '', title: '' });
    expect(diagnosticStateProblem(state)).toBeNull();
    const split = removeBuffers(state);
    // Each weight map goes as its own buffer.
    expect(split.buffer_paths.map((p) => p.join('.'))).toEqual(expect.arrayContaining(['result.bottom.buffer', 'result.top.buffer', 'result.bulk.buffer']));
    const back = { ...split.state };
    putBuffers(back, split.buffer_paths, split.buffers);
    const again = figureFor(unpackArrays(back.result) as ViewResult, ctx);
    expect(again.summary).toBe(figure.summary);
    expect(Array.from(again.raster!.values)).toEqual(Array.from(figure.raster!.values));
  });
});
