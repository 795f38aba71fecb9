/**
 * What a drag step shows instead of a plotly redraw: the figure's new picture on a canvas laid in
 * plotly's plot area, with the plotly parts it replaces hidden, until the view redraws in full.
 * A raster goes under plotly's drawing (the plot background is transparent, the stale layout image
 * hidden), so the axes and zone boundary stay on top of it; a sketch goes over it, with plotly's
 * scatter traces hidden (beside a raster, on the raster's canvas). Reads plotly's drawing only through its public layout (axis ranges), its
 * 'plotly_afterplot' event and the class names of its plot area, plot layers and title.
 */
import type { Figure } from '../../figures/index.js';
import { rasterPixels, type Raster, type Sketch } from '../../figures/picture.js';

/** Where plotly's plot area is (pixels, in its svg container) and the axis ranges it shows. */
interface PlotGeometry {
  left: number;
  top: number;
  width: number;
  height: number;
  x: [number, number];
  y: [number, number];
}

export class DragPreview {
  private canvas: HTMLCanvasElement | null = null;
  private bricks: HTMLCanvasElement | null = null;
  private geometry: PlotGeometry | null = null;

  constructor(private readonly plot: HTMLElement) {}

  /**
   * Reads the plot area and axis ranges after plotly draws (a redraw, a resize, a zoom), so that a
   * drag step does not force the page to lay itself out again to find them.
   */
  measure(): void {
    this.geometry = null;
    const container = this.plot.querySelector('.svg-container');
    const area = this.plot.querySelector('.nsewdrag')?.getBoundingClientRect();
    const layout = (this.plot as unknown as { layout?: { xaxis?: { range?: unknown }; yaxis?: { range?: unknown } } }).layout;
    const pair = (r: unknown): [number, number] | null =>
      Array.isArray(r) && r.length === 2 && r.every((v) => typeof v === 'number' && Number.isFinite(v)) && r[0] !== r[1] ? [r[0], r[1]] : null;
    const x = pair(layout?.xaxis?.range);
    const y = pair(layout?.yaxis?.range);
    if (!container || !area || area.width < 1 || area.height < 1 || x === null || y === null) return;
    const box = container.getBoundingClientRect();
    this.geometry = { left: area.left - box.left, top: area.top - box.top, width: area.width, height: area.height, x, y };
  }

  /** Draws the figure's picture and title; false when there is no plotly drawing to lay it in. */
  show(figure: Figure, title: string): boolean {
    const geometry = this.geometry;
    const container = this.plot.querySelector('.svg-container');
    if ((!figure.raster && !figure.sketch) || geometry === null || container === null) return false;
    const canvas = this.canvasIn(container, figure.raster !== undefined);
    const scale = this.plot.ownerDocument.defaultView?.devicePixelRatio ?? 1;
    canvas.style.left = `${geometry.left}px`;
    canvas.style.top = `${geometry.top}px`;
    canvas.style.width = `${geometry.width}px`;
    canvas.style.height = `${geometry.height}px`;
    const width = Math.round(geometry.width * scale);
    const height = Math.round(geometry.height * scale);
    // Resizing reallocates the canvas; on a drag the size stays, and clearing is enough.
    if (canvas.width !== width || canvas.height !== height) {
      canvas.width = width;
      canvas.height = height;
    }
    const context = canvas.getContext('2d');
    if (context === null) return false;
    context.clearRect(0, 0, width, height);
    const { x: xr, y: yr } = geometry;
    const toPixels = (x: number, y: number): [number, number] => [
      ((x - xr[0]) / (xr[1] - xr[0])) * width,
      ((yr[1] - y) / (yr[1] - yr[0])) * height,
    ];
    if (figure.raster) this.drawRaster(context, figure.raster, toPixels);
    if (figure.sketch) drawSketch(context, figure.sketch, toPixels, scale);
    this.plot.classList.toggle('chernel-preview-raster', figure.raster !== undefined);
    this.plot.classList.toggle('chernel-preview-sketch', figure.sketch !== undefined);
    const titleEl = this.plot.querySelector('.gtitle');
    if (titleEl) titleEl.textContent = title;
    return true;
  }

  hide(): void {
    this.canvas?.remove();
    this.canvas = null;
    this.plot.classList.remove('chernel-preview-raster', 'chernel-preview-sketch');
  }

  private canvasIn(container: Element, under: boolean): HTMLCanvasElement {
    let canvas = this.canvas;
    if (canvas === null || canvas.parentElement !== container || canvas.dataset.under !== String(under)) {
      canvas?.remove();
      canvas = this.plot.ownerDocument.createElement('canvas');
      canvas.className = 'chernel-preview';
      canvas.dataset.under = String(under);
      // Under: before plotly's svg layers (absolutely placed, so document order is paint order).
      if (under) container.insertBefore(canvas, container.firstChild);
      else container.append(canvas);
      this.canvas = canvas;
    }
    return canvas;
  }

  private drawRaster(context: CanvasRenderingContext2D, raster: Raster, toPixels: (x: number, y: number) => [number, number]): void {
    const doc = this.plot.ownerDocument;
    const bricks = (this.bricks ??= doc.createElement('canvas'));
    bricks.width = raster.width;
    bricks.height = raster.height;
    const bricksContext = bricks.getContext('2d');
    if (bricksContext === null) return;
    const image = bricksContext.createImageData(raster.width, raster.height);
    rasterPixels(raster, image.data);
    bricksContext.putImageData(image, 0, 0);
    const [left, top] = toPixels(raster.x[0], raster.y[1]);
    const [right, bottom] = toPixels(raster.x[1], raster.y[0]);
    context.imageSmoothingEnabled = false;
    context.drawImage(bricks, left, top, right - left, bottom - top);
  }
}

function drawSketch(context: CanvasRenderingContext2D, sketch: Sketch, toPixels: (x: number, y: number) => [number, number], scale: number): void {
  for (const line of sketch.lines) {
    context.beginPath();
    let pen = false;
    for (let i = 0; i < line.x.length; i++) {
      const x = line.x[i];
      const y = line.y[i];
      if (x === null || y === null) {
        pen = false;
        continue;
      }
      const [px, py] = toPixels(x, y);
      if (pen) context.lineTo(px, py);
      else context.moveTo(px, py);
      pen = true;
    }
    context.strokeStyle = line.colour;
    context.lineWidth = line.width * scale;
    context.setLineDash(line.dashed ? [3 * line.width * scale, 2 * line.width * scale] : []);
    context.stroke();
  }
  for (const dots of sketch.dots) {
    context.beginPath();
    const radius = (dots.size / 2) * scale;
    for (let i = 0; i < dots.x.length; i++) {
      const [px, py] = toPixels(dots.x[i], dots.y[i]);
      context.moveTo(px + radius, py);
      context.arc(px, py, radius, 0, 2 * Math.PI);
    }
    context.fillStyle = dots.colour;
    context.fill();
  }
}
