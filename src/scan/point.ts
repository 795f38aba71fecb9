/**
 * The engine's point function: what one point of a phase map computes, from the point's request.
 * The model is compiled once per sweep; each point only re-evaluates the amplitudes for its
 * parameter values, then runs the same diagnostic `compute` would.
 */
import { BlochHamiltonian, type BlochConvention } from '../bloch/hamiltonian.js';
import { compute, type DiagnosticRequest } from '../diagnostics.js';
import { ModelError, show } from '../model/errors.js';
import type { ParameterValues } from '../model/spec.js';
import { directGap } from '../spectra/gap.js';
import { chernNumber } from '../topology/chern.js';
import type { PointFunction, PointOutcome, PointTarget } from './sweep.js';

interface Checked {
  checks: { minGap: number | null; coarse?: boolean; converged?: boolean };
}

function outcome(value: number | null, result: Checked): PointOutcome {
  const gap = result.checks.minGap ?? Number.NaN;
  const doubtful = result.checks.coarse === true || result.checks.converged === false;
  return doubtful ? { value, gap, doubtful } : { value, gap };
}

/** Build the point function for a target (a diagnostic request without the swept values). */
export function pointFunction(target: PointTarget): PointFunction {
  const { kind, model, params: fixed = {}, convention, ...options } = target as PointTarget & { convention?: BlochConvention };
  const merged = (swept: ParameterValues): ParameterValues => ({ ...fixed, ...swept });
  switch (kind) {
    case 'chern': {
      const h = new BlochHamiltonian(model, fixed, { convention: convention ?? 'lattice' });
      return (swept) => {
        const r = chernNumber(h, { ...options, params: merged(swept) });
        return outcome(r.chern, r);
      };
    }
    case 'gap': {
      const h = new BlochHamiltonian(model, fixed, { convention: convention ?? 'lattice' });
      return (swept) => {
        const r = directGap(h, { ...options, params: merged(swept) });
        return { value: r.minGap, gap: r.minGap };
      };
    }
    default:
      // Any other invariant: the diagnostic of that kind, whose result names the value after it.
      return (swept) => {
        const request = { ...options, kind, model, convention, params: merged(swept) } as unknown as DiagnosticRequest;
        const r = compute(request) as unknown as Record<string, unknown> & Checked;
        const value = r[kind];
        if (value !== null && typeof value !== 'number') {
          throw new ModelError('invariant', `the "${kind}" diagnostic gave no number in its field "${kind}". Value: ${show(value)}`);
        }
        return outcome(value, r);
      };
  }
}
