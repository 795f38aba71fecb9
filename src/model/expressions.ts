/**
 * Amplitudes and parameters: mathjs expressions compiled once per model, evaluated per parameter set.
 */
import { create, all, type MathNode, type EvalFunction } from 'mathjs';
import { ModelError, show } from './errors.js';
import type { Amplitude, ModelSpec, ParameterValues } from './spec.js';

const math = create(all);

/** Names an expression may use besides the model's parameters. */
const CONSTANTS = new Set(['i', 'pi', 'e', 'sqrt3']);
export const RESERVED_NAMES = CONSTANTS;
const EXTRA_SCOPE = { sqrt3: Math.sqrt(3) };

/** Evaluates one amplitude for a parameter set: writes (re, im) into out[offset], out[offset+1]. */
export type AmplitudeEvaluator = (values: ParameterValues, out: Float64Array, offset: number) => void;

function compileScalar(expr: number | string, field: string, parameters: ReadonlySet<string>): EvalFunction | number {
  if (typeof expr === 'number') {
    if (!Number.isFinite(expr)) throw new ModelError(field, `amplitude must be finite. Value: ${expr}`);
    return expr;
  }
  if (typeof expr !== 'string') throw new ModelError(field, `expected a number or an expression string. Value: ${show(expr)}`);
  let node: MathNode;
  try {
    node = math.parse(expr);
  } catch (err) {
    throw new ModelError(field, `cannot parse expression ${show(expr)}: ${(err as Error).message}`);
  }
  node.traverse((child, _path, parent) => {
    if (child.type !== 'SymbolNode') return;
    const name = (child as unknown as { name: string }).name;
    const isFunctionName = parent !== null && parent.type === 'FunctionNode' && (parent as unknown as { fn: MathNode }).fn === child;
    if (isFunctionName || CONSTANTS.has(name) || parameters.has(name)) return;
    throw new ModelError(field, `expression ${show(expr)} uses undefined parameter "${name}"`);
  });
  return node.compile();
}

function evaluateScalar(compiled: EvalFunction | number, scope: Record<string, number>, field: string): [number, number] {
  if (typeof compiled === 'number') return [compiled, 0];
  let value: unknown;
  try {
    value = compiled.evaluate({ ...EXTRA_SCOPE, ...scope });
  } catch (err) {
    throw new ModelError(field, `cannot evaluate: ${(err as Error).message}`);
  }
  if (typeof value === 'number') return [value, 0];
  if (value !== null && typeof value === 'object' && 're' in value && 'im' in value) {
    const c = value as { re: number; im: number };
    return [c.re, c.im];
  }
  throw new ModelError(field, `expression must give a number. Value: ${show(value)}`);
}

/** Compile an amplitude once; the evaluator throws a ModelError naming `field` on NaN or Infinity. */
export function compileAmplitude(amplitude: Amplitude, field: string, parameters: ReadonlySet<string>): AmplitudeEvaluator {
  let parts: [EvalFunction | number, EvalFunction | number];
  if (typeof amplitude === 'number' || typeof amplitude === 'string') {
    parts = [compileScalar(amplitude, field, parameters), 0];
  } else if (amplitude !== null && typeof amplitude === 'object' && 're' in amplitude && 'im' in amplitude) {
    parts = [compileScalar(amplitude.re, `${field}.re`, parameters), compileScalar(amplitude.im, `${field}.im`, parameters)];
  } else {
    throw new ModelError(field, `expected a number, {re, im} or an expression string. Value: ${show(amplitude)}`);
  }
  const [reExpr, imExpr] = parts;
  if (typeof reExpr === 'number' && typeof imExpr === 'number') {
    return (_values, out, offset) => {
      out[offset] = reExpr;
      out[offset + 1] = imExpr;
    };
  }
  return (values, out, offset) => {
    const [ar, ai] = evaluateScalar(reExpr, values, field);
    const [br, bi] = evaluateScalar(imExpr, values, field);
    const re = ar - bi;
    const im = ai + br;
    if (!Number.isFinite(re) || !Number.isFinite(im)) {
      throw new ModelError(field, `amplitude ${show(amplitude)} is not finite for parameters ${show(values)}: (${re}, ${im})`);
    }
    out[offset] = re;
    out[offset + 1] = im;
  };
}

/**
 * Parameter values with defaults filled in. Unknown names, non-finite values and values outside a
 * declared range are errors that name the parameter.
 */
export function resolveParameters(spec: ModelSpec, values: ParameterValues = {}): ParameterValues {
  const resolved: ParameterValues = {};
  for (const [name, p] of Object.entries(spec.parameters)) resolved[name] = p.default;
  for (const [name, value] of Object.entries(values)) {
    const p = spec.parameters[name];
    if (p === undefined) {
      const known = Object.keys(spec.parameters);
      throw new ModelError(`params.${name}`, `model "${spec.name}" has no parameter "${name}" (it has: ${known.length ? known.join(', ') : 'none'})`);
    }
    if (typeof value !== 'number' || !Number.isFinite(value)) throw new ModelError(`params.${name}`, `must be a finite number. Value: ${show(value)}`);
    if (p.range !== undefined && (value < p.range[0] || value > p.range[1])) {
      throw new ModelError(`params.${name}`, `value ${value} is outside the declared range [${p.range[0]}, ${p.range[1]}]`);
    }
    resolved[name] = value;
  }
  return resolved;
}
