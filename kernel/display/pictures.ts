/**
 * Static pictures of figures for the kernel's outputs: the figure drawn by the shared rasteriser
 * (figures/snapshot/) and encoded as PNG, which every notebook viewer shows, trusted or not,
 * with or without JavaScript.
 */
import { drawFigure, type DrawableFigure } from '../../figures/snapshot/figure.js';
import { encodePng } from '../png.js';

/** The figure as a base64 PNG (what an `image/png` output holds). */
export function figurePng(figure: DrawableFigure): string {
  const pixels = drawFigure(figure);
  return encodePng(pixels.width, pixels.height, new Uint8Array(pixels.rgba.buffer, pixels.rgba.byteOffset, pixels.rgba.byteLength)).toString('base64');
}
