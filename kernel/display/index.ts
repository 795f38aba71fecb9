/**
 * Values become outputs here, in the worker where they live. Order of choice:
 *   1. an object that renders itself: a method under `MIME_BUNDLE` returning a bundle (widgets use
 *      this for `application/vnd.jupyter.widget-view+json`);
 *   2. a model description (`format: 'chernel.model'`): a summary table, and a picture of a few
 *      cells of its lattice (sites, bonds by amplitude and phase, the unit cell);
 *   3. an engine result (`kind` + `checks`): a summary (text and HTML) and, when its kind has a
 *      figure (figures/), a second output with the figure: plotly's JSON, which the
 *      lab draws live, and a PNG of it, which every viewer shows (trusted or not, with or without
 *      JavaScript). Two outputs, because a viewer shows one MIME type of each, and the summary's
 *      HTML would hide the picture;
 *   4. anything else: `util.inspect` text.
 */

import { inspect } from 'node:util';
import { resolveParameters, type ModelSpec } from '../../src/index.js';
import { figureFor, hasFigure, type Figure, type FigureContext } from '../../figures/index.js';
import { rasterImage } from '../../figures/picture.js';
import { PLOTLY_MIME, type ViewResult, type ModelSpecView } from '../../contract/protocol.js';
import type { DisplayOutput, MimeBundle } from '../executor/channel.js';
import { latticePicture } from './lattice.js';
import { figurePng } from './pictures.js';
import { isModelSpec, isResult, modelHtml, modelText, resultHtml, resultText, type ResultLike } from './summary.js';

/** Objects with a method under this key display themselves: return a MIME bundle. */
export const MIME_BUNDLE = Symbol.for('chernel.mimeBundle');

/** The request a result was computed for, when the kernel knows it (the cell's `compute` sets it). */
export const REQUEST_OF = Symbol.for('chernel.request');

interface SelfDisplaying {
  [MIME_BUNDLE](): MimeBundle | DisplayOutput;
}

function selfDisplaying(value: unknown): value is SelfDisplaying {
  return typeof value === 'object' && value !== null && typeof (value as Record<symbol, unknown>)[MIME_BUNDLE] === 'function';
}

export function plainText(value: unknown): string {
  if (typeof value === 'string') return inspect(value);
  return inspect(value, { depth: 4, maxArrayLength: 40, maxStringLength: 2000, breakLength: 100, colors: false });
}

/** A spec with nothing in it: figures of results whose model is unknown draw without its units and zone. */
const UNKNOWN_MODEL: ModelSpecView = { format: 'chernel.model', name: '', periodic: 0, vectors: [], orbitals: [], parameters: {} };

function contextOf(result: ResultLike): FigureContext {
  const request = (result as unknown as Record<symbol, unknown>)[REQUEST_OF] as Record<string, unknown> | undefined;
  const model = request?.model as ModelSpec | undefined;
  if (request === undefined || model === undefined || !isModelSpec(model)) return { spec: UNKNOWN_MODEL, values: {}, options: {} };
  let values: Record<string, number> = {};
  try {
    values = resolveParameters(model, (request.params ?? {}) as Record<string, number>);
  } catch {
    // The engine accepted the request, so this does not fail; a figure without the values still draws.
  }
  const { kind: _kind, model: _model, params: _params, ...options } = request;
  return { spec: model as unknown as ModelSpecView, values, options };
}

/** Five significant digits: finer than a screen resolves, and a wide ribbon has tens of thousands of points. */
const round = (v: number): number => (Number.isFinite(v) && v !== 0 ? Number(v.toPrecision(5)) : v);

/** Typed arrays as plain arrays, numbers rounded, getters read: what JSON (the wire, the notebook) holds. */
function plain(value: unknown): unknown {
  if (typeof value === 'number') return round(value);
  if (ArrayBuffer.isView(value) && !(value instanceof DataView)) return Array.from(value as unknown as ArrayLike<number>, round);
  if (Array.isArray(value)) return value.map(plain);
  if (value !== null && typeof value === 'object') return Object.fromEntries(Object.entries(value).map(([k, v]) => [k, plain(v)]));
  return value;
}

/** The figure of a result as plotly JSON: its raster goes in as a layout image, as the widget draws it. */
export function plotlyJson(figure: Figure): { data: unknown; layout: unknown } {
  const layout = figure.raster ? { ...figure.layout, images: [rasterImage(figure.raster)] } : figure.layout;
  return { data: plain(figure.data), layout: plain(layout) };
}

/** The figure output of a result, or null when its kind has none or its shape does not fit. */
export function figureOutput(result: ResultLike): DisplayOutput | null {
  if (!hasFigure(result.kind)) return null;
  let figure: Figure;
  try {
    figure = figureFor(result as unknown as ViewResult, contextOf(result));
  } catch {
    // A result of an older or partial shape: its summary still shows.
    return null;
  }
  return {
    data: {
      [PLOTLY_MIME]: plotlyJson(figure),
      'image/png': figurePng(figure),
      'text/plain': `${result.kind} figure: ${figure.summary}`,
    },
    metadata: {},
  };
}

/** What a value shows as: one output, or two for an engine result with a figure (summary, figure). */
export function displayOutputs(value: unknown): DisplayOutput[] {
  if (selfDisplaying(value)) {
    const out = value[MIME_BUNDLE]();
    const bundle: DisplayOutput = 'data' in out && typeof out.data === 'object' && out.data !== null
      ? { data: { ...(out.data as MimeBundle) }, metadata: { ...((out as DisplayOutput).metadata ?? {}) } }
      : { data: { ...out }, metadata: {} };
    if (!('text/plain' in bundle.data)) bundle.data['text/plain'] = plainText(value);
    return [bundle];
  }
  if (isModelSpec(value)) {
    const summary: DisplayOutput = { data: { 'text/plain': modelText(value), 'text/html': modelHtml(value) }, metadata: {} };
    let lattice: DisplayOutput | null = null;
    try {
      lattice = figureOutput(latticePicture(value as unknown as ModelSpec) as unknown as ResultLike);
    } catch {
      // A model that does not validate shows its summary; using it names the bad field.
    }
    return lattice === null ? [summary] : [summary, lattice];
  }
  if (isResult(value)) {
    const summary: DisplayOutput = { data: { 'text/plain': resultText(value), 'text/html': resultHtml(value) }, metadata: {} };
    const figure = figureOutput(value);
    return figure === null ? [summary] : [summary, figure];
  }
  return [{ data: { 'text/plain': plainText(value) }, metadata: {} }];
}
