/**
 * The synced state of chernel's widgets as the kernel writes it: the `jupyter.widget` comm's state
 * (model description, parameter values, options, result with typed arrays packed for binary
 * buffers), and the same state as a notebook saves it. Kept apart from kernel/widgets.ts, whose
 * exports are what a cell sees.
 */

import { resolveParameters, type ModelSpec } from '../src/index.js';
import { didYouMean } from '../src/model/field-names.js';
import { checkParameterValues } from '../src/model/parameters.js';
import { requestFields } from '../src/request.js';
import type { SweepQuantity } from '../src/scan/sweep.js';
import { WIDGET_MODEL_NAME, WIDGET_MODULE, WIDGET_MODULE_RANGE, WIDGET_VIEW_NAME, type WidgetKind } from '../contract/protocol.js';
import { packArrays } from '../contract/wire.js';
import { OPTION_SLIDERS, optionSlidersOf, optionSlidersProblem, optionStart, optionValueProblem, sweptOptions } from '../contract/option-sliders.js';

export type Values = Record<string, number>;
export type Result = Record<string, unknown> & { kind: string };

export interface WidgetOptions {
  /** What to draw (default 'curvature'). */
  kind?: WidgetKind;
  /** Starting parameter values (defaults from the model for the rest), and option slider values. */
  values?: Values;
  /** Request options that get a slider: `{onsiteDisorder: [0, 8], seed: [0, 99, 1]}` ([from, to, step?]). */
  optionSliders?: Record<string, [number, number] | [number, number, number]>;
  title?: string;
  /** Everything else is passed to the engine with the request: grid, bands, path, axes, ... */
  [option: string]: unknown;
}

export class WidgetOptionError extends Error {
  constructor(field: string, message: string) {
    super(`${field}: ${message}`);
    this.name = 'WidgetOptionError';
  }
}

/** The widget's own options; the rest are its diagnostic's request fields (src/request.ts). */
const OWN_OPTIONS = ['kind', 'values', 'title', OPTION_SLIDERS];

/**
 * Checks the names of `show(model, options)` options: the widget's own and those of the request it
 * computes (the flow widget also takes `invariant: 'z2'`). A misspelt one names the closest.
 */
export function checkWidgetOptions(kind: WidgetKind, options: Record<string, unknown>): void {
  const request = requestFields(kind, options.quantity as SweepQuantity | undefined).filter((f) => f !== 'kind' && f !== 'model' && f !== 'params');
  const valid = [...OWN_OPTIONS, ...request, ...(kind === 'wannier-flow' ? ['invariant'] : [])];
  for (const key of Object.keys(options)) {
    if (valid.includes(key)) continue;
    const hint = key === 'params' ? '; parameter values go in "values"' : didYouMean(key, valid);
    throw new WidgetOptionError(key, `unknown option for a "${kind}" widget${hint} (valid: ${valid.join(', ')})`);
  }
}

/** The values a new widget's controls start at: every parameter (model defaults for the rest) and every option slider. */
export function startValues(spec: ModelSpec, options: Record<string, unknown>, values: unknown): Values {
  const controlled = checkControlValues(spec, options, values, 'values', true);
  const params = Object.fromEntries(Object.entries(controlled).filter(([name]) => Object.hasOwn(spec.parameters, name)));
  return { ...resolveParameters(spec, params), ...controlled };
}

/** Checks `optionSliders` against the model and the request's options (field names in the message). */
export function checkOptionSliders(kind: WidgetKind, spec: ModelSpec, options: Record<string, unknown>): void {
  const request = requestFields(kind, options.quantity as SweepQuantity | undefined).filter((f) => f !== 'kind' && f !== 'model' && f !== 'params');
  const problem = optionSlidersProblem(options[OPTION_SLIDERS], spec.parameters, request);
  if (problem !== null) {
    const cut = problem.indexOf(': ');
    throw new WidgetOptionError(problem.slice(0, cut), problem.slice(cut + 2));
  }
}

/**
 * Checks the values the controls show: the model's parameter values (names, ranges) and those of
 * the option sliders (ranges, steps). `start`: fill in the option sliders not given.
 */
export function checkControlValues(spec: ModelSpec, options: Record<string, unknown>, values: unknown, field: string, start = false): Values {
  // Not an object of values: the engine's own message.
  if (values === null || typeof values !== 'object' || Array.isArray(values)) return checkParameterValues(spec, values, field);
  const sliders = optionSlidersOf(options);
  const params: Record<string, unknown> = {};
  const chosen: Values = {};
  const swept = sweptOptions(options, spec.parameters);
  for (const [name, value] of Object.entries(values)) {
    if (swept.includes(name)) {
      // A phase map's current point along a swept option (contract/option-sliders.ts).
      if (typeof value !== 'number' || !Number.isFinite(value)) throw new WidgetOptionError(`${field}.${name}`, `must be a finite number. Value: ${JSON.stringify(value)}`);
      chosen[name] = value;
      continue;
    }
    if (!Object.hasOwn(sliders, name)) {
      params[name] = value;
      continue;
    }
    const problem = optionValueProblem(value, sliders[name]);
    if (problem !== null) throw new WidgetOptionError(`${field}.${name}`, problem);
    chosen[name] = value as number;
  }
  const checked = checkParameterValues(spec, params, field);
  if (start) {
    for (const [name, slider] of Object.entries(sliders)) {
      if (name in chosen) continue;
      const value = optionStart(name, slider, options);
      const problem = optionValueProblem(value, slider);
      if (problem !== null) throw new WidgetOptionError(name, `the request's value does not fit its slider: ${problem}`);
      chosen[name] = value;
    }
  }
  return { ...checked, ...chosen };
}

/** The widget's synced state before buffers are lifted out. */
export function widgetState(fields: {
  kind: WidgetKind;
  spec: ModelSpec;
  options: Record<string, unknown>;
  values: Values;
  result: Result | null;
  error: string;
  title: string;
}): Record<string, unknown> {
  return {
    _model_name: WIDGET_MODEL_NAME,
    _model_module: WIDGET_MODULE,
    // The semver range of the front-end module the state is written for.
    _model_module_version: WIDGET_MODULE_RANGE,
    _view_name: WIDGET_VIEW_NAME,
    _view_module: WIDGET_MODULE,
    _view_module_version: WIDGET_MODULE_RANGE,
    _view_count: null,
    _dom_classes: [],
    tabbable: null,
    tooltip: null,
    title: fields.title,
    kind: fields.kind,
    spec: fields.spec,
    // A saved notebook's JSON has its keys sorted; this keeps the model's own parameter order.
    parameter_order: Object.keys(fields.spec.parameters),
    options: fields.options,
    values: fields.values,
    result: fields.result === null ? null : packArrays(fields.result),
    result_values: fields.result === null ? null : fields.values,
    error: fields.error,
  };
}

export { savedStateEntry } from '../contract/wire.js';

/** Checks a parameter update against the model: known names, finite numbers, declared ranges. */
export function checkValues(spec: ModelSpec, values: unknown, field = 'values'): Values {
  return checkParameterValues(spec, values, field);
}
