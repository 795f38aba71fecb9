/**
 * The pictures of a figure that a drag step can redraw without plotly (whose redraw of changed
 * trace data is a full replot: axes, legend, colour bar, 15-25 ms):
 * - a raster: a map of bricks. Always drawn as an image under the traces (a plotly layout image;
 *   the heatmap trace over it is invisible and only answers hover). Colouring is linear in RGB
 *   between the stops, as plotly colours its traces, so the picture agrees with a colour bar plotly
 *   draws from the same scale;
 * - a sketch: dots and lines that stand in for scatter traces while a drag goes on.
 * Plain data and encoding here; preview.ts draws them in the page.
 */
import { base64 } from '../contract/wire.js';
import type { Layout } from './plotly-json.js';

export interface Raster {
  /** Bricks across and down. */
  width: number;
  height: number;
  /** width * height values, row-major from the top row (largest y) down. */
  values: Float32Array;
  /** Outer edges of the bricks in data units: [left, right] and [bottom, top]. */
  x: [number, number];
  y: [number, number];
  /** The value range spread over the colour scale (values outside take the end colours). */
  range: [number, number];
  colorscale: [number, string][];
}

type LayoutImage = NonNullable<Layout['images']>[number];

const LUT_SIZE = 1024;
const NAN_GREY = 0xbb;
const luts = new Map<string, Uint8Array>();

function rgbOf(colour: string): [number, number, number] {
  const hex = /^#([0-9a-f]{6})$/i.exec(colour);
  if (hex === null) throw new Error(`colour scale: expected #rrggbb colours. Value: ${JSON.stringify(colour)}`);
  const v = parseInt(hex[1], 16);
  return [(v >> 16) & 255, (v >> 8) & 255, v & 255];
}

/** RGB of LUT_SIZE evenly spaced positions of a colour scale (stops at 0..1, ascending). */
export function colourTable(scale: [number, string][]): Uint8Array {
  const key = JSON.stringify(scale);
  const cached = luts.get(key);
  if (cached) return cached;
  const stops = scale.map(([at, colour]) => ({ at, rgb: rgbOf(colour) }));
  const lut = new Uint8Array(3 * LUT_SIZE);
  let s = 0;
  for (let i = 0; i < LUT_SIZE; i++) {
    const t = i / (LUT_SIZE - 1);
    while (s < stops.length - 2 && t > stops[s + 1].at) s++;
    const a = stops[s];
    const b = stops[Math.min(s + 1, stops.length - 1)];
    const f = b.at > a.at ? Math.min(1, Math.max(0, (t - a.at) / (b.at - a.at))) : 0;
    for (let c = 0; c < 3; c++) lut[3 * i + c] = Math.round(a.rgb[c] + f * (b.rgb[c] - a.rgb[c]));
  }
  luts.set(key, lut);
  return lut;
}

/** Calls `put(i, r, g, b)` for brick i of the raster, in order; NaN bricks are grey. */
function paint(raster: Raster, put: (i: number, r: number, g: number, b: number) => void): void {
  const lut = colourTable(raster.colorscale);
  const [lo, hi] = raster.range;
  const scale = hi > lo ? (LUT_SIZE - 1) / (hi - lo) : 0;
  const values = raster.values;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (Number.isNaN(v)) {
      put(i, NAN_GREY, NAN_GREY, NAN_GREY);
      continue;
    }
    const j = 3 * Math.min(LUT_SIZE - 1, Math.max(0, Math.round((v - lo) * scale)));
    put(i, lut[j], lut[j + 1], lut[j + 2]);
  }
}

/** The raster's pixels, RGBA row-major from the top row (as a canvas ImageData holds them). */
export function rasterPixels(raster: Raster, out = new Uint8ClampedArray(4 * raster.values.length)): Uint8ClampedArray {
  paint(raster, (i, r, g, b) => {
    const p = 4 * i;
    out[p] = r;
    out[p + 1] = g;
    out[p + 2] = b;
    out[p + 3] = 255;
  });
  return out;
}

/**
 * The raster as a BMP file: 24-bit, rows stored top-down (negative height), each padded to four
 * bytes. Uncompressed on purpose: building it takes a fraction of a millisecond where PNG encoding
 * takes several, and every browser decodes it.
 */
export function rasterBitmap(raster: Raster): Uint8Array {
  const { width, height } = raster;
  const rowBytes = (3 * width + 3) & ~3;
  const header = 14 + 40;
  const bytes = new Uint8Array(header + rowBytes * height);
  const view = new DataView(bytes.buffer);
  bytes[0] = 0x42; // 'BM'
  bytes[1] = 0x4d;
  view.setUint32(2, bytes.length, true);
  view.setUint32(10, header, true);
  view.setUint32(14, 40, true); // BITMAPINFOHEADER
  view.setInt32(18, width, true);
  view.setInt32(22, -height, true);
  view.setUint16(26, 1, true); // planes
  view.setUint16(28, 24, true); // bits per pixel
  view.setUint32(34, rowBytes * height, true);
  paint(raster, (i, r, g, b) => {
    const p = header + Math.floor(i / width) * rowBytes + 3 * (i % width);
    bytes[p] = b; // BMP stores blue, green, red
    bytes[p + 1] = g;
    bytes[p + 2] = r;
  });
  return bytes;
}

/** The raster as a plotly layout image in data coordinates, below the traces. */
export function rasterImage(raster: Raster): Partial<LayoutImage> {
  return {
    source: `data:image/bmp;base64,${base64(rasterBitmap(raster))}`,
    xref: 'x',
    yref: 'y',
    x: raster.x[0],
    y: raster.y[1],
    sizex: raster.x[1] - raster.x[0],
    sizey: raster.y[1] - raster.y[0],
    xanchor: 'left',
    yanchor: 'top',
    sizing: 'stretch',
    layer: 'below',
  };
}

/** What a figure's scatter traces show, in data units, for drawing without plotly. */
export interface Sketch {
  /** Round dots, `size` pixels across. */
  dots: { x: ArrayLike<number>; y: ArrayLike<number>; colour: string; size: number }[];
  /** Polylines, broken where a coordinate is null. */
  lines: { x: ArrayLike<number | null>; y: ArrayLike<number | null>; colour: string; width: number; dashed?: boolean }[];
}
