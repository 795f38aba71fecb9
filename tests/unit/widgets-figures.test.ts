// Result -> plotly figure, for each widget kind, on real engine results (small grids).
// Physics references as in tests/browser: Haldane, PRL 61, 2015 (1988); Qi, Wu, Zhang, PRB 74,
// 085308 (2006); Kane & Mele, PRL 95, 226801 (2005).
import { describe, expect, it } from 'vitest';
import { runFigure as run } from './figure-runs.js';
import { haldane, kaneMele, qwz } from '../../src/index.js';
import { gapAbove } from '../../figures/bands.js';
import { integerOrValue } from '../../figures/curvature.js';
import { wrapBreaks } from '../../figures/flow.js';
import { figureFor, tableFor, toCsv } from '../../figures/index.js';
import { phaseColours } from '../../figures/phase-map.js';
import type { ViewResult } from '../../contract/protocol.js';

describe('curvature figure', () => {
  it('QWZ (square lattice): a picture of the reduced zone relative to max|Ω|, an invisible heatmap for hover, a colour bar centred on zero', () => {
    const { figure, traces, result } = run(qwz(), 'curvature', { grid: 16, bands: 1 }, { u: -1 });
    expect(traces.map((t) => t.name)).toEqual(['Berry curvature', 'colour scale']);
    const hover = traces[0] as { x: number[]; y: number[]; z: ArrayLike<number>[]; opacity: number };
    expect(hover.opacity).toBe(0);
    expect(hover.x).toHaveLength(16);
    expect(hover.z).toHaveLength(16);
    // Row b, column a is values[b * n1 + a] (engine layout, src/topology/curvature.ts).
    const values = result.values as Float64Array;
    expect(hover.z[3][5]).toBe(values[3 * 16 + 5]);
    expect(Math.min(...hover.x)).toBeGreaterThanOrEqual(-0.5);
    expect(Math.max(...hover.x)).toBeLessThan(0.5);
    const scale = traces[1] as { zmin: number; zmax: number; colorscale: [number, string][] };
    expect([scale.zmin, scale.zmax]).toEqual([-1, 1]);
    // The picture: top row first (largest k2), each brick omega / max|omega|.
    const raster = figure.raster!;
    expect([raster.width, raster.height]).toEqual([16, 16]);
    const peak = Math.max(...Array.from(values, Math.abs));
    expect(raster.values[0 * 16 + 5]).toBeCloseTo(values[15 * 16 + 5] / peak, 6);
    expect(Math.max(...Array.from(raster.values, Math.abs))).toBeCloseTo(1, 6);
    expect(raster.x[0]).toBeCloseTo(-0.5, 12);
    expect(raster.x[1]).toBeCloseTo(0.5, 12);
    expect(raster.range).toEqual([-1, 1]);
    expect(raster.colorscale).toBe(scale.colorscale);
    // QWZ, -2 < u < 0: C(lower) = +1.
    expect(figure.invariant).toBe(1);
    expect(figure.summary).toMatch(/^C = 1 · min gap .* · max\|Ω\| /);
  });

  it('a drag step keeps the frame: same grid and zone give the same frame key; a gap closing changes it', () => {
    const a = run(haldane(), 'curvature', { grid: 12, bands: 1 }, { M: 0.1 }).figure;
    const b = run(haldane(), 'curvature', { grid: 12, bands: 1 }, { M: 0.2 }).figure;
    const closed = run(haldane(), 'curvature', { grid: 12, bands: 1 }, { M: 3 * Math.sqrt(3) * 0.1 }).figure;
    expect(a.frameKey).toBe(b.frameKey);
    expect(closed.frameKey).not.toBe(a.frameKey);
  });

  it('Haldane (hexagonal lattice): the zone boundary is drawn and the map covers it', () => {
    const { figure, traces } = run(haldane(), 'curvature', { grid: 12, bands: 1 });
    const zone = traces.find((t) => t.name === 'Brillouin zone') as { x: number[]; y: number[] };
    expect(zone.x).toHaveLength(7); // six corners, closed
    const heat = traces[0] as { x: number[]; y: number[] };
    expect(Math.min(...heat.x)).toBeLessThan(Math.min(...zone.x));
    expect(Math.max(...heat.x)).toBeGreaterThan(Math.max(...zone.x));
    const raster = figure.raster!;
    expect(raster.x[0]).toBeLessThan(Math.min(...zone.x));
    expect(raster.y[1]).toBeGreaterThan(Math.max(...zone.y));
    expect(figure.invariant).toBe(-1); // M = 0.2 < 3 sqrt3 t2: C = -sign(sin phi)
  });

  it('gapless: invariant withheld, summary says so, the closing point is marked', () => {
    const M = 3 * Math.sqrt(3) * 0.1;
    const { figure, traces } = run(haldane(), 'curvature', { grid: 12, bands: 1 }, { M });
    expect(figure.gapless).toBe(true);
    expect(figure.invariant).toBeNull();
    expect(figure.summary).toMatch(/^C withheld · gapless at k = /);
    expect(traces.map((t) => t.name)).toContain('gap closes');
  });

  it('CSV table: one row per sample with k in units of b_i', () => {
    const { result, ctx } = run(qwz(), 'curvature', { grid: 8, bands: 1 });
    const csv = toCsv(tableFor(result, ctx)).trim().split('\n');
    expect(csv[0]).toBe('"k1 [b1]","k2 [b2]","curvature [rad^-2]"');
    expect(csv).toHaveLength(65);
  });

  it('integerOrValue rounds only what is an integer up to rounding', () => {
    expect(integerOrValue(0.9999999999)).toBe(1);
    expect(integerOrValue(0.5)).toBe(0.5);
    expect(integerOrValue(null)).toBeNull();
  });
});

describe('Wannier-flow figure', () => {
  it('QWZ: centres and the largest-gap line, winding shown (= C = +1 at u = -1)', () => {
    const { figure, traces } = run(qwz(), 'wannier-flow', { grid: [24, 16], bands: 1 });
    expect(traces.map((t) => t.name)).toEqual(['Wannier centres', 'largest gap']);
    const centres = traces[0] as { y: number[] };
    expect(centres.y.every((c) => c >= 0 && c < 1)).toBe(true);
    expect(figure.invariant).toBe(1);
  });

  it('Kane–Mele with invariant z2: Z2 = 1 below |lambda_v| = 3 sqrt3 lambda_SO, 0 above', () => {
    const below = run(kaneMele(), 'wannier-flow', { grid: [32, 16], bands: 2, invariant: 'z2' }, { lambda_R: 0, lambda_v: 0.1 });
    const above = run(kaneMele(), 'wannier-flow', { grid: [32, 16], bands: 2, invariant: 'z2' }, { lambda_R: 0, lambda_v: 0.5 });
    expect(below.figure.summary).toMatch(/^Z₂ = 1/);
    expect(below.figure.invariant).toBe(1);
    expect(above.figure.invariant).toBe(0);
  });

  it('by default a time-reversal-symmetric group shows Z2 (Kane–Mele, Z2 = 1 with Rashba), a group that is not shows its winding (QWZ)', () => {
    // Kane & Mele, PRL 95, 226801 (2005): Z2 = 1 at lambda_v = 0.1 < 3√3 lambda_SO (defaults, lambda_R = 0.05).
    const qsh = run(kaneMele(), 'wannier-flow', { grid: [32, 16], bands: 2 });
    expect(qsh.result.z2).toBe(1);
    expect(qsh.figure.summary).toMatch(/^Z₂ = 1/);
    expect(qsh.figure.invariant).toBe(1);
    // Qi, Wu, Zhang, PRB 74, 085308 (2006): one band, no Kramers partner; C = +1 at u = -1.
    const chern = run(qwz(), 'wannier-flow', { grid: [24, 16], bands: 1 });
    expect('z2' in chern.result).toBe(false);
    expect(chern.figure.summary).toMatch(/^winding 1/);
    const winding = run(kaneMele(), 'wannier-flow', { grid: [32, 16], bands: 2, invariant: 'winding' });
    expect('z2' in winding.result).toBe(false);
    expect(winding.figure.summary).toMatch(/^winding 0/);
  });

  it('wrapBreaks breaks a periodic line where it wraps', () => {
    expect(wrapBreaks([0, 1, 2, 3], [0.8, 0.95, 0.05, 0.2])).toEqual({ x: [0, 1, null, 2, 3], y: [0.8, 0.95, null, 0.05, 0.2] });
  });
});

describe('bands, ribbon and phase-map figures', () => {
  it('bands: a line per band, the chosen group highlighted, the gap above it shaded', () => {
    const { figure, traces, result } = run(haldane(), 'bands', { bands: 1, pointsPerSegment: 10 });
    expect(traces).toHaveLength(2);
    const widths = traces.map((t) => (t.line as { width: number }).width);
    expect(widths[0]).toBeGreaterThan(widths[1]);
    const gap = gapAbove(result.energies as Float64Array, (result.path as { count: number }).count, 2, 0)!;
    expect(gap[1]).toBeGreaterThan(gap[0]);
    expect(figure.summary).toContain('gap above band 0');
  });

  it('ribbon: one marker per state, coloured by first minus last edge weight', () => {
    const { traces, result } = run(qwz(), 'ribbon', { direction: 1, width: 8, nk: 11 });
    const marker = traces[0].marker as { color: number[] };
    const edges = result.edges as { first: Float64Array; last: Float64Array };
    expect(marker.color).toHaveLength(edges.first.length);
    expect(marker.color[5]).toBeCloseTo(edges.first[5] - edges.last[5], 15);
  });

  it('phase map: discrete colours with legend entries, gap contours, the current point, the phase there', () => {
    const { figure, traces } = run(haldane(), 'phase-map', {
      axes: [{ param: 'phi', from: -3, to: 3, count: 7 }, { param: 'M', from: -1, to: 1, count: 5 }],
      quantity: 'chern',
      grid: 12,
      bands: 1,
    }, { phi: Math.PI / 2, M: 0 });
    const names = traces.map((t) => t.name);
    expect(names).toEqual(expect.arrayContaining(['C = -1', 'C = 0', 'C = 1', 'gap']));
    expect((figure.layout.shapes ?? []).map((s) => (s as { name?: string }).name)).toContain('current-point');
    expect(figure.invariant).toBe(-1);
  });

  it('phaseColours keeps the trivial phase light and the others distinct', () => {
    const colours = phaseColours([-1, 0, 1, 2]);
    expect(new Set(colours.values()).size).toBe(4);
    expect(colours.get(0)).toBe('#e9e6df');
  });

  it('names the missing field of a malformed result', () => {
    const broken = { kind: 'curvature', grid: [2, 2], k1: new Float64Array(2), k2: new Float64Array(2), checks: { minGap: 1, warnings: [] } } as ViewResult;
    const ctx = { spec: qwz(), values: {}, options: {} };
    expect(() => figureFor(broken, ctx)).toThrow('curvature result: field "values" missing or malformed. Value: undefined');
    expect(() => figureFor({ kind: 'nonsense', checks: { minGap: 1, warnings: [] } }, ctx)).toThrow('no figure for result kind "nonsense"');
  });
});
