/**
 * Amplitudes and parameters: mathjs expressions compiled once per model, evaluated per parameter set.
 *
 * Models travel in saved notebooks, exported pages and sweep plans, so an expression is data, not
 * code: it may use numbers, the model's parameters, a few constants, arithmetic and an allow-list
 * of mathematical functions, nothing else. Everything mathjs documents as unsafe for untrusted
 * expressions (`config`, `import`, `createUnit`, `evaluate`, `parse`, `simplify`, `derivative`,
 * `random`, matrix and range allocations, assignments, property access) is refused before it is
 * compiled, with an error naming the field and the function. The instance that compiles them is
 * built from the allowed functions only and reachable from nowhere else, so nothing a model does
 * can change how the next one is evaluated.
 */
import {
  absDependencies, acosDependencies, acoshDependencies, addDependencies, argDependencies, asinDependencies, asinhDependencies,
  atan2Dependencies, atanDependencies, atanhDependencies, cbrtDependencies, ceilDependencies, compileDependencies,
  complexDependencies, conjDependencies, cosDependencies, coshDependencies, cotDependencies, create, cscDependencies,
  divideDependencies, expDependencies, expm1Dependencies, fixDependencies, floorDependencies, hypotDependencies,
  imDependencies, log10Dependencies, log1pDependencies, log2Dependencies, logDependencies, maxDependencies,
  minDependencies, modDependencies, multiplyDependencies, parseDependencies, powDependencies, reDependencies,
  roundDependencies, secDependencies, signDependencies, sinDependencies, sinhDependencies, sqrtDependencies,
  squareDependencies, subtractDependencies, tanDependencies, tanhDependencies, unaryMinusDependencies,
  unaryPlusDependencies, type EvalFunction, type MathNode,
} from 'mathjs';
import { ModelError, valueText } from './errors.js';
import { checkParameterValues } from './parameters.js';
import type { Amplitude, ModelSpec, ParameterValues } from './spec.js';

/** The functions an amplitude may call: arithmetic, elementary functions and complex parts. */
const ALLOWED_FUNCTIONS = {
  abs: absDependencies, acos: acosDependencies, acosh: acoshDependencies, arg: argDependencies, asin: asinDependencies,
  asinh: asinhDependencies, atan: atanDependencies, atan2: atan2Dependencies, atanh: atanhDependencies, cbrt: cbrtDependencies,
  ceil: ceilDependencies, complex: complexDependencies, conj: conjDependencies, cos: cosDependencies, cosh: coshDependencies,
  cot: cotDependencies, csc: cscDependencies, exp: expDependencies, expm1: expm1Dependencies, fix: fixDependencies,
  floor: floorDependencies, hypot: hypotDependencies, im: imDependencies, log: logDependencies, log10: log10Dependencies,
  log1p: log1pDependencies, log2: log2Dependencies, max: maxDependencies, min: minDependencies, mod: modDependencies,
  pow: powDependencies, re: reDependencies, round: roundDependencies, sec: secDependencies, sign: signDependencies,
  sin: sinDependencies, sinh: sinhDependencies, sqrt: sqrtDependencies, square: squareDependencies, tan: tanDependencies,
  tanh: tanhDependencies,
};
export const EXPRESSION_FUNCTIONS: readonly string[] = Object.keys(ALLOWED_FUNCTIONS).sort();
const FUNCTION_NAMES = new Set(EXPRESSION_FUNCTIONS);
/** Operators by mathjs function name: arithmetic only (no ranges, relations, bitwise or logic). */
const ALLOWED_OPERATORS = new Set(['add', 'subtract', 'multiply', 'divide', 'pow', 'unaryMinus', 'unaryPlus', 'mod']);
const ALLOWED_NODES = new Set(['ConstantNode', 'SymbolNode', 'OperatorNode', 'ParenthesisNode', 'FunctionNode']);

const math = create({
  parseDependencies, compileDependencies, addDependencies, subtractDependencies, multiplyDependencies, divideDependencies,
  powDependencies, unaryMinusDependencies, unaryPlusDependencies, ...ALLOWED_FUNCTIONS,
});
const parseExpression = math.parse;
// A second wall: even if a node slipped past the checks below, these names would not run.
const refuse = (name: string) => () => {
  throw new Error(`"${name}" is not available in model expressions`);
};
math.import(Object.fromEntries(['import', 'createUnit', 'evaluate', 'parse', 'compile', 'simplify', 'derivative', 'resolve', 'reviver', 'config', 'chain', 'help'].map((n) => [n, refuse(n)])), { override: true });

/**
 * Longest expression and deepest nesting accepted: far beyond any model's amplitude, and small
 * enough that parsing, checking and evaluating stay well inside the call stack.
 */
export const MAX_EXPRESSION_LENGTH = 2000;
export const MAX_EXPRESSION_DEPTH = 64;

/** Names an expression may use besides the model's parameters. */
const CONSTANTS = new Set(['i', 'pi', 'e', 'sqrt3']);
export const RESERVED_NAMES = CONSTANTS;
const EXTRA_SCOPE = { i: math.complex(0, 1), pi: Math.PI, e: Math.E, sqrt3: Math.sqrt(3) };

/** Evaluates one amplitude for a parameter set: writes (re, im) into out[offset], out[offset+1]. */
export type AmplitudeEvaluator = (values: ParameterValues, out: Float64Array, offset: number) => void;

interface NodeFields {
  type: string;
  name?: string;
  fn?: MathNode | string;
  value?: unknown;
  args?: MathNode[];
  content?: MathNode;
}

/** Refuses anything but numbers, known names, arithmetic and allowed calls, and deep nesting. */
function checkNode(node: MathNode, depth: number, expr: string, field: string, parameters: ReadonlySet<string>): void {
  const n = node as unknown as NodeFields;
  if (depth > MAX_EXPRESSION_DEPTH) throw new ModelError(field, `expression ${valueText(expr.slice(0, 80))} nests deeper than ${MAX_EXPRESSION_DEPTH} levels`);
  if (!ALLOWED_NODES.has(n.type)) {
    throw new ModelError(field, `expression ${valueText(expr)} uses ${describeNode(n)}, which a model may not use (only numbers, parameters, i, pi, e, sqrt3, + - * / ^ and the functions ${EXPRESSION_FUNCTIONS.join(', ')})`);
  }
  if (n.type === 'ConstantNode' && typeof n.value !== 'number') throw new ModelError(field, `expression ${valueText(expr)} contains ${valueText(n.value)}; only numbers are allowed`);
  if (n.type === 'SymbolNode' && !CONSTANTS.has(n.name!) && !parameters.has(n.name!)) {
    throw new ModelError(field, `expression ${valueText(expr)} uses undefined parameter "${n.name}"`);
  }
  if (n.type === 'OperatorNode' && !ALLOWED_OPERATORS.has(n.fn as string)) throw new ModelError(field, `expression ${valueText(expr)} uses the operator "${(n as { op?: string }).op}", which a model may not use`);
  if (n.type === 'FunctionNode') {
    const fn = n.fn as unknown as NodeFields;
    if (fn.type !== 'SymbolNode' || !FUNCTION_NAMES.has(fn.name!)) {
      const name = fn.type === 'SymbolNode' ? fn.name! : 'a computed function';
      throw new ModelError(field, `expression ${valueText(expr)} calls "${name}", which a model may not use (allowed: ${EXPRESSION_FUNCTIONS.join(', ')})`);
    }
  }
  for (const child of n.args ?? []) checkNode(child, depth + 1, expr, field, parameters);
  if (n.content) checkNode(n.content, depth + 1, expr, field, parameters);
}

function describeNode(n: NodeFields): string {
  switch (n.type) {
    case 'AssignmentNode':
    case 'FunctionAssignmentNode':
      return 'an assignment';
    case 'AccessorNode':
    case 'IndexNode':
      return 'indexing or property access';
    case 'ArrayNode':
      return 'a matrix';
    case 'ObjectNode':
      return 'an object';
    case 'RangeNode':
      return 'a range';
    case 'BlockNode':
      return 'several statements';
    default:
      return `a ${n.type.replace(/Node$/, '').toLowerCase()} expression`;
  }
}

function compileScalar(expr: number | string, field: string, parameters: ReadonlySet<string>): EvalFunction | number {
  if (typeof expr === 'number') {
    if (!Number.isFinite(expr)) throw new ModelError(field, `amplitude must be finite. Value: ${expr}`);
    return expr;
  }
  if (typeof expr !== 'string') throw new ModelError(field, `expected a number or an expression string. Value: ${valueText(expr)}`);
  if (expr.length > MAX_EXPRESSION_LENGTH) {
    throw new ModelError(field, `expression is ${expr.length} characters long; the limit is ${MAX_EXPRESSION_LENGTH} (split the term, or give the value as a parameter)`);
  }
  let node: MathNode;
  try {
    node = parseExpression(expr);
  } catch (err) {
    throw new ModelError(field, `cannot parse expression ${valueText(expr)}: ${(err as Error).message}`);
  }
  checkNode(node, 0, expr, field, parameters);
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
  throw new ModelError(field, `expression must give a number. Value: ${valueText(value)}`);
}

/** Compile an amplitude once; the evaluator throws a ModelError naming `field` on NaN or Infinity. */
export function compileAmplitude(amplitude: Amplitude, field: string, parameters: ReadonlySet<string>): AmplitudeEvaluator {
  let parts: [EvalFunction | number, EvalFunction | number];
  if (typeof amplitude === 'number' || typeof amplitude === 'string') {
    parts = [compileScalar(amplitude, field, parameters), 0];
  } else if (amplitude !== null && typeof amplitude === 'object' && 're' in amplitude && 'im' in amplitude) {
    parts = [compileScalar(amplitude.re, `${field}.re`, parameters), compileScalar(amplitude.im, `${field}.im`, parameters)];
  } else {
    throw new ModelError(field, `expected a number, {re, im} or an expression string. Value: ${valueText(amplitude)}`);
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
      throw new ModelError(field, `amplitude ${valueText(amplitude)} is not finite for parameters ${valueText(values)}: (${re}, ${im})`);
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
  return Object.assign(resolved, checkParameterValues(spec, values, 'params'));
}
