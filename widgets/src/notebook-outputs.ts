/**
 * What chernel adds to every notebook in JupyterLab, beside the widget classes:
 *   - plotly figures (the kernel's engine results) drawn live;
 *   - widget outputs whose view survives a change of the output's data: the output keeps the
 *     widget's state and picture current (below), and the widget manager's renderer would build
 *     a new view (losing zoom, focus and a drag in progress) on every such change;
 *   - widgets restored from their own outputs: the kernel puts each widget's state in its output
 *     (SAVED_WIDGET_MIME), so a notebook saved with the lab's default settings ("save widget state"
 *     off) reopens with live widgets. On opening, those states are handed to the widget manager
 *     through the notebook's widget-state metadata, which it reads once its kernel is ready, and
 *     taken out again before the notebook is saved;
 *   - on save, each live widget's output is brought up to date: its state and a PNG of what it
 *     shows, so an untrusted copy, nbconvert and viewers without JavaScript show the last picture.
 */
import type { JupyterFrontEnd } from '@jupyterlab/application';
import type { DocumentRegistry } from '@jupyterlab/docregistry';
import type { IRenderMime } from '@jupyterlab/rendermime-interfaces';
import { Widget } from '@lumino/widgets';
import type { Message } from '@lumino/messaging';
import Plotly, { type Data, type Layout } from './plotly.js';
import { PLOTLY_MIME, SAVED_WIDGET_MIME, WIDGET_STATE_MIME, WIDGET_VIEW_MIME } from '../../contract/protocol.js';
import { liveModel, savedEntry, viewPicture } from './saved-state.js';

/** Renderer ranks (lower wins): before the widget manager's own (-10), before HTML (50) and images (90). */
const WIDGET_OUTPUT_RANK = -20;
const PLOTLY_RANK = 40;

/** The parts of JupyterLab's registry and models used here (their packages are the lab's own). */
interface RenderMimeLike {
  addFactory(factory: IRenderMime.IRendererFactory, rank?: number): void;
  createRenderer(mimeType: string): IRenderMime.IRenderer;
}
interface OutputLike {
  data: Readonly<Record<string, unknown>>;
  setData(options: { data?: Record<string, unknown> }): void;
}
interface CellLike {
  type: string;
  outputs?: { length: number; get(index: number): OutputLike };
}
interface NotebookModelLike {
  cells: Iterable<CellLike>;
  dirty: boolean;
  getMetadata(key: string): unknown;
  setMetadata(key: string, value: unknown): void;
  deleteMetadata(key: string): void;
}

type Json = Record<string, unknown>;

/** A plotly figure output, drawn once the output is on the page. */
class PlotlyOutput extends Widget implements IRenderMime.IRenderer {
  private figure: { data: Data[]; layout: Partial<Layout> } | null = null;

  constructor() {
    super();
    this.addClass('chernel-saved-plot');
    this.node.style.width = '100%';
    this.node.style.minHeight = '420px';
  }

  renderModel(model: IRenderMime.IMimeModel): Promise<void> {
    const figure = model.data[PLOTLY_MIME] as { data?: Data[]; layout?: Partial<Layout> } | undefined;
    this.figure = { data: figure?.data ?? [], layout: figure?.layout ?? {} };
    return this.isAttached ? this.draw() : Promise.resolve();
  }

  protected override onAfterAttach(msg: Message): void {
    super.onAfterAttach(msg);
    void this.draw();
  }

  override dispose(): void {
    if (this.isDisposed) return;
    Plotly.purge(this.node);
    super.dispose();
  }

  private async draw(): Promise<void> {
    if (this.figure === null) return;
    const { width: _w, height: _h, ...layout } = this.figure.layout as Partial<Layout> & { width?: unknown; height?: unknown };
    await Plotly.react(this.node, this.figure.data, { ...layout, autosize: true, height: 440 }, { responsive: true, displaylogo: false });
  }
}

/**
 * The widget manager's renderer for a widget output, made to keep its view when the output's data
 * changes but its widget does not (the output area reuses a renderer and calls renderModel again).
 * Only a view on show is kept: the renderer retries through renderModel itself while the manager
 * restores its models.
 */
function keepingView(renderer: IRenderMime.IRenderer): IRenderMime.IRenderer {
  const render = renderer.renderModel.bind(renderer);
  const views = renderer as unknown as { widgets?: readonly unknown[] };
  let shown: string | null = null;
  renderer.renderModel = (model: IRenderMime.IMimeModel) => {
    const id = (model.data[WIDGET_VIEW_MIME] as { model_id?: string } | undefined)?.model_id ?? null;
    if (id !== null && id === shown && (views.widgets?.length ?? 0) > 0) return Promise.resolve();
    shown = id;
    return render(model);
  };
  return renderer;
}

function* outputs(model: NotebookModelLike): Generator<OutputLike> {
  for (const cell of model.cells) {
    if (cell.type !== 'code' || !cell.outputs) continue;
    for (let i = 0; i < cell.outputs.length; i++) yield cell.outputs.get(i);
  }
}

function widgetStateOf(model: NotebookModelLike): { version_major: number; version_minor: number; state: Record<string, Json> } {
  const saved = (model.getMetadata('widgets') as Json | undefined)?.[WIDGET_STATE_MIME] as { state?: Record<string, Json> } | undefined;
  return { version_major: 2, version_minor: 0, ...(saved ?? {}), state: { ...(saved?.state ?? {}) } };
}

/** Hands the states carried by widget outputs to the widget manager; returns the model ids handed. */
export function restoreFromOutputs(model: NotebookModelLike): string[] {
  const metadata = widgetStateOf(model);
  const handed: string[] = [];
  for (const output of outputs(model)) {
    const saved = output.data[SAVED_WIDGET_MIME] as Json | undefined;
    const modelId = (output.data[WIDGET_VIEW_MIME] as { model_id?: unknown } | undefined)?.model_id;
    if (saved === undefined || typeof modelId !== 'string' || modelId === '') continue;
    // The output's copy is kept current on every save (below); it wins over older metadata.
    const { model_id: _id, ...entry } = saved;
    metadata.state[modelId] = entry;
    handed.push(modelId);
  }
  if (handed.length > 0) {
    const wasDirty = model.dirty;
    model.setMetadata('widgets', { ...((model.getMetadata('widgets') as Json | undefined) ?? {}), [WIDGET_STATE_MIME]: metadata });
    model.dirty = wasDirty;
  }
  return handed;
}

/** Takes the handed states out of the metadata again (the outputs carry them). */
function withdraw(model: NotebookModelLike, handed: string[]): void {
  const widgets = model.getMetadata('widgets') as Json | undefined;
  const metadata = widgets?.[WIDGET_STATE_MIME] as { state?: Record<string, Json> } | undefined;
  if (!metadata?.state) return;
  const state = { ...metadata.state };
  for (const id of handed) delete state[id];
  const rest = { ...widgets };
  if (Object.keys(state).length > 0) rest[WIDGET_STATE_MIME] = { ...metadata, state };
  else delete rest[WIDGET_STATE_MIME];
  if (Object.keys(rest).length > 0) model.setMetadata('widgets', rest);
  else model.deleteMetadata('widgets');
}

/**
 * Brings every live widget's output up to date: its state and the picture of what it shows.
 * `document` is the notebook's context (its widget manager's).
 */
export function refreshOutputs(model: NotebookModelLike, document: unknown): number {
  let refreshed = 0;
  for (const output of outputs(model)) {
    const modelId = (output.data[WIDGET_VIEW_MIME] as { model_id?: unknown } | undefined)?.model_id;
    if (!(SAVED_WIDGET_MIME in output.data) || typeof modelId !== 'string') continue;
    const widget = liveModel(modelId, document);
    if (widget === undefined) continue;
    const data: Record<string, unknown> = { ...output.data, [SAVED_WIDGET_MIME]: { model_id: modelId, ...savedEntry(widget) } };
    const picture = viewPicture(widget);
    if (picture !== null) data['image/png'] = picture.png;
    if (picture !== null) data['text/plain'] = picture.text;
    output.setData({ data });
    refreshed++;
  }
  return refreshed;
}

function attach(panel: Widget, context: DocumentRegistry.IContext<DocumentRegistry.IModel>): void {
  const rendermime = (panel as unknown as { content: { rendermime: RenderMimeLike } }).content.rendermime;
  rendermime.addFactory({ safe: false, mimeTypes: [PLOTLY_MIME], createRenderer: () => new PlotlyOutput() }, PLOTLY_RANK);
  rendermime.addFactory({ safe: false, mimeTypes: [SAVED_WIDGET_MIME], createRenderer: () => keepingView(rendermime.createRenderer(WIDGET_VIEW_MIME)) }, WIDGET_OUTPUT_RANK);
  const model = context.model as unknown as NotebookModelLike;
  let handed: string[] = [];
  // Populated before the session starts; the widget manager reads the metadata after its kernel is ready.
  void context.ready.then(() => {
    handed = restoreFromOutputs(model);
  });
  // Connected before the widget manager's own handler (made once the kernel is ready), so with
  // "save widget state" on, the manager writes the full state after this.
  context.saveState.connect((_, state) => {
    if (state === 'started') {
      refreshOutputs(model, context);
      withdraw(model, handed);
    } else {
      // Saved (or not): hand them over again, for a widget manager still to restore (its kernel
      // not yet ready) or restoring again (a restarted kernel).
      handed = restoreFromOutputs(model);
    }
  });
}

/** Watches every notebook the lab opens. */
export function watchNotebooks(app: JupyterFrontEnd): void {
  app.docRegistry.addWidgetExtension('Notebook', {
    createNew(panel, context) {
      attach(panel, context);
    },
  });
}
