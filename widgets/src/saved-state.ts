/**
 * A widget's state as its output carries it (SAVED_WIDGET_MIME): the entry a notebook's saved
 * widget state has for it (the kernel writes the same, kernel/widget-state.ts), and the picture of
 * what its view shows, drawn by the shared rasteriser (snapshot/) on a canvas for its PNG.
 */
import { figureFor } from '../../figures/index.js';
import type { ViewResult, ModelSpecView } from '../../contract/protocol.js';
import { drawFigure } from '../../figures/snapshot/figure.js';
import { packArrays, savedStateEntry } from '../../contract/wire.js';

/** What is read of a widget model here (DiagnosticModel, widget.ts). */
export interface ModelLike {
  readonly model_id: string;
  /** Its widget manager; in JupyterLab, the notebook's (whose `context` is the document's). */
  readonly widget_manager?: unknown;
  get(name: string): unknown;
  get_state(drop_defaults?: boolean): Record<string, unknown>;
}

/** The widget models alive on this page (each registers itself when created). */
const live = new Set<ModelLike>();

export function registerLiveModel(model: ModelLike): void {
  live.add(model);
}

export function forgetLiveModel(model: ModelLike): void {
  live.delete(model);
}

/**
 * The live model `modelId` of one document: copies of a notebook open side by side hold models
 * with the same ids, each in its own notebook's widget manager.
 */
export function liveModel(modelId: string, document: unknown): ModelLike | undefined {
  for (const model of live) {
    if (model.model_id === modelId && (model.widget_manager as { context?: unknown } | undefined)?.context === document) return model;
  }
  return undefined;
}

/** The model's entry for a notebook's widget state: binary buffers inline as base64 beside their paths. */
export function savedEntry(model: ModelLike): Record<string, unknown> {
  const state = { ...model.get_state(false) };
  state.result = packArrays(state.result);
  return savedStateEntry(state);
}

/** A PNG (base64) of the widget's last result as its view draws it, and a line saying what it shows. */
export function viewPicture(model: ModelLike, doc: Document = document): { png: string; text: string } | null {
  const result = model.get('result') as ViewResult | null;
  const spec = model.get('spec') as ModelSpecView | null;
  if (result === null || spec === null || model.get('error')) return null;
  const values = (model.get('result_values') ?? model.get('values')) as Record<string, number>;
  try {
    const figure = figureFor(result, { spec, values, options: (model.get('options') ?? {}) as Record<string, unknown> });
    const pixels = drawFigure(figure);
    const canvas = doc.createElement('canvas');
    canvas.width = pixels.width;
    canvas.height = pixels.height;
    const context = canvas.getContext('2d');
    if (context === null) return null;
    context.putImageData(new ImageData(pixels.rgba, pixels.width, pixels.height), 0, 0);
    const shown = Object.entries(values).map(([k, v]) => `${k} = ${v}`).join(', ');
    return {
      png: canvas.toDataURL('image/png').replace(/^data:image\/png;base64,/, ''),
      text: `${String(model.get('kind'))} widget for model "${spec.name}" (${shown}): ${figure.summary}`,
    };
  } catch {
    return null;
  }
}
