/**
 * The runtime of an exported notebook page (cli/export-html.ts writes the page): the saved
 * widget state is loaded into an HTMLManager, each widget-view tag becomes a live view, and the
 * controls keep recomputing in the page's own engine worker. No kernel, works from file://.
 */
import { HTMLManager } from '@jupyter-widgets/html-manager/lib/htmlmanager.js';
import Plotly, { TRACE_TYPES, type Data, type Layout } from './plotly.js';
import { PLOTLY_MIME, WIDGET_STATE_MIME, WIDGET_VIEW_MIME } from '../../contract/protocol.js';
import { WIDGET_MODULE } from '../../contract/protocol.js';
import { DiagnosticModel, DiagnosticView } from './widget.js';

function failure(where: Element, message: string): void {
  const box = document.createElement('div');
  box.className = 'chernel-message';
  box.dataset.level = 'error';
  box.textContent = message;
  where.replaceWith(box);
}

export async function renderSavedWidgets(root: ParentNode = document): Promise<number> {
  const stateTag = root.querySelector(`script[type="${WIDGET_STATE_MIME}"]`);
  if (stateTag === null) return 0;
  const manager = new HTMLManager({
    loader: async (moduleName: string, moduleVersion: string) => {
      if (moduleName === WIDGET_MODULE) return { DiagnosticModel, DiagnosticView };
      throw new Error(`this page carries no widget module "${moduleName}" (${moduleVersion})`);
    },
  });
  const models = await manager.set_state(JSON.parse(stateTag.textContent ?? '{}'));
  let shown = 0;
  for (const tag of Array.from(root.querySelectorAll(`script[type="${WIDGET_VIEW_MIME}"]`))) {
    const { model_id: modelId } = JSON.parse(tag.textContent ?? '{}') as { model_id?: string };
    const model = models.find((m) => m.model_id === modelId);
    if (model === undefined) {
      failure(tag, `widget ${modelId ?? '(no id)'} was not saved with the notebook`);
      continue;
    }
    const host = document.createElement('div');
    host.className = 'widget-subarea';
    tag.before(host);
    try {
      const view = await manager.create_view(model);
      await manager.display_view(view, host);
      shown++;
    } catch (err) {
      failure(host, `widget ${modelId} could not be shown: ${(err as Error).message}`);
    }
  }
  return shown;
}

/** Static plotly outputs of the notebook (engine results a cell displayed): drawn, not live. */
export async function renderSavedPlots(root: ParentNode = document): Promise<number> {
  let drawn = 0;
  for (const tag of Array.from(root.querySelectorAll(`script[type="${PLOTLY_MIME}"]`))) {
    const host = document.createElement('div');
    host.className = 'chernel-saved-plot';
    tag.before(host);
    try {
      const figure = JSON.parse(tag.textContent ?? '{}') as { data?: Data[]; layout?: Partial<Layout> };
      const missing = (figure.data ?? []).map((t) => (t as { type?: string }).type ?? 'scatter').filter((t) => !TRACE_TYPES.has(t));
      if (missing.length > 0) throw new Error(`trace types not in this page's plotly: ${missing.join(', ')}`);
      await Plotly.newPlot(host, figure.data ?? [], figure.layout ?? {}, { displaylogo: false, responsive: true });
      tag.parentElement?.querySelector('.plotly-fallback')?.remove();
      drawn++;
    } catch {
      // A trace type this lean plotly lacks: the static fallback beside it stays.
      Plotly.purge(host);
      host.remove();
    }
  }
  return drawn;
}

declare global {
  interface Window {
    chernelWidgets?: { ready: Promise<number>; plots: Promise<number> };
  }
}

window.chernelWidgets = { ready: renderSavedWidgets(), plots: renderSavedPlots() };
