/**
 * Pictures a view swaps into a plotly figure as a layout image on a drag step (a few milliseconds),
 * where changing a trace's data makes plotly redraw the whole figure (axes, legend, colour bar:
 * 15-25 ms). Two kinds:
 * - a raster: a map of bricks, always drawn this way (the heatmap trace under it is invisible and
 *   only answers hover). Colouring is linear in RGB between the stops, as plotly colours its
 *   traces, so the image agrees with a colour bar plotly draws from the same scale;
 * - a sketch: dots and lines standing in for scatter traces during a drag only; once the drag
 *   rests, plotly draws the traces themselves again.
 */
import type { Layout } from './plotly.js';

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

/** The raster's pixels, RGBA row-major (top row first); NaN bricks are transparent. */
export function rasterPixels(raster: Raster, out = new Uint8ClampedArray(4 * raster.width * raster.height)): Uint8ClampedArray {
  const lut = colourTable(raster.colorscale);
  const [lo, hi] = raster.range;
  const scale = hi > lo ? (LUT_SIZE - 1) / (hi - lo) : 0;
  const values = raster.values;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    const p = 4 * i;
    if (Number.isNaN(v)) {
      out[p + 3] = 0;
      continue;
    }
    const j = 3 * Math.min(LUT_SIZE - 1, Math.max(0, Math.round((v - lo) * scale)));
    out[p] = lut[j];
    out[p + 1] = lut[j + 1];
    out[p + 2] = lut[j + 2];
    out[p + 3] = 255;
  }
  return out;
}

/** The raster as a plotly layout image in data coordinates, below the traces. */
export function rasterImage(raster: Raster, doc: Document): Partial<LayoutImage> {
  const canvas = doc.createElement('canvas');
  canvas.width = raster.width;
  canvas.height = raster.height;
  const context = canvas.getContext('2d');
  if (context === null) throw new Error('this browser cannot draw into a canvas');
  const image = context.createImageData(raster.width, raster.height);
  rasterPixels(raster, image.data);
  context.putImageData(image, 0, 0);
  return {
    source: canvas.toDataURL('image/png'),
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

export interface Sketch {
  /** The axis ranges the sketch spans (the whole plot area): [left, right] and [bottom, top]. */
  x: [number, number];
  y: [number, number];
  /** Indices of the traces it stands in for (hidden while it shows). */
  traces: number[];
  /** Round dots, `size` pixels across. */
  dots: { x: ArrayLike<number>; y: ArrayLike<number>; colour: string; size: number }[];
  /** Polylines, broken where a coordinate is null. */
  lines: { x: ArrayLike<number | null>; y: ArrayLike<number | null>; colour: string; width: number; dashed?: boolean }[];
}

/**
 * The sketch as an SVG layout image over a plot area of `width` x `height` pixels: one path for
 * each series (dots are zero-length strokes with round caps), so the browser draws it at once.
 */
export function sketchImage(sketch: Sketch, width: number, height: number): Partial<LayoutImage> {
  const [x0, x1] = sketch.x;
  const [y0, y1] = sketch.y;
  const px = (x: number) => (((x - x0) / (x1 - x0)) * width).toFixed(1);
  const py = (y: number) => (((y1 - y) / (y1 - y0)) * height).toFixed(1);
  const paths: string[] = [];
  for (const line of sketch.lines) {
    let d = '';
    let pen = false;
    for (let i = 0; i < line.x.length; i++) {
      const x = line.x[i];
      const y = line.y[i];
      if (x === null || y === null) {
        pen = false;
        continue;
      }
      d += `${pen ? 'L' : 'M'}${px(x)} ${py(y)}`;
      pen = true;
    }
    const dash = line.dashed ? ` stroke-dasharray="${3 * line.width} ${2 * line.width}"` : '';
    paths.push(`<path d="${d}" fill="none" stroke="${line.colour}" stroke-width="${line.width}"${dash}/>`);
  }
  for (const dots of sketch.dots) {
    let d = '';
    for (let i = 0; i < dots.x.length; i++) d += `M${px(dots.x[i])} ${py(dots.y[i])}h0`;
    paths.push(`<path d="${d}" stroke="${dots.colour}" stroke-width="${dots.size}" stroke-linecap="round"/>`);
  }
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}">${paths.join('')}</svg>`;
  return {
    source: `data:image/svg+xml;charset=utf-8,${encodeURIComponent(svg)}`,
    xref: 'x',
    yref: 'y',
    x: x0,
    y: y1,
    sizex: x1 - x0,
    sizey: y1 - y0,
    xanchor: 'left',
    yanchor: 'top',
    sizing: 'stretch',
    layer: 'above',
  };
}
