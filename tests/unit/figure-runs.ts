// A figure from a real engine result, as a widget draws it: the model's default values with some
// changed, the view's request computed by the engine, the figure and its traces.
import type { ViewResult, ModelSpecView } from '../../contract/protocol.js';
import { figureFor, type FigureContext } from '../../figures/index.js';
import { computeView } from '../../src/views.js';

export type Trace = Record<string, unknown> & { name?: string; type?: string };

export function runFigure(spec: ModelSpecView, kind: string, options: Record<string, unknown>, params: Record<string, number> = {}) {
  const values = { ...Object.fromEntries(Object.entries(spec.parameters).map(([k, p]) => [k, p.default])), ...params };
  const result = computeView({ ...options, kind, model: spec, params: values }) as unknown as ViewResult;
  const ctx: FigureContext = { spec, values, options };
  const figure = figureFor(result, ctx);
  return { result, ctx, figure, traces: figure.data as Trace[] };
}
