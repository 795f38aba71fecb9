// The phase map of a disorder average (figures/phase-map.ts) on real engine results: the band of a
// curve is mean ± 2 standard errors of each point, a 2D map hatches exactly the cells within 2
// standard errors of a half-integer, and the still picture draws both. A map saved before the errors
// were kept draws as it did. QWZ at u = -1: C = +1 (Qi, Wu & Zhang, PRB 74, 085308 (2006)), so the
// clean Bott index is 1; strong disorder takes the average to 0 (common practice).
import { describe, expect, it } from 'vitest';
import { runFigure, type Trace } from './figure-runs.js';
import { qwz } from '../../src/index.js';
import { figureFor, tableFor } from '../../figures/index.js';
import { ERROR_BAND } from '../../figures/phase-map.js';
import { drawFigure } from '../../figures/snapshot/figure.js';
import { parseColour, Pixels } from '../../figures/snapshot/pixels.js';
import type { ViewResult } from '../../contract/protocol.js';

const ensemble = { quantity: 'ensemble', of: 'bott', sizes: [6, 6], seed: 3 };

function count(px: Pixels, rgb: [number, number, number], tolerance = 6): number {
  let n = 0;
  for (let i = 0; i < px.width * px.height; i++) {
    if (Math.abs(px.rgba[4 * i] - rgb[0]) + Math.abs(px.rgba[4 * i + 1] - rgb[1]) + Math.abs(px.rgba[4 * i + 2] - rgb[2]) <= tolerance) n++;
  }
  return n;
}

/** The colour a translucent fill gives over white. */
function overWhite(colour: string): [number, number, number] {
  const p = parseColour(colour)!;
  return p.rgb.map((c) => Math.round(255 + (c - 255) * p.alpha)) as [number, number, number];
}

/** The result as saved before standard errors were kept. */
function withoutErrors(result: ViewResult): ViewResult {
  const { standardErrors: _e, crossings: _c, averaged: _a, ...old } = result;
  return old as ViewResult;
}

describe('a 1D map of a disorder average', () => {
  const { result, figure, traces, ctx } = run1d();
  function run1d() {
    return runFigure(qwz(), 'phase-map', { ...ensemble, samples: 6, axes: [{ param: 'onsiteDisorder', from: 0, to: 8, count: 9 }] }, { u: -1 });
  }
  const means = result.values as number[];
  const errors = result.standardErrors as number[];

  it(`draws the mean inside a band of ±${ERROR_BAND} standard errors, named so in the legend`, () => {
    expect(ERROR_BAND).toBe(2);
    const lower = traces.find((t) => t.name === 'mean − 2 SE')!;
    const upper = traces.find((t) => t.name === 'mean ± 2 SE')!;
    expect(traces.indexOf(upper)).toBe(traces.indexOf(lower) + 1);
    expect(upper).toMatchObject({ fill: 'tonexty', showlegend: true });
    means.forEach((m, i) => {
      expect((upper.y as number[])[i]).toBeCloseTo(m + 2 * errors[i], 14);
      expect((lower.y as number[])[i]).toBeCloseTo(m - 2 * errors[i], 14);
    });
    // The clean end has no spread; some disordered point has.
    expect(errors[0]).toBe(0);
    expect(Math.max(...errors)).toBeGreaterThan(0);
    // The curve and the title name what is averaged (the request's `of`).
    expect(result.averaged).toBe('bott');
    expect(JSON.stringify(figure.layout.title)).toContain('Map of mean bott');
    const mean = traces.find((t) => t.name === 'mean bott') as Trace & { text: string[]; hovertemplate: string };
    expect(mean.hovertemplate).toContain('%{text}');
    mean.text.forEach((text, i) => {
      const [m, e] = /^(\S+) ± (\S+) \(1 SE\)$/.exec(text)!.slice(1).map(Number);
      expect(m).toBeCloseTo(means[i], 2);
      expect(e).toBeCloseTo(errors[i], 2);
    });
  });

  it('marks each crossing of 1/2 as the engine judged it, and says so in the summary', () => {
    const crossings = result.crossings as { resolved: boolean; at: { onsiteDisorder: number } }[];
    expect(crossings.length).toBeGreaterThan(0);
    const resolved = traces.find((t) => t.name === 'crossing resolved') as { x: number[] } | undefined;
    const open = traces.find((t) => t.name === 'crossing within 2 SE') as { x: number[] } | undefined;
    expect(resolved?.x ?? []).toEqual(crossings.filter((c) => c.resolved).map((c) => c.at.onsiteDisorder));
    expect(open?.x ?? []).toEqual(crossings.filter((c) => !c.resolved).map((c) => c.at.onsiteDisorder));
    expect(figure.summary).toMatch(/crossings of a half-integer: \d+ resolved, \d+ within 2 SE/);
    expect(tableFor(result).columns).toEqual(['onsiteDisorder', 'ensemble', 'gap', 'standard error']);
  });

  it('the still picture fills the band; a map saved without errors draws no band and still opens', () => {
    const fill = overWhite(traces.find((t) => t.name === 'mean ± 2 SE')!.fillcolor as string);
    const old = figureFor(withoutErrors(result), ctx);
    expect(old.data.map((t) => t.name)).toEqual(['mean']);
    // Without the band only a few antialiased edge pixels of the curve come near its colour.
    const plain = count(drawFigure(old), fill);
    expect(count(drawFigure(figure), fill)).toBeGreaterThan(plain + 2000);
    // A damaged error list is refused by name, not drawn wrong.
    expect(() => figureFor({ ...result, standardErrors: errors.slice(1) }, ctx)).toThrow(/8 standard errors for 9 values/);
  });
});

describe('a 2D map of a disorder average', () => {
  const { result, figure, traces, ctx } = runFigure(qwz(), 'phase-map', {
    ...ensemble, samples: 4, axes: [{ param: 'onsiteDisorder', from: 0, to: 8, count: 5 }, { param: 'u', from: -3, to: 0, count: 4 }],
  }, { u: -1 });
  const means = result.values as number[];
  const errors = result.standardErrors as number[];

  it('hatches exactly the cells whose mean is within 2 standard errors of a half-integer; the hover reads mean ± SE', () => {
    const undecided = means.flatMap((m, n) => (Math.abs(m - (Math.round(m - 0.5) + 0.5)) <= 2 * errors[n] ? [n] : []));
    expect(undecided.length).toBeGreaterThan(0);
    expect(undecided.length).toBeLessThan(means.length);
    const hatch = traces.find((t) => t.name === 'within 2 SE of a half-integer') as { x: (number | null)[]; y: (number | null)[] };
    // Three strokes per cell; the first runs corner to corner, from (x - 1, u - 0.5) to (x + 1, u + 0.5).
    expect(hatch.x.length).toBe(9 * undecided.length);
    const xs = result.axes[0].values as number[];
    const us = result.axes[1].values as number[];
    undecided.forEach((n, k) => {
      expect([hatch.x[9 * k], hatch.y[9 * k]]).toEqual([xs[n % 5] - 1, us[Math.floor(n / 5)] - 0.5]);
      expect([hatch.x[9 * k + 1], hatch.y[9 * k + 1]]).toEqual([xs[n % 5] + 1, us[Math.floor(n / 5)] + 0.5]);
    });
    const map = traces.find((t) => t.type === 'heatmap') as { text: string[][]; hovertemplate: string };
    expect(map.hovertemplate).toContain('%{text}');
    const [m, e] = /^(\S+) ± (\S+) \(1 SE\)$/.exec(map.text[1][2])!.slice(1).map(Number);
    expect(m).toBeCloseTo(means[5 + 2], 2);
    expect(e).toBeCloseTo(errors[5 + 2], 2);
  });

  it('the still picture draws the hatching; a map saved without errors has none', () => {
    const hatch = parseColour('rgba(40, 40, 40, 0.6)')!;
    expect(traces.some((t) => (t.line as { color?: string } | undefined)?.color === 'rgba(40, 40, 40, 0.6)')).toBe(true);
    const old = figureFor(withoutErrors(result), ctx);
    expect(old.data.map((t) => t.type)).toEqual(['heatmap']);
    // Dark strokes over the light and mid cells: more dark-grey pixels with the hatching than without.
    const dark = (px: Pixels) => count(px, hatch.rgb, 60);
    expect(dark(drawFigure(figure))).toBeGreaterThan(dark(drawFigure(old)) + 100);
  });
});

describe('Pixels.polygon', () => {
  it('fills a right triangle of legs 100 with its area in pixels (centres inside), once per pixel', () => {
    const px = new Pixels(200, 200);
    px.polygon([10, 110, 10], [10, 10, 110], { rgb: [0, 0, 0], alpha: 0.5 });
    // Each pixel is blended once: exactly half-way grey, never darker.
    expect(count(px, [128, 128, 128], 3)).toBeGreaterThan(4900);
    expect(count(px, [128, 128, 128], 3)).toBeLessThan(5100);
    expect(count(px, [0, 0, 0], 100)).toBe(0);
  });
});
