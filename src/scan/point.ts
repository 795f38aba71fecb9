/**
 * The engine's point function: what one point of a phase map computes, from the point's request.
 * The model is compiled once per sweep; each point only re-evaluates the amplitudes for its
 * parameter values, then runs the same diagnostic `compute` would and reads its scalar.
 */
import { BlochHamiltonian, type BlochConvention } from '../bloch/hamiltonian.js';
import { diagnosticOf } from '../diagnostics/registry.js';
import { ModelError } from '../model/errors.js';
import type { ParameterValues } from '../model/spec.js';
import { splitOptionAxis, type PointFunction, type PointTarget } from './sweep.js';

/** Build the point function for a target (a diagnostic request without the swept values). */
export function pointFunction(target: PointTarget): PointFunction {
  const { kind, model, params: fixed = {}, convention, ...options } = target as PointTarget & { convention?: BlochConvention };
  const diagnostic = diagnosticOf(kind, 'quantity');
  const sweep = diagnostic.sweep;
  if (sweep === undefined) throw new ModelError('quantity', `a "${kind}" result has no value per point to sweep`);
  const h = new BlochHamiltonian(model, fixed, { convention: convention ?? 'lattice' });
  return (swept: ParameterValues) => {
    // A swept name is a model parameter, or else an option of the point's request (sweep.ts).
    const params = { ...fixed };
    const request: Record<string, unknown> = { ...options };
    for (const [name, value] of Object.entries(swept)) {
      if (Object.hasOwn(h.spec.parameters, name)) params[name] = value;
      else {
        const [option, key] = splitOptionAxis(name);
        request[option] = key === undefined ? value : { ...(request[option] as object | undefined), [key]: value };
      }
    }
    // The diagnostic runs on the compiled model with its values set (diagnostics/diagnostic.ts).
    return sweep(diagnostic.run(h.setParameters(params), request));
  };
}
