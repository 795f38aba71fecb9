/** Downloads from the widget: the figure (PNG/SVG via plotly) and the data (CSV/JSON). */
import Plotly from './plotly.js';

export function safeFileName(text: string): string {
  return text.replace(/[^A-Za-z0-9._-]+/g, '-').replace(/^-+|-+$/g, '') || 'chernel';
}

export function downloadText(text: string, fileName: string, mime: string): void {
  const url = URL.createObjectURL(new Blob([text], { type: mime }));
  const link = document.createElement('a');
  link.href = url;
  link.download = fileName;
  link.style.display = 'none';
  document.body.append(link);
  link.click();
  link.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

export function downloadFigure(plot: HTMLElement, format: 'png' | 'svg', fileName: string): Promise<unknown> {
  return Plotly.downloadImage(plot, { format, filename: fileName, width: plot.clientWidth || 700, height: plot.clientHeight || 500 });
}

/** JSON with typed arrays written as plain arrays (JSON.stringify would write them as objects). */
export function resultJson(value: unknown): string {
  return JSON.stringify(
    value,
    (_key, item: unknown) => (ArrayBuffer.isView(item) && !(item instanceof DataView) ? Array.from(item as unknown as ArrayLike<number>) : item),
    1,
  );
}
