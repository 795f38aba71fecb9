// The curvature picture's colouring: linear in RGB between the stops of the scale, as plotly colours
// a trace from the same scale (so the picture agrees with the colour bar plotly draws).
import { describe, expect, it } from 'vitest';
import { DIVERGING } from '../../widgets/src/figures/common.js';
import { colourTable, rasterPixels, type Raster } from '../../widgets/src/picture.js';

const rgb = (hex: string) => [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16));

function raster(values: number[]): Raster {
  return { width: values.length, height: 1, values: Float32Array.from(values), x: [0, 1], y: [0, 1], range: [-1, 1], colorscale: DIVERGING };
}

describe('raster colouring', () => {
  it('stops map to their colours; the middle of a segment to the mean of its ends', () => {
    const px = rasterPixels(raster([-1, 0, 1, -0.75]));
    expect(Array.from(px.slice(0, 3))).toEqual(rgb(DIVERGING[0][1]));
    expect(Array.from(px.slice(4, 7))).toEqual(rgb(DIVERGING[2][1]));
    expect(Array.from(px.slice(8, 11))).toEqual(rgb(DIVERGING[4][1]));
    // -0.75 is halfway between the stops at 0 and 0.25 of the scale (up to the table's resolution).
    const mid = rgb(DIVERGING[0][1]).map((c, i) => (c + rgb(DIVERGING[1][1])[i]) / 2);
    Array.from(px.slice(12, 15)).forEach((c, i) => expect(Math.abs(c - mid[i])).toBeLessThanOrEqual(1));
    expect([px[3], px[7], px[11], px[15]]).toEqual([255, 255, 255, 255]);
  });

  it('values beyond the range take the end colours; NaN is transparent', () => {
    const px = rasterPixels(raster([-7, 3, Number.NaN]));
    expect(Array.from(px.slice(0, 3))).toEqual(rgb(DIVERGING[0][1]));
    expect(Array.from(px.slice(4, 7))).toEqual(rgb(DIVERGING[4][1]));
    expect(px[11]).toBe(0);
  });

  it('rejects colours it cannot read, naming them', () => {
    expect(() => colourTable([[0, 'blue'], [1, '#ffffff']])).toThrow(/#rrggbb.*"blue"/);
  });
});
