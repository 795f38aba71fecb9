/**
 * chernel's logo, drawn here rather than shipped as binary files: a honeycomb cell whose corners
 * alternate between two sublattice colours, on a dark rounded square.
 */

import { encodePng } from '../kernel/png.js';

type RGB = [number, number, number];
const BACKGROUND: RGB = [27, 38, 59];
const BOND: RGB = [224, 225, 221];
const SITE_A: RGB = [238, 155, 0];
const SITE_B: RGB = [10, 147, 150];

/** Corners of the hexagon in unit coordinates (0..1), starting at the top. */
function corners(): [number, number][] {
  return Array.from({ length: 6 }, (_, i) => {
    const angle = -Math.PI / 2 + (i * Math.PI) / 3;
    return [0.5 + 0.3 * Math.cos(angle), 0.5 + 0.3 * Math.sin(angle)];
  });
}

function segmentDistance(px: number, py: number, [ax, ay]: [number, number], [bx, by]: [number, number]): number {
  const t = Math.max(0, Math.min(1, ((px - ax) * (bx - ax) + (py - ay) * (by - ay)) / ((bx - ax) ** 2 + (by - ay) ** 2)));
  return Math.hypot(px - ax - t * (bx - ax), py - ay - t * (by - ay));
}

/** Colour and opacity at a point of the unit square (painter's order). */
function sample(x: number, y: number): [number, number, number, number] {
  const r = 0.18; // corner radius of the background square
  const dx = Math.max(r - x, 0, x - (1 - r));
  const dy = Math.max(r - y, 0, y - (1 - r));
  if (dx * dx + dy * dy > r * r) return [0, 0, 0, 0];
  let colour: RGB = BACKGROUND;
  const hex = corners();
  for (let i = 0; i < 6; i++) if (segmentDistance(x, y, hex[i], hex[(i + 1) % 6]) < 0.035) colour = BOND;
  hex.forEach(([cx, cy], i) => {
    if (Math.hypot(x - cx, y - cy) < 0.085) colour = i % 2 === 0 ? SITE_A : SITE_B;
  });
  return [...colour, 255];
}

/** The logo as a PNG of `size` x `size` pixels (4x4 supersampled). */
export function logoPng(size: number): Buffer {
  const rgba = new Uint8Array(size * size * 4);
  const s = 4;
  for (let py = 0; py < size; py++) {
    for (let px = 0; px < size; px++) {
      const acc = [0, 0, 0, 0];
      for (let j = 0; j < s; j++) {
        for (let i = 0; i < s; i++) {
          const [r, g, b, a] = sample((px + (i + 0.5) / s) / size, (py + (j + 0.5) / s) / size);
          acc[0] += r * a;
          acc[1] += g * a;
          acc[2] += b * a;
          acc[3] += a;
        }
      }
      const o = (py * size + px) * 4;
      const alpha = acc[3] / (s * s);
      for (let c = 0; c < 3; c++) rgba[o + c] = acc[3] ? Math.round(acc[c] / acc[3]) : 0;
      rgba[o + 3] = Math.round(alpha);
    }
  }
  return encodePng(size, size, rgba);
}

export function logoSvg(): string {
  const hex = corners().map(([x, y]) => [x * 64, y * 64]);
  const rgb = (c: RGB): string => `rgb(${c.join(',')})`;
  const bonds = hex.map(([x, y]) => `${x.toFixed(2)},${y.toFixed(2)}`).join(' ');
  const sites = hex
    .map(([x, y], i) => `<circle cx="${x.toFixed(2)}" cy="${y.toFixed(2)}" r="5.44" fill="${rgb(i % 2 === 0 ? SITE_A : SITE_B)}"/>`)
    .join('');
  return (
    `<svg xmlns="http://www.w3.org/2000/svg" width="64" height="64" viewBox="0 0 64 64">` +
    `<rect width="64" height="64" rx="11.5" fill="${rgb(BACKGROUND)}"/>` +
    `<polygon points="${bonds}" fill="none" stroke="${rgb(BOND)}" stroke-width="4.5"/>${sites}</svg>`
  );
}
