/**
 * Values become MIME bundles here, in the worker where they live. Order of choice:
 *   1. an object that renders itself: a method under `MIME_BUNDLE` returning a bundle (widgets use
 *      this for `application/vnd.jupyter.widget-view+json`);
 *   2. a model description (`format: 'chernel.model'`): a summary table;
 *   3. an engine result (`kind` + `checks`): summary text and HTML, and a plot when plottable;
 *   4. anything else: `util.inspect` text.
 */

import { inspect } from 'node:util';
import type { DisplayOutput, MimeBundle } from '../executor/channel.js';
import { plotFor } from './plots.js';
import { isModelSpec, isResult, modelHtml, modelText, resultHtml, resultText } from './summary.js';
import { PLOTLY_MIME } from '../../widgets/src/protocol.js';

/** Objects with a method under this key display themselves: return a MIME bundle. */
export const MIME_BUNDLE = Symbol.for('chernel.mimeBundle');

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

export function mimeBundle(value: unknown): DisplayOutput {
  if (selfDisplaying(value)) {
    const out = value[MIME_BUNDLE]();
    const bundle: DisplayOutput = 'data' in out && typeof out.data === 'object' && out.data !== null
      ? { data: { ...(out.data as MimeBundle) }, metadata: { ...((out as DisplayOutput).metadata ?? {}) } }
      : { data: { ...out }, metadata: {} };
    if (!('text/plain' in bundle.data)) bundle.data['text/plain'] = plainText(value);
    return bundle;
  }
  if (isModelSpec(value)) return { data: { 'text/plain': modelText(value), 'text/html': modelHtml(value) }, metadata: {} };
  if (isResult(value)) {
    const data: MimeBundle = { 'text/plain': resultText(value), 'text/html': resultHtml(value) };
    const plot = plotFor(value);
    if (plot) {
      data[PLOTLY_MIME] = plot.figure;
      if (plot.fallback) data[plot.fallback.mime] = plot.fallback.data;
    }
    return { data, metadata: {} };
  }
  return { data: { 'text/plain': plainText(value) }, metadata: {} };
}
