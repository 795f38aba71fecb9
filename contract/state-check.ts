/**
 * Is a diagnostic widget's saved state whole? A notebook or page may carry state that was truncated,
 * edited, or written by another version; the widget then says what is wrong when it loads, and
 * `chernel export-html` refuses to embed it silently. Structural checks only (no model compilation),
 * so the page's main thread can run them; export-html also validates the model itself.
 */
import { WIDGET_KINDS } from './protocol.js';
import { optionSlidersOf, optionSlidersProblem, sweptOptions } from './option-sliders.js';

const BYTES: Readonly<Record<string, number>> = { float64: 8, float32: 4, int32: 4, uint32: 4, int16: 2, uint16: 2, int8: 1, uint8: 1 };

/** DiagnosticModel's defaults (widget.ts) for the fields checked here. */
const SAVED_DEFAULTS: Readonly<Record<string, unknown>> = { kind: 'curvature', spec: null, options: {}, values: {}, result: null };

const isObject = (x: unknown): x is Record<string, unknown> => x !== null && typeof x === 'object' && !Array.isArray(x) && !ArrayBuffer.isView(x);

function byteLength(buffer: unknown): number | null {
  if (buffer instanceof ArrayBuffer) return buffer.byteLength;
  if (ArrayBuffer.isView(buffer)) return buffer.byteLength;
  return null;
}

/** The first packed array in `value` whose buffer is missing or of the wrong size, as a problem. */
function arrayProblem(value: unknown, path: string): string | null {
  if (Array.isArray(value)) {
    for (const [i, item] of value.entries()) {
      const problem = arrayProblem(item, `${path}[${i}]`);
      if (problem) return problem;
    }
    return null;
  }
  if (!isObject(value)) return null;
  if (typeof value.dtype === 'string' && Array.isArray(value.shape)) {
    const size = BYTES[value.dtype];
    if (size === undefined) return `${path}: unknown array type ${JSON.stringify(value.dtype)}`;
    const count = value.shape.reduce((a: number, b: unknown) => a * (typeof b === 'number' ? b : NaN), 1);
    const bytes = byteLength(value.buffer);
    if (bytes === null) return `${path}: the array's binary buffer is missing`;
    // More is allowed: a widget manager saves a view's whole underlying buffer (wire.ts reads the shape's share).
    if (!(bytes >= count * size)) return `${path}: the buffer holds ${bytes} bytes, the array needs ${count * size} (${value.dtype} x ${JSON.stringify(value.shape)})`;
    return null;
  }
  for (const [key, item] of Object.entries(value)) {
    const problem = arrayProblem(item, `${path}.${key}`);
    if (problem) return problem;
  }
  return null;
}

/**
 * The first problem of a diagnostic widget's state (buffers in place, as packed arrays or already
 * unpacked typed arrays), or null when it can be drawn and recomputed.
 */
export function diagnosticStateProblem(saved: unknown): string | null {
  if (!isObject(saved)) return 'the saved state is not an object';
  // Widget managers save state without the fields that equal the model's defaults (drop_defaults).
  const state = { ...SAVED_DEFAULTS, ...saved };
  if (!(WIDGET_KINDS as readonly unknown[]).includes(state.kind)) return `kind: expected one of ${WIDGET_KINDS.join(', ')}. Value: ${JSON.stringify(state.kind)}`;
  const spec = state.spec;
  if (!isObject(spec)) return 'spec: the model description is missing';
  if (spec.format !== 'chernel.model') return `spec.format: expected "chernel.model". Value: ${JSON.stringify(spec.format)}`;
  if (!Array.isArray(spec.orbitals) || spec.orbitals.length === 0) return 'spec.orbitals: missing or empty';
  if (!Array.isArray(spec.terms)) return 'spec.terms: missing';
  if (!isObject(spec.parameters)) return 'spec.parameters: missing';
  if (!isObject(state.values)) return 'values: missing';
  if (state.options !== undefined && !isObject(state.options)) return 'options: expected an object';
  // Request options with a slider keep their values beside the parameters' (option-sliders.ts).
  const sliderProblem = optionSlidersProblem(state.options?.optionSliders, spec.parameters);
  if (sliderProblem !== null) return `options.${sliderProblem}`;
  const sliders = optionSlidersOf(state.options ?? {});
  const swept = sweptOptions(state.options ?? {}, spec.parameters);
  for (const [name, value] of Object.entries(state.values)) {
    if (typeof value !== 'number' || !Number.isFinite(value)) return `values.${name}: expected a finite number. Value: ${JSON.stringify(value)}`;
    if (!Object.hasOwn(spec.parameters, name) && !Object.hasOwn(sliders, name) && !swept.includes(name)) return `values.${name}: not a parameter of the saved model`;
  }
  const result = state.result;
  if (result === null || result === undefined) return null;
  if (!isObject(result) || typeof result.kind !== 'string') return 'result: expected a result object with a kind';
  return arrayProblem(result, 'result');
}
