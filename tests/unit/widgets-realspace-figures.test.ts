// Real-space maps (figures/realspace.ts) on real engine results: the figure's data are the result's,
// and the values agree with published ones.
// Sources: Qi, Wu, Zhang, PRB 74, 085308 (2006) (QWZ: C(lower) = +1 for -2 < u < 0, 0 for |u| > 2,
// sign in the convention of /work/shared/references.md); Bianco & Resta, PRB 84, 241106 (2011)
// (the marker sums to 0 over an open sample: the trace of a commutator); Haldane, PRL 61, 2015 (1988).
import { describe, expect, it } from 'vitest';
import { runFigure as run, type Trace } from './figure-runs.js';
import { haldane, qwz, ssh } from '../../src/index.js';
import { figureFor, figureTitle, tableFor, toCsv } from '../../figures/index.js';
import { SEQUENTIAL } from '../../figures/realspace.js';
import { drawFigure } from '../../figures/snapshot/figure.js';
import type { ViewResult } from '../../contract/protocol.js';

describe('local Chern marker figure', () => {
  const { result, figure, traces, ctx } = run(qwz(), 'local-marker', { sizes: [12, 12] }, { u: -1 });

  it('QWZ at u = -1 on an open 12 x 12 sample: the centre is close to the clean C = +1, the total is 0', () => {
    expect(figureTitle('local-marker')).toBe('Local Chern marker');
    // The view adds the clean crystal's Chern number (QWZ, PRB 74, 085308: +1 at u = -1).
    expect(result.cleanChern).toBe(1);
    const marker = result.marker as Float64Array;
    const sizes = result.sizes as number[];
    const cells = result.cells as Int32Array;
    const at = (i: number, j: number) => marker[Array.from({ length: marker.length }).findIndex((_, c) => cells[2 * c] === i && cells[2 * c + 1] === j)];
    // Bulk of a 12 x 12 sample: within a few per cent of C (the marker's bulk value, Bianco & Resta).
    expect(at(6, 6)).toBeGreaterThan(0.9);
    expect(at(6, 6)).toBeLessThan(1.1);
    expect(sizes).toEqual([12, 12]);
    const centre = /^centre (\S+) \((\d+) cells from the edge\)/.exec(figure.summary);
    expect(centre).not.toBeNull();
    expect(Number(centre![2])).toBe(5);
    expect(figure.summary).toContain('clean C = 1');
    // Bianco & Resta: the marker sums to zero over an open sample.
    expect(Math.abs(result.total as number)).toBeLessThan(1e-8);
    expect(figure.summary).toMatch(/Σ \S+ \(0 on an open sample\)/);
    expect(figure.summary).toContain('clean sample');
    expect(figure.invariant).toBeNull();
    expect(figure.gapless).toBe(false);
  });

  it('a square lattice gives a raster: one brick per cell at its Cartesian centre, top row first, diverging scale centred on 0', () => {
    const raster = figure.raster!;
    expect([raster.width, raster.height]).toEqual([12, 12]);
    const marker = result.marker as Float64Array;
    const cells = result.cells as Int32Array;
    for (let c = 0; c < marker.length; c++) {
      const i = cells[2 * c];
      const j = cells[2 * c + 1];
      expect(raster.values[(11 - j) * 12 + i]).toBeCloseTo(marker[c], 5);
    }
    // QWZ has one orbital position (0, 0) and unit vectors: bricks are [i - 1/2, i + 1/2].
    expect(raster.x).toEqual([-0.5, 11.5]);
    expect(raster.y).toEqual([-0.5, 11.5]);
    expect(raster.range[0]).toBe(-raster.range[1]);
    expect(raster.range[1]).toBeGreaterThanOrEqual(2);
    const hover = traces[0] as { z: ArrayLike<number>[]; opacity: number; x: number[]; y: number[] };
    expect(hover.opacity).toBe(0);
    expect(hover.z[3][7]).toBeCloseTo(marker[3 * 12 + 7], 12);
    const bar = traces.find((t) => t.name === 'colour scale') as { zmin: number; zmax: number };
    expect([bar.zmin, bar.zmax]).toEqual(raster.range);
    // CSV: one row per cell with its marker.
    const csv = toCsv(tableFor(result, ctx)).trim().split('\n');
    expect(csv[0]).toBe('"i1","i2","x","y","marker","cells from edge"');
    expect(csv).toHaveLength(145);
    const row = csv[1 + 3 * 12 + 7].split(',').map(Number);
    expect(row.slice(0, 2)).toEqual([7, 3]);
    expect(row[4]).toBe(marker[3 * 12 + 7]);
  });

  it('disorder strength and seed: the same seed gives the same map and frame, another seed another map', () => {
    const a = run(qwz(), 'local-marker', { sizes: [10, 10], onsiteDisorder: 2, seed: 4 }, { u: -1 });
    const b = run(qwz(), 'local-marker', { sizes: [10, 10], onsiteDisorder: 2, seed: 4 }, { u: -1 });
    const c = run(qwz(), 'local-marker', { sizes: [10, 10], onsiteDisorder: 2, seed: 5 }, { u: -1 });
    expect(Array.from(a.figure.raster!.values)).toEqual(Array.from(b.figure.raster!.values));
    expect(Array.from(a.figure.raster!.values)).not.toEqual(Array.from(c.figure.raster!.values));
    expect(a.figure.frameKey).toBe(c.figure.frameKey);
    expect(a.figure.summary).toContain('W = 2, seed 4');
  });

  it('the trivial phase (u = -3): clean C = 0 and the bulk marker near 0', () => {
    const { figure } = run(qwz(), 'local-marker', { sizes: [12, 12] }, { u: -3 });
    expect(figure.summary).toContain('clean C = 0');
    const centre = Number(/^centre (\S+)/.exec(figure.summary)![1]);
    expect(Math.abs(centre)).toBeLessThan(0.1);
  });

  it('a hexagonal lattice (Haldane) draws one coloured marker per cell at a1 i + a2 j + the mean orbital position', () => {
    const spec = haldane();
    const { result, figure, traces } = run(spec, 'local-marker', { sizes: [6, 6] }, { M: 0, phi: Math.PI / 2 });
    expect(figure.raster).toBeUndefined();
    const cells = traces.find((t) => t.name === 'Local Chern marker') as { x: number[]; y: number[]; customdata: number[] };
    expect(cells.x).toHaveLength(36);
    const idx = result.cells as Int32Array;
    const mean = [0, 1].map((j) => spec.orbitals.reduce((s, o) => s + o.position[j], 0) / spec.orbitals.length);
    const [a1, a2] = spec.vectors;
    const c = 14;
    const r = [idx[2 * c] + mean[0], idx[2 * c + 1] + mean[1]];
    expect(cells.x[c]).toBeCloseTo(r[0] * a1[0] + r[1] * a2[0], 12);
    expect(cells.y[c]).toBeCloseTo(r[0] * a1[1] + r[1] * a2[1], 12);
    expect(cells.customdata[c]).toBe((result.marker as Float64Array)[c]);
    // Haldane, PRL 61, 2015: C = -sign(sin phi) = -1 at phi = pi/2, M = 0 (references.md).
    expect(figure.summary).toContain('clean C = -1');
  });
});

describe('still pictures (figures/snapshot/, what an untrusted notebook shows)', () => {
  /** Pixels of the still whose colour is within `tolerance` of `rgb`. */
  const count = (figure: ReturnType<typeof figureFor>, rgb: number[], tolerance = 30) => {
    const { rgba } = drawFigure(figure);
    let n = 0;
    for (let i = 0; i < rgba.length; i += 4) if (Math.abs(rgba[i] - rgb[0]) + Math.abs(rgba[i + 1] - rgb[1]) + Math.abs(rgba[i + 2] - rgb[2]) < tolerance) n++;
    return n;
  };

  it('the QWZ marker (C = +1) paints its bulk with the scale at +1 of ±2, the Haldane one (C = -1) at -1, as markers', () => {
    // DIVERGING at 0.75 is #e08a6f, at 0.25 #6f9bd1 (figures/common.ts).
    const qwzMap = run(qwz(), 'local-marker', { sizes: [12, 12] }, { u: -1 }).figure;
    expect(count(qwzMap, [0xe0, 0x8a, 0x6f])).toBeGreaterThan(2000);
    const haldaneMap = run(haldane(), 'local-marker', { sizes: [8, 8] }, { M: 0, phi: Math.PI / 2 }).figure;
    expect(count(haldaneMap, [0x6f, 0x9b, 0xd1])).toBeGreaterThan(200);
    expect(count(haldaneMap, [0xe0, 0x8a, 0x6f])).toBeLessThan(count(haldaneMap, [0x6f, 0x9b, 0xd1]));
  });
});

describe('local density of states figure', () => {
  it('QWZ: a sequential raster relative to the largest density; its bricks and CSV are the result', () => {
    const { result, figure, ctx } = run(qwz(), 'local-density', { sizes: [10, 10], energy: 0, method: 'dense' }, { u: -1 });
    const density = result.density as Float64Array;
    const raster = figure.raster!;
    const peak = Math.max(...density);
    expect(raster.colorscale).toBe(SEQUENTIAL);
    expect(raster.range).toEqual([0, 1]);
    const cells = result.cells as Int32Array;
    for (let c = 0; c < density.length; c++) expect(raster.values[(9 - cells[2 * c + 1]) * 10 + cells[2 * c]]).toBeCloseTo(density[c] / peak, 5);
    expect(figure.summary).toMatch(/^E = 0 · centre \S+ \(4 cells from the edge\) · max \S+ · clean sample · exact/);
    const csv = toCsv(tableFor(result, ctx)).trim().split('\n');
    expect(csv[0]).toBe('"i1","i2","x","y","density [states per energy]","cells from edge"');
    expect(csv).toHaveLength(101);
  });

  it('the stochastic map carries its standard error into the summary and the table', () => {
    const { result, figure, ctx } = run(qwz(), 'local-density', { sizes: [8, 8], energy: 0, order: 64, probes: 8 }, { u: -1 });
    expect(result.standardError).not.toBeNull();
    expect(figure.summary).toMatch(/centre \S+ ± \S+/);
    expect(tableFor(result, ctx).columns).toContain('standard error');
  });

  it('a 1D chain (SSH) is a line over its cells', () => {
    const { result, figure } = run(ssh(), 'local-density', { sizes: [20], energy: 0.3, method: 'dense' });
    const line = figure.data[0] as { x: number[]; y: number[] };
    expect(line.x).toHaveLength(20);
    expect(line.y).toEqual(Array.from(result.density as Float64Array));
  });

  it('names the missing field of a malformed result', () => {
    const { result, ctx } = run(qwz(), 'local-density', { sizes: [4, 4], energy: 0, method: 'dense' }, { u: -1 });
    expect(() => figureFor({ ...result, density: 'x' } as ViewResult, ctx)).toThrow(/local-density result: field "density"/);
  });
});

describe('disorder ensemble figure', () => {
  it('the members by seed, the mean and its standard error as drawn are the result; CSV one row per member', () => {
    const { result, figure, ctx } = run(qwz(), 'ensemble', { of: 'local-marker', sizes: [8, 8], onsiteDisorder: 3, samples: 6, seed: 10 }, { u: -1 });
    const traces = figure.data as Trace[];
    const members = traces.find((t) => t.name === 'local-marker') as { x: number[]; y: number[] };
    expect(members.x).toEqual([10, 11, 12, 13, 14, 15]);
    expect(members.y).toEqual(Array.from(result.values as Float64Array));
    const band = traces.find((t) => t.name === 'mean ± standard error') as { y: number[] };
    const mean = result.mean as number;
    const se = result.standardError as number;
    expect(se).toBeGreaterThan(0);
    expect(band.y[0]).toBeCloseTo(mean - se, 12);
    expect(band.y[2]).toBeCloseTo(mean + se, 12);
    expect(figure.summary).toMatch(/^local-marker mean \S+ ± \S+ over 6 of 6 samples/);
    const csv = toCsv(tableFor(result, ctx)).trim().split('\n');
    expect(csv[0]).toBe('"member","seed","local-marker"');
    expect(csv[3].split(',').map(Number)).toEqual([2, 12, (result.values as Float64Array)[2]]);
  });

  it('weak disorder keeps the Bott index at the clean C = +1 (QWZ, u = -1) in every member', () => {
    const { figure } = run(qwz(), 'ensemble', { of: 'bott', sizes: [8, 8], onsiteDisorder: 1, samples: 4 }, { u: -1 });
    expect(figure.summary).toMatch(/^bott mean 1 ± 0 over 4 of 4 samples$/);
  });
});
