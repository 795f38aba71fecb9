// The curvature picture: colouring linear in RGB between the stops of the scale, as plotly colours a
// trace from the same scale (so the picture agrees with the colour bar plotly draws), written as a
// BMP file (layout: Microsoft's BITMAPFILEHEADER + BITMAPINFOHEADER, 24-bit, negative height =
// top-down rows, rows padded to 4 bytes; common practice, from memory).
import { describe, expect, it } from 'vitest';
import { DIVERGING } from '../../figures/common.js';
import { colourTable, rasterBitmap, rasterImage, type Raster } from '../../figures/picture.js';

const rgb = (hex: string) => [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16));

function raster(values: number[], width = values.length): Raster {
  return { width, height: values.length / width, values: Float32Array.from(values), x: [0, 1], y: [0, 1], range: [-1, 1], colorscale: DIVERGING };
}

/** Pixel (row from the top, column) as RGB, read back from the BMP bytes. */
function pixel(bmp: Uint8Array, r: number, c: number): number[] {
  const view = new DataView(bmp.buffer, bmp.byteOffset);
  const width = view.getInt32(18, true);
  const rowBytes = (3 * width + 3) & ~3;
  const p = view.getUint32(10, true) + r * rowBytes + 3 * c;
  return [bmp[p + 2], bmp[p + 1], bmp[p]];
}

describe('raster picture', () => {
  it('a BMP of the right shape: header, size, top-down rows padded to four bytes', () => {
    const bmp = rasterBitmap(raster([-1, 0, 1, 0.5, 0.5, -0.5], 3));
    const view = new DataView(bmp.buffer);
    expect(String.fromCharCode(bmp[0], bmp[1])).toBe('BM');
    expect(view.getUint32(2, true)).toBe(bmp.length);
    expect([view.getInt32(18, true), view.getInt32(22, true), view.getUint16(28, true)]).toEqual([3, -2, 24]);
    expect(bmp.length).toBe(54 + 2 * 12); // 3 pixels = 9 bytes, padded to 12
    expect(pixel(bmp, 0, 2)).toEqual(rgb(DIVERGING[4][1]));
    // Second row, last column: the sixth value.
    expect(pixel(bmp, 1, 2)).toEqual(pixel(rasterBitmap(raster([-0.5])), 0, 0));
  });

  it('stops map to their colours; the middle of a segment to the mean of its ends', () => {
    const bmp = rasterBitmap(raster([-1, 0, 1, -0.75]));
    expect(pixel(bmp, 0, 0)).toEqual(rgb(DIVERGING[0][1]));
    expect(pixel(bmp, 0, 1)).toEqual(rgb(DIVERGING[2][1]));
    expect(pixel(bmp, 0, 2)).toEqual(rgb(DIVERGING[4][1]));
    // -0.75 is halfway between the stops at 0 and 0.25 of the scale (up to the table's resolution).
    const mid = rgb(DIVERGING[0][1]).map((c, i) => (c + rgb(DIVERGING[1][1])[i]) / 2);
    pixel(bmp, 0, 3).forEach((c, i) => expect(Math.abs(c - mid[i])).toBeLessThanOrEqual(1));
  });

  it('values beyond the range take the end colours; NaN is grey', () => {
    const bmp = rasterBitmap(raster([-7, 3, Number.NaN]));
    expect(pixel(bmp, 0, 0)).toEqual(rgb(DIVERGING[0][1]));
    expect(pixel(bmp, 0, 1)).toEqual(rgb(DIVERGING[4][1]));
    expect(pixel(bmp, 0, 2)).toEqual([0xbb, 0xbb, 0xbb]);
  });

  it('the layout image spans the bricks in data units, top-left anchored, as a BMP data URL', () => {
    const image = rasterImage({ ...raster([0, 0, 0, 0], 2), x: [-0.25, 0.75], y: [-1, 2] });
    expect(image).toMatchObject({ x: -0.25, y: 2, sizex: 1, sizey: 3, xanchor: 'left', yanchor: 'top', xref: 'x', yref: 'y' });
    expect(Buffer.from(String(image.source).split(',')[1], 'base64').subarray(0, 2).toString()).toBe('BM');
  });

  it('rejects colours it cannot read, naming them', () => {
    expect(() => colourTable([[0, 'blue'], [1, '#ffffff']])).toThrow(/#rrggbb.*"blue"/);
  });
});

describe('picture data URL', () => {
  it('base64 agrees with Node’s encoder for every tail length (reference: Buffer.toString("base64"))', () => {
    for (const width of [1, 2, 3, 4, 5, 7]) {
      const r = raster(Array.from({ length: width }, (_, i) => Math.sin(i)), width);
      const source = String(rasterImage(r).source);
      expect(source.slice('data:image/bmp;base64,'.length)).toBe(Buffer.from(rasterBitmap(r)).toString('base64'));
    }
  });
});
