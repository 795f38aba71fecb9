// The still pictures of figures (figures/snapshot/) and their PNG encoding (kernel/png.ts):
// geometry checked against what was asked for (a line where its data says, a heatmap's cells in
// their quadrants, antialiased strokes of the asked width), the PNG decoded back with zlib (PNG
// format: RFC 2083; zlib: RFC 1950), and every figure kind drawn from a real engine result.
// Physics as in tests/unit/widgets-figures.test.ts: Qi, Wu, Zhang, PRB 74, 085308 (2006); Haldane,
// PRL 61, 2015 (1988); Kane & Mele, PRL 95, 226801 (2005).
import { readdirSync, readFileSync } from 'node:fs';
import { inflateSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { figurePng } from '../../kernel/display/pictures.js';
import { haldane, kaneMele, qwz } from '../../src/index.js';
import { computeView } from '../../src/views.js';
import { figureFor, type Figure } from '../../figures/index.js';
import type { ViewRequest, ModelSpecView } from '../../contract/protocol.js';
import { drawable, glyph, GLYPH_HEIGHT, textWidth } from '../../figures/snapshot/font.js';
import { drawFigure, niceTicks } from '../../figures/snapshot/figure.js';
import { parseColour, Pixels } from '../../figures/snapshot/pixels.js';

const RED = { rgb: [255, 0, 0] as [number, number, number], alpha: 1 };

function pixel(px: Pixels, x: number, y: number): [number, number, number] {
  const o = 4 * (y * px.width + x);
  return [px.rgba[o], px.rgba[o + 1], px.rgba[o + 2]];
}

/** Pixels whose colour is close to `rgb`. */
function where(px: Pixels, rgb: [number, number, number], tolerance = 40): { x: number; y: number }[] {
  const out: { x: number; y: number }[] = [];
  for (let y = 0; y < px.height; y++) {
    for (let x = 0; x < px.width; x++) {
      const [r, g, b] = pixel(px, x, y);
      if (Math.abs(r - rgb[0]) + Math.abs(g - rgb[1]) + Math.abs(b - rgb[2]) < tolerance) out.push({ x, y });
    }
  }
  return out;
}

function correlation(points: { x: number; y: number }[]): number {
  const n = points.length;
  const mx = points.reduce((s, p) => s + p.x, 0) / n;
  const my = points.reduce((s, p) => s + p.y, 0) / n;
  let sxy = 0;
  let sxx = 0;
  let syy = 0;
  for (const p of points) {
    sxy += (p.x - mx) * (p.y - my);
    sxx += (p.x - mx) ** 2;
    syy += (p.y - my) ** 2;
  }
  return sxy / Math.sqrt(sxx * syy);
}

describe('font', () => {
  it('draws every printable ASCII character with a glyph of its own, and simplifies the rest', () => {
    const seen = new Set<string>();
    for (let c = 33; c < 127; c++) seen.add(JSON.stringify(glyph(String.fromCharCode(c))));
    expect(seen.size).toBe(127 - 33); // all distinct
    expect(glyph('A')).toHaveLength(GLYPH_HEIGHT);
    expect(drawable('k₁ [b₁] · x̄₂ — Ω')).toBe('k1 [b1] · x2 - Ω');
    expect(drawable('☃')).toBe('?');
    expect(textWidth('abc', 2)).toBe((3 * 6 - 1) * 2);
  });

  it('draws every character the figure library writes (no "?" in a still picture\'s labels)', () => {
    const dir = new URL('../../figures/', import.meta.url);
    const used = new Set<string>();
    for (const name of readdirSync(dir).filter((f) => f.endsWith('.ts'))) {
      for (const ch of readFileSync(new URL(name, dir), 'utf8')) if (ch.charCodeAt(0) > 126) used.add(ch);
    }
    expect(used.size).toBeGreaterThan(5);
    for (const ch of used) expect(drawable(ch), `"${ch}" (U+${ch.codePointAt(0)!.toString(16)})`).not.toContain('?');
  });
});

describe('pixels', () => {
  it('parses the colours the figures use', () => {
    expect(parseColour('#c0392b')).toEqual({ rgb: [192, 57, 43], alpha: 1 });
    expect(parseColour('rgba(192,57,43,0.08)')).toEqual({ rgb: [192, 57, 43], alpha: 0.08 });
    expect(parseColour('#abc')).toEqual({ rgb: [170, 187, 204], alpha: 1 });
    expect(parseColour('nonsense')).toBeNull();
  });

  it('a stroke covers the pixels within half its width of the segment, and nothing far from it', () => {
    const px = new Pixels(40, 20);
    px.segment(5, 10, 35, 10, 3, RED); // pixel centres at y + 0.5: rows 9 and 10 within 1, rows 8 and 11 half covered
    expect(pixel(px, 20, 10)).toEqual([255, 0, 0]);
    expect(pixel(px, 20, 9)).toEqual([255, 0, 0]);
    expect(pixel(px, 20, 13)).toEqual([255, 255, 255]);
    expect(pixel(px, 2, 10)).toEqual([255, 255, 255]);
    // Antialiased: the edge row is partly covered.
    const edge = pixel(px, 20, 11);
    expect(edge[1]).toBeGreaterThan(0);
    expect(edge[1]).toBeLessThan(255);
  });

  it('a dashed polyline leaves gaps, and a joint is not painted twice', () => {
    const px = new Pixels(60, 10);
    px.polyline([2, 58], [5, 5], 2, { rgb: [0, 0, 0], alpha: 0.5 }, [6, 4]);
    const row = Array.from({ length: 56 }, (_, i) => pixel(px, i + 2, 5)[0]);
    expect(row.filter((v) => v === 255).length).toBeGreaterThan(10);
    expect(row.filter((v) => v < 200).length).toBeGreaterThan(20);
    const joint = new Pixels(20, 20);
    joint.polyline([2, 10, 18], [10, 10, 10], 2, { rgb: [0, 0, 0], alpha: 0.5 });
    expect(pixel(joint, 10, 10)).toEqual(pixel(joint, 6, 10));
  });

  it('a disc covers about pi r^2 pixels', () => {
    const px = new Pixels(40, 40);
    px.disc(20, 20, 8, RED);
    const covered = Array.from({ length: 40 * 40 }, (_, i) => 1 - px.rgba[4 * i + 1] / 255).reduce((s, c) => s + c, 0);
    expect(covered).toBeGreaterThan(Math.PI * 64 * 0.95);
    expect(covered).toBeLessThan(Math.PI * 64 * 1.05);
  });

  it('refuses a surface of no size, naming the value', () => {
    expect(() => new Pixels(0, 10)).toThrow('Pixels: width and height must be positive integers. Value: 0 x 10');
  });
});

describe('figure pictures', () => {
  it('round ticks (common practice: 1, 2, 2.5, 5 times a power of ten)', () => {
    expect(niceTicks(0, 1)).toEqual([0, 0.2, 0.4, 0.6000000000000001, 0.8, 1]);
    expect(niceTicks(-3, 3, 6)).toEqual([-3, -2, -1, 0, 1, 2, 3]);
  });

  it('draws a line where its data says: y = 1 - x on unit axes runs from top left to bottom right', () => {
    const px = drawFigure({
      data: [{ type: 'scatter', mode: 'lines', x: [0, 1], y: [1, 0], line: { color: '#ff0000', width: 2 } }],
      layout: { xaxis: { range: [0, 1] }, yaxis: { range: [0, 1] } },
    });
    const red = where(px, [255, 0, 0]);
    expect(red.length).toBeGreaterThan(300);
    expect(correlation(red)).toBeGreaterThan(0.999); // pixel y grows downwards
  });

  it('draws a heatmap cell by cell: each of four values in its own quadrant, a null cell grey', () => {
    const px = drawFigure({
      data: [{ type: 'heatmap', x: [0, 1], y: [0, 1], z: [[0, 1], [2, null]], zmin: 0, zmax: 2, colorscale: [[0, '#0000ff'], [0.5, '#00ff00'], [1, '#ff0000']] }],
      layout: {},
    });
    const centre = (rgb: [number, number, number]) => {
      const p = where(px, rgb, 10);
      return { x: p.reduce((s, q) => s + q.x, 0) / p.length, y: p.reduce((s, q) => s + q.y, 0) / p.length, n: p.length };
    };
    const blue = centre([0, 0, 255]); // z[0][0]: x = 0, y = 0: bottom left
    const green = centre([0, 255, 0]); // z[0][1]: x = 1, y = 0: bottom right
    const red = centre([255, 0, 0]); // z[1][0]: x = 0, y = 1: top left
    const grey = centre([187, 187, 187]); // z[1][1]: null
    for (const c of [blue, green, red, grey]) expect(c.n).toBeGreaterThan(10000);
    expect(green.x).toBeGreaterThan(blue.x + 100);
    expect(Math.abs(green.y - blue.y)).toBeLessThan(2);
    expect(red.y).toBeLessThan(blue.y - 100);
    expect(grey.x).toBeCloseTo(green.x, 0);
    expect(grey.y).toBeCloseTo(red.y, 0);
  });

  it('the kernel PNG decodes to the drawn pixels (signature, header, zlib data, filter bytes)', () => {
    const figure = { data: [{ type: 'scatter', mode: 'markers', x: [0, 1, 2], y: [2, 0, 1], marker: { color: '#1f4e9c', size: 8 } }], layout: { title: { text: 'three dots' } } };
    const png = Buffer.from(figurePng(figure), 'base64');
    expect([...png.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    expect(png.toString('ascii', 12, 16)).toBe('IHDR');
    const width = png.readUInt32BE(16);
    const height = png.readUInt32BE(20);
    expect([width, height]).toEqual([760, 480]);
    const idat = png.indexOf('IDAT');
    const raw = inflateSync(png.subarray(idat + 4, idat + 4 + png.readUInt32BE(idat - 4)));
    const px = drawFigure(figure);
    expect(raw.length).toBe((4 * width + 1) * height);
    for (const y of [0, 100, 240, 479]) {
      expect(raw[y * (4 * width + 1)]).toBe(0);
      expect(Buffer.compare(raw.subarray(y * (4 * width + 1) + 1, (y + 1) * (4 * width + 1)), Buffer.from(px.rgba.buffer, 4 * width * y, 4 * width))).toBe(0);
    }
  });

  function draw(spec: ModelSpecView, kind: string, options: Record<string, unknown>, params: Record<string, number> = {}): { figure: Figure; px: Pixels } {
    const values = { ...Object.fromEntries(Object.entries(spec.parameters).map(([k, p]) => [k, p.default])), ...params };
    const result = computeView({ ...options, kind, model: spec, params: values } as ViewRequest);
    const figure = figureFor(result, { spec, values, options });
    return { figure, px: drawFigure(figure) };
  }

  it('every figure kind draws from a real engine result, with its own colours in the plot', () => {
    const cases: [string, ReturnType<typeof draw>, [number, number, number]][] = [
      // The curvature picture: the diverging scale's blue end where |Ω| peaks (Haldane, C = -1 here).
      ['curvature', draw(haldane(), 'curvature', { grid: 24, bands: 1 }), [31, 78, 156]],
      ['wannier-flow', draw(kaneMele(), 'wannier-flow', { grid: [24, 12], bands: 2 }), [31, 78, 156]],
      ['bands', draw(qwz(), 'bands', { bands: 1 }, { u: -1 }), [192, 57, 43]],
      ['ribbon', draw(qwz(), 'ribbon', { direction: 0, width: 12 }, { u: -1 }), [179, 38, 30]],
      ['phase-map', draw(qwz(), 'phase-map', { quantity: 'chern', grid: 10, axes: [{ param: 'u', from: -3, to: 3, count: 7 }, { param: 'u', from: -3, to: 3, count: 2 }].slice(0, 1) }), [59, 110, 168]],
      // The marker of the smallest gap.
      ['gap', draw(qwz(), 'gap', { grid: 12 }, { u: -1 }), [217, 130, 43]],
    ];
    for (const [kind, { px }, colour] of cases) {
      expect([kind, where(px, colour, 30).length > 20]).toEqual([kind, true]);
    }
  });

  it('a gapless curvature map marks where the gap closes, also on the edge of the zone (QWZ at u = 2: M point)', () => {
    const { figure, px } = draw(qwz(), 'curvature', { grid: 20, bands: 1 }, { u: 2 });
    expect(figure.gapless).toBe(true);
    // The red outline of the closing cross.
    expect(where(px, [212, 0, 0], 30).length).toBeGreaterThan(20);
  });
});
