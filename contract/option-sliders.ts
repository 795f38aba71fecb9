/**
 * Sliders for request options, not only model parameters: `show(qwz(), {kind: 'local-marker',
 * sizes: [16, 16], optionSliders: {onsiteDisorder: [0, 8], seed: [0, 99, 1]}})` gives the disorder
 * strength a slider over [0, 8] and the seed one over the integers 0..99 (a third number is the
 * step; without one the slider is continuous). Their current values live in the widget's `values`
 * beside the parameter values (names never clash: a model parameter cannot be an option slider),
 * so they sync, save, export and answer "is the saved result current?" exactly as parameters do.
 * The widget's request takes them as options; `optionSliders` itself is the widget's, never the
 * engine's. A name "option.key" is one entry of an object option, as a phase map's axis names it:
 * `{'parameterDisorder.v': [0, 6]}` drags the disorder width of the model parameter v. The kernel
 * and the page both read this module.
 */
import type { ViewRequest, ModelSpecView, WidgetKind } from './protocol.js';

/** The widget option naming the request options that get a slider. */
export const OPTION_SLIDERS = 'optionSliders';

export interface OptionSlider {
  range: [number, number];
  /** The slider's step (1 for an integer option such as `seed`), or null for a continuous one. */
  step: number | null;
}

const isObject = (x: unknown): x is Record<string, unknown> => x !== null && typeof x === 'object' && !Array.isArray(x);

/** The request option a slider name sets, and the key within it for "option.key" (src/scan/sweep.ts reads axes alike). */
function optionPath(name: string): [option: string, key: string | undefined] {
  const dot = name.indexOf('.');
  return dot < 0 ? [name, undefined] : [name.slice(0, dot), name.slice(dot + 1)];
}

/** The value a request holds for a slider name (a number, or an entry of an object option). */
function optionValue(options: Readonly<Record<string, unknown>>, name: string): unknown {
  const [option, key] = optionPath(name);
  const own = options[option];
  return key === undefined ? own : isObject(own) ? own[key] : undefined;
}

/**
 * The first problem of an `optionSliders` value, naming the field, or null. `parameters`: the model's
 * (a parameter already has its slider); `requestFields`: the options the widget's request takes, when
 * known (the page's structural check does not know them; the engine then names a wrong one).
 */
export function optionSlidersProblem(sliders: unknown, parameters: Readonly<Record<string, unknown>>, requestFields?: readonly string[]): string | null {
  if (sliders === undefined) return null;
  if (!isObject(sliders)) return `${OPTION_SLIDERS}: expected an object of option names and [from, to] or [from, to, step]. Value: ${JSON.stringify(sliders)}`;
  for (const [name, spec] of Object.entries(sliders)) {
    const field = `${OPTION_SLIDERS}.${name}`;
    if (Object.hasOwn(parameters, name)) return `${field}: "${name}" is a model parameter, which has its slider already`;
    if (requestFields !== undefined && !requestFields.includes(optionPath(name)[0])) return `${field}: not an option of this widget's request (options: ${requestFields.join(', ')})`;
    if (!Array.isArray(spec) || (spec.length !== 2 && spec.length !== 3) || !spec.every((v) => typeof v === 'number' && Number.isFinite(v))) {
      return `${field}: expected [from, to] or [from, to, step] of finite numbers. Value: ${JSON.stringify(spec)}`;
    }
    if (!(spec[0] < spec[1])) return `${field}: expected from < to. Value: ${JSON.stringify(spec)}`;
    if (spec.length === 3 && !(spec[2] > 0)) return `${field}: expected a positive step. Value: ${JSON.stringify(spec[2])}`;
  }
  return null;
}

/** The sliders of a widget's options (checked already), by option name. */
export function optionSlidersOf(options: Readonly<Record<string, unknown>>): Record<string, OptionSlider> {
  const sliders = options[OPTION_SLIDERS];
  if (!isObject(sliders)) return {};
  const out: Record<string, OptionSlider> = {};
  for (const [name, spec] of Object.entries(sliders)) {
    const [from, to, step] = spec as number[];
    out[name] = { range: [from, to], step: step ?? null };
  }
  return out;
}

/** The problem of a value for a slider (outside its range, off its steps), or null. */
export function optionValueProblem(value: unknown, slider: OptionSlider): string | null {
  if (typeof value !== 'number' || !Number.isFinite(value)) return `must be a finite number. Value: ${JSON.stringify(value)}`;
  const [from, to] = slider.range;
  if (value < from || value > to) return `outside its slider's range [${from}, ${to}]. Value: ${value}`;
  return stepProblem(value, from, slider.step);
}

/** A value off a stepped slider's steps (an integer option such as a seed), or null. */
export function stepProblem(value: number, from: number, step: number | null | undefined): string | null {
  if (step === null || step === undefined) return null;
  const steps = (value - from) / step;
  return Math.abs(steps - Math.round(steps)) > 1e-9 * Math.max(1, Math.abs(steps)) ? `expected ${from} plus a whole number of steps of ${step}. Value: ${value}` : null;
}

/** Where a slider starts when no value is given: the request option's own value, else the low end. */
export function optionStart(name: string, slider: OptionSlider, options: Readonly<Record<string, unknown>>): number {
  const own = optionValue(options, name);
  return typeof own === 'number' ? own : slider.range[0];
}

/**
 * The request options a phase map sweeps as an axis (a disorder strength, say): their values in
 * `values` only place the map's current point (a click on the map sets them), never the request.
 */
export function sweptOptions(options: Readonly<Record<string, unknown>>, parameters: Readonly<Record<string, unknown>>): string[] {
  const axes = options.axes;
  if (!Array.isArray(axes)) return [];
  return axes.map((a) => (isObject(a) ? a.param : undefined)).filter((p): p is string => typeof p === 'string' && !Object.hasOwn(parameters, p));
}

/** The request a widget's values describe: model parameters as `params`, option sliders as options. */
export function widgetRequest(kind: WidgetKind, model: ModelSpecView, options: Readonly<Record<string, unknown>>, values: Readonly<Record<string, number>>): ViewRequest {
  const { [OPTION_SLIDERS]: _own, ...rest } = options;
  // A phase-map widget saved before the rename names its swept kind `invariant`: read as `quantity`.
  if (kind === 'phase-map' && Object.hasOwn(rest, 'invariant') && !Object.hasOwn(rest, 'quantity')) {
    const { invariant, ...renamed } = rest;
    return widgetRequest(kind, model, { ...renamed, quantity: invariant, ...(_own === undefined ? {} : { [OPTION_SLIDERS]: _own }) }, values);
  }
  const sliders = optionSlidersOf(options);
  const swept = sweptOptions(options, model.parameters);
  const params: Record<string, number> = {};
  const chosen: Record<string, unknown> = {};
  for (const [name, value] of Object.entries(values)) {
    if (swept.includes(name)) continue;
    if (!Object.hasOwn(sliders, name)) {
      params[name] = value;
      continue;
    }
    const [option, key] = optionPath(name);
    if (key === undefined) chosen[option] = value;
    else {
      const own = chosen[option] ?? rest[option];
      chosen[option] = { ...(isObject(own) ? own : {}), [key]: value };
    }
  }
  return { ...rest, ...chosen, kind, model, params };
}

/** The values a widget's request was made from (its inverse): parameters and option sliders. */
export function requestValues(options: Readonly<Record<string, unknown>>, request: Readonly<Record<string, unknown>> & { params: Record<string, number> }): Record<string, number> {
  const values = { ...request.params };
  for (const name of Object.keys(optionSlidersOf(options))) {
    const value = optionValue(request, name);
    if (typeof value === 'number') values[name] = value;
  }
  return values;
}
