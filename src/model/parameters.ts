/**
 * The one check of a parameter value, with one message per mistake, wherever a value arrives: a
 * request's `params`, a model's defaults, a widget's slider box, a cell's `setValues`, a swept
 * axis. Light (no mathjs), so a page's main thread checks typed values with it too.
 */
import { ModelError, valueText } from './errors.js';
import { didYouMean } from './field-names.js';

export interface ParameterBounds {
  range?: readonly [number, number];
}

/** What is wrong with `value` as a value of a parameter declared as `decl`, or null. */
export function parameterValueProblem(value: unknown, decl: ParameterBounds): string | null {
  if (typeof value !== 'number' || !Number.isFinite(value)) return `must be a finite number. Value: ${valueText(value)}`;
  if (decl.range !== undefined && (value < decl.range[0] || value > decl.range[1])) {
    return `outside its declared range [${decl.range[0]}, ${decl.range[1]}]. Value: ${value}`;
  }
  return null;
}

/** Values of a model's parameters, checked (names, finite numbers, ranges); errors name `${field}.${name}`. */
export function checkParameterValues(
  model: { name: string; parameters: Readonly<Record<string, ParameterBounds>> },
  values: unknown,
  field: string,
): Record<string, number> {
  if (values === null || typeof values !== 'object' || Array.isArray(values)) throw new ModelError(field, `expected an object of parameter values. Value: ${valueText(values)}`);
  const checked: Record<string, number> = {};
  for (const [name, value] of Object.entries(values)) {
    // Own properties only: "toString" or "constructor" must not find Object.prototype's.
    const decl = Object.hasOwn(model.parameters, name) ? model.parameters[name] : undefined;
    if (decl === undefined) {
      const known = Object.keys(model.parameters);
      throw new ModelError(`${field}.${name}`, `model "${model.name}" has no parameter ${JSON.stringify(name)}${didYouMean(name, known)} (it has: ${known.length ? known.join(', ') : 'none'})`);
    }
    const problem = parameterValueProblem(value, decl);
    if (problem !== null) throw new ModelError(`${field}.${name}`, problem);
    checked[name] = value as number;
  }
  return checked;
}
