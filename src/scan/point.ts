/**
 * The engine's point function: what one point of a phase map computes, from the point's request.
 * The model is compiled once per sweep; each point only re-evaluates the amplitudes for its
 * parameter values, then runs the same diagnostic `compute` would.
 */
import { BlochHamiltonian, type BlochConvention } from '../bloch/hamiltonian.js';
import type { ParameterValues } from '../model/spec.js';
import { directGap } from '../spectra/gap.js';
import { chernNumber } from '../topology/chern.js';
import { majoranaNumber, windingNumber } from '../topology/chiral.js';
import { z2Index } from '../topology/z2.js';
import type { PointFunction, PointOutcome, PointTarget } from './sweep.js';

interface Checked {
  checks: { minGap: number | null; coarse?: boolean; converged?: boolean };
}

/** The point's outcome; a result its diagnostic flagged (coarse grid, no convergence) is marked doubtful. */
function outcome(value: number | null, result: Checked): PointOutcome {
  const gap = result.checks.minGap ?? Number.NaN;
  const doubtful = result.checks.coarse === true || result.checks.converged === false;
  return doubtful ? { value, gap, doubtful } : { value, gap };
}

/** Build the point function for a target (a diagnostic request without the swept values). */
export function pointFunction(target: PointTarget): PointFunction {
  const { kind, model, params: fixed = {}, convention, ...options } = target as PointTarget & { convention?: BlochConvention };
  const h = new BlochHamiltonian(model, fixed, { convention: convention ?? 'lattice' });
  const at = (swept: ParameterValues) => ({ ...options, params: { ...fixed, ...swept } });
  switch (kind) {
    case 'chern':
      return (swept) => {
        const r = chernNumber(h, at(swept));
        return outcome(r.chern, r);
      };
    case 'z2':
      return (swept) => {
        const r = z2Index(h, at(swept));
        return outcome(r.z2, r as Checked);
      };
    case 'winding':
      return (swept) => {
        const r = windingNumber(h, at(swept));
        return outcome(r.winding, r);
      };
    case 'majorana':
      return (swept) => {
        const r = majoranaNumber(h, at(swept));
        return outcome(r.majorana, r);
      };
    case 'gap':
      return (swept) => {
        const r = directGap(h, at(swept));
        return { value: r.minGap, gap: r.minGap };
      };
  }
}
