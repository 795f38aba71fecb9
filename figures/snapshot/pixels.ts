/**
 * An RGBA drawing surface in plain TypeScript (no DOM, no Node): what the static pictures of
 * figures are drawn on, in the kernel (encoded as PNG there) and in the page (through a canvas).
 * Lines and dots are antialiased by coverage; text uses the bitmap font of font.ts.
 */
import { drawable, glyph, GLYPH_HEIGHT, GLYPH_WIDTH, textWidth } from './font.js';

export type Rgb = [number, number, number];
/** A colour with opacity 0..1. */
export interface Paint {
  rgb: Rgb;
  alpha: number;
}

const NAMED: Record<string, Rgb> = {
  black: [0, 0, 0],
  white: [255, 255, 255],
  red: [255, 0, 0],
  blue: [0, 0, 255],
  grey: [128, 128, 128],
  gray: [128, 128, 128],
};

/** '#rgb', '#rrggbb', 'rgb(r,g,b)', 'rgba(r,g,b,a)' or a few names; null when not understood. */
export function parseColour(text: unknown): Paint | null {
  if (typeof text !== 'string') return null;
  const s = text.trim().toLowerCase();
  if (NAMED[s]) return { rgb: NAMED[s], alpha: 1 };
  let m = /^#([0-9a-f]{6})$/.exec(s);
  if (m) {
    const v = parseInt(m[1], 16);
    return { rgb: [(v >> 16) & 255, (v >> 8) & 255, v & 255], alpha: 1 };
  }
  m = /^#([0-9a-f])([0-9a-f])([0-9a-f])$/.exec(s);
  if (m) return { rgb: [parseInt(m[1] + m[1], 16), parseInt(m[2] + m[2], 16), parseInt(m[3] + m[3], 16)], alpha: 1 };
  m = /^rgba?\(\s*([\d.]+)\s*,\s*([\d.]+)\s*,\s*([\d.]+)\s*(?:,\s*([\d.]+)\s*)?\)$/.exec(s);
  if (m) return { rgb: [Number(m[1]), Number(m[2]), Number(m[3])], alpha: m[4] === undefined ? 1 : Number(m[4]) };
  if (s === 'transparent') return { rgb: [0, 0, 0], alpha: 0 };
  return null;
}

export class Pixels {
  readonly rgba: Uint8ClampedArray<ArrayBuffer>;
  /** Where drawing is allowed (everything by default): [left, top, right, bottom), pixels. */
  private clip: [number, number, number, number];

  constructor(
    readonly width: number,
    readonly height: number,
    background: Rgb = [255, 255, 255],
  ) {
    if (!Number.isInteger(width) || !Number.isInteger(height) || width < 1 || height < 1) {
      throw new RangeError(`Pixels: width and height must be positive integers. Value: ${width} x ${height}`);
    }
    this.rgba = new Uint8ClampedArray(width * height * 4);
    for (let i = 0; i < width * height; i++) this.rgba.set([background[0], background[1], background[2], 255], 4 * i);
    this.clip = [0, 0, width, height];
  }

  /** Restricts drawing to a rectangle (null: the whole surface). */
  clipTo(box: [number, number, number, number] | null): void {
    this.clip = box === null ? [0, 0, this.width, this.height] : [Math.max(0, Math.floor(box[0])), Math.max(0, Math.floor(box[1])), Math.min(this.width, Math.ceil(box[2])), Math.min(this.height, Math.ceil(box[3]))];
  }

  /** Blends `paint` into pixel (x, y) with coverage 0..1. */
  blend(x: number, y: number, paint: Paint, coverage = 1): void {
    const [l, t, r, b] = this.clip;
    if (x < l || y < t || x >= r || y >= b) return;
    const a = Math.min(1, Math.max(0, coverage * paint.alpha));
    if (a <= 0) return;
    const o = 4 * (y * this.width + x);
    const d = this.rgba;
    d[o] = d[o] + (paint.rgb[0] - d[o]) * a;
    d[o + 1] = d[o + 1] + (paint.rgb[1] - d[o + 1]) * a;
    d[o + 2] = d[o + 2] + (paint.rgb[2] - d[o + 2]) * a;
  }

  fillRect(x0: number, y0: number, x1: number, y1: number, paint: Paint): void {
    const [l, t, r, b] = this.clip;
    const xa = Math.max(l, Math.round(Math.min(x0, x1)));
    const xb = Math.min(r, Math.round(Math.max(x0, x1)));
    const ya = Math.max(t, Math.round(Math.min(y0, y1)));
    const yb = Math.min(b, Math.round(Math.max(y0, y1)));
    for (let y = ya; y < yb; y++) for (let x = xa; x < xb; x++) this.blend(x, y, paint);
  }

  /**
   * A filled polygon (even-odd rule, closed from the last vertex to the first): every pixel whose
   * centre lies inside is blended once, so a translucent fill stays even where edges overlap.
   */
  polygon(xs: ArrayLike<number>, ys: ArrayLike<number>, paint: Paint): void {
    const n = Math.min(xs.length, ys.length);
    if (n < 3) return;
    const [l, t, r, b] = this.clip;
    let top = Infinity;
    let bottom = -Infinity;
    for (let i = 0; i < n; i++) {
      top = Math.min(top, ys[i]);
      bottom = Math.max(bottom, ys[i]);
    }
    const crossings: number[] = [];
    for (let y = Math.max(t, Math.floor(top)); y < Math.min(b, Math.ceil(bottom)); y++) {
      const cy = y + 0.5;
      crossings.length = 0;
      for (let i = 0, j = n - 1; i < n; j = i++) {
        const [ya, yb] = [ys[j], ys[i]];
        if ((ya <= cy) !== (yb <= cy)) crossings.push(xs[j] + ((cy - ya) / (yb - ya)) * (xs[i] - xs[j]));
      }
      crossings.sort((p, q) => p - q);
      for (let k = 0; k + 1 < crossings.length; k += 2) {
        for (let x = Math.max(l, Math.ceil(crossings[k] - 0.5)); x < Math.min(r, Math.ceil(crossings[k + 1] - 0.5)); x++) this.blend(x, y, paint);
      }
    }
  }

  /** A disc of radius `r` centred at (cx, cy), edge antialiased. */
  disc(cx: number, cy: number, r: number, paint: Paint): void {
    const x0 = Math.floor(cx - r - 1);
    const x1 = Math.ceil(cx + r + 1);
    const y0 = Math.floor(cy - r - 1);
    const y1 = Math.ceil(cy + r + 1);
    for (let y = y0; y <= y1; y++) {
      for (let x = x0; x <= x1; x++) {
        const d = Math.hypot(x + 0.5 - cx, y + 0.5 - cy);
        this.blend(x, y, paint, Math.min(1, Math.max(0, r + 0.5 - d)));
      }
    }
  }

  /** A ring (circle outline) of radius `r` and stroke `width`. */
  ring(cx: number, cy: number, r: number, width: number, paint: Paint): void {
    const outer = r + width / 2;
    const inner = r - width / 2;
    for (let y = Math.floor(cy - outer - 1); y <= Math.ceil(cy + outer + 1); y++) {
      for (let x = Math.floor(cx - outer - 1); x <= Math.ceil(cx + outer + 1); x++) {
        const d = Math.hypot(x + 0.5 - cx, y + 0.5 - cy);
        this.blend(x, y, paint, Math.min(1, Math.max(0, outer + 0.5 - d), Math.max(0, d - inner + 0.5)));
      }
    }
  }

  /**
   * A straight segment of stroke `width`: every pixel near it is covered by its distance to the
   * segment, so lines of any slope come out smooth. `dash`: [on, off] lengths in pixels, with
   * `phase` the distance already drawn along a polyline; returns the phase after this segment.
   */
  segment(xa: number, ya: number, xb: number, yb: number, width: number, paint: Paint, dash: [number, number] | null = null, phase = 0): number {
    const dx = xb - xa;
    const dy = yb - ya;
    const length = Math.hypot(dx, dy);
    const half = Math.max(0.5, width / 2);
    const x0 = Math.floor(Math.min(xa, xb) - half - 1);
    const x1 = Math.ceil(Math.max(xa, xb) + half + 1);
    const y0 = Math.floor(Math.min(ya, yb) - half - 1);
    const y1 = Math.ceil(Math.max(ya, yb) + half + 1);
    const [l, t, r, b] = this.clip;
    if (x1 < l || x0 >= r || y1 < t || y0 >= b) return phase + length;
    for (let y = Math.max(y0, t); y <= Math.min(y1, b - 1); y++) {
      for (let x = Math.max(x0, l); x <= Math.min(x1, r - 1); x++) {
        const px = x + 0.5 - xa;
        const py = y + 0.5 - ya;
        const along = length > 0 ? Math.min(length, Math.max(0, (px * dx + py * dy) / length)) : 0;
        if (dash !== null && (phase + along) % (dash[0] + dash[1]) > dash[0]) continue;
        const cx = length > 0 ? (along / length) * dx : 0;
        const cy = length > 0 ? (along / length) * dy : 0;
        const d = Math.hypot(px - cx, py - cy);
        const coverage = Math.min(1, Math.max(0, half + 0.5 - d));
        if (coverage > 0) this.max(x, y, paint, coverage);
      }
    }
    return phase + length;
  }

  /**
   * Blends like `blend`, but a pixel a stroke covers twice (at a joint of a polyline) is not
   * darkened twice: the stroke's own coverage per pixel is remembered until `endStroke`.
   */
  private strokeCoverage: Map<number, number> | null = null;
  private max(x: number, y: number, paint: Paint, coverage: number): void {
    if (this.strokeCoverage === null) {
      this.blend(x, y, paint, coverage);
      return;
    }
    const key = y * this.width + x;
    const before = this.strokeCoverage.get(key) ?? 0;
    if (coverage <= before) return;
    this.strokeCoverage.set(key, coverage);
    // Blend only the extra coverage over what this stroke already laid down.
    this.blend(x, y, paint, (coverage - before) / (1 - before * paint.alpha || 1));
  }

  /** A polyline through the points (a null coordinate breaks it). */
  polyline(xs: ArrayLike<number | null>, ys: ArrayLike<number | null>, width: number, paint: Paint, dash: [number, number] | null = null): void {
    this.strokeCoverage = new Map();
    let phase = 0;
    let last: [number, number] | null = null;
    for (let i = 0; i < xs.length; i++) {
      const x = xs[i];
      const y = ys[i];
      if (x === null || y === null || !Number.isFinite(x) || !Number.isFinite(y)) {
        last = null;
        continue;
      }
      if (last !== null) phase = this.segment(last[0], last[1], x, y, width, paint, dash, phase);
      else if (i + 1 >= xs.length || xs[i + 1] === null) this.disc(x, y, width / 2, paint);
      last = [x, y];
    }
    this.strokeCoverage = null;
  }

  /** Text with its top-left corner at (x, y), or anchored as asked; returns its width. */
  text(
    x: number,
    y: number,
    text: string,
    paint: Paint,
    options: { scale?: number; anchor?: 'start' | 'middle' | 'end'; baseline?: 'top' | 'middle' | 'bottom'; vertical?: boolean } = {},
  ): number {
    const scale = options.scale ?? 1;
    const chars = drawable(text);
    const w = textWidth(chars, scale);
    const h = GLYPH_HEIGHT * scale;
    const shiftAlong = options.anchor === 'middle' ? -w / 2 : options.anchor === 'end' ? -w : 0;
    const shiftAcross = options.baseline === 'middle' ? -h / 2 : options.baseline === 'bottom' ? -h : 0;
    const ox = Math.round(options.vertical ? x + shiftAcross : x + shiftAlong);
    const oy = Math.round(options.vertical ? y - shiftAlong : y + shiftAcross);
    let pen = 0;
    for (const ch of chars) {
      const rows = glyph(ch);
      for (let row = 0; row < GLYPH_HEIGHT; row++) {
        for (let col = 0; col < GLYPH_WIDTH; col++) {
          if (!(rows[row] & (1 << (GLYPH_WIDTH - 1 - col)))) continue;
          for (let sy = 0; sy < scale; sy++) {
            for (let sx = 0; sx < scale; sx++) {
              const gx = pen + col * scale + sx;
              const gy = row * scale + sy;
              // Vertical text reads bottom to top (rotated a quarter turn anticlockwise).
              if (options.vertical) this.blend(ox + gy, oy - gx, paint);
              else this.blend(ox + gx, oy + gy, paint);
            }
          }
        }
      }
      pen += (GLYPH_WIDTH + 1) * scale;
    }
    return w;
  }
}
