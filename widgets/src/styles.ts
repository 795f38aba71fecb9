/** The widget's stylesheet, added once per document (works in JupyterLab and the exported page). */
const CSS = `
.chernel-widget { font: 13px system-ui, -apple-system, "Segoe UI", sans-serif; color: var(--jp-ui-font-color1, #222);
  border: 1px solid var(--jp-border-color2, #ddd); border-radius: 4px; padding: 8px; max-width: 860px; box-sizing: border-box; }
.chernel-header { display: flex; align-items: baseline; gap: 12px; flex-wrap: wrap; margin-bottom: 6px; }
.chernel-title { font-weight: 600; }
.chernel-summary { font-variant-numeric: tabular-nums; }
.chernel-summary[data-gapless="true"] { color: #a15c00; font-weight: 600; }
.chernel-controls { display: grid; grid-template-columns: repeat(auto-fill, minmax(340px, 1fr)); gap: 4px 20px; margin: 4px 0 8px; }
.chernel-control { display: grid; grid-template-columns: minmax(6.5em, max-content) minmax(80px, 1fr) 5.5em; align-items: center; gap: 6px; min-width: 0; }
.chernel-control-name { white-space: normal; overflow-wrap: anywhere; max-width: 16em; }
.chernel-control-value { width: 100%; box-sizing: border-box; font: inherit; }
.chernel-plot { width: 100%; height: 440px; }
.chernel-plot.chernel-stale { opacity: 0.45; }
.chernel-plot .imagelayer image, .chernel-plot canvas.chernel-preview { image-rendering: pixelated; }
.chernel-plot canvas.chernel-preview { position: absolute; pointer-events: none; }
.chernel-plot.chernel-preview-raster .imagelayer, .chernel-plot.chernel-preview-sketch .scatterlayer { visibility: hidden; }
.chernel-message { display: none; padding: 6px 8px; margin: 4px 0; border-radius: 3px; white-space: pre-wrap; }
.chernel-message[data-level="error"] { display: block; background: #fdecea; color: #8a1c12; border: 1px solid #f5c2bc; }
.chernel-message[data-level="warning"] { display: block; background: #fff6e0; color: #6b4a00; border: 1px solid #f0d9a0; }
.chernel-progress { display: none; align-items: center; gap: 8px; margin: 2px 0 6px; font-variant-numeric: tabular-nums; }
.chernel-progress[data-active] { display: flex; }
.chernel-progress progress { width: 14em; }
.chernel-progress button, .chernel-footer { display: flex; gap: 6px; align-items: center; flex-wrap: wrap; margin-top: 4px; }
.chernel-status { margin-left: auto; color: var(--jp-ui-font-color2, #666); font-size: 12px; }
`;

export function ensureStyles(doc: Document = document): void {
  if (doc.getElementById('chernel-widget-styles')) return;
  const style = doc.createElement('style');
  style.id = 'chernel-widget-styles';
  style.textContent = CSS;
  doc.head.append(style);
}
