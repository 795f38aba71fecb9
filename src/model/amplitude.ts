/**
 * Arithmetic on amplitudes (numbers, {re, im}, or mathjs expressions of parameters) that keeps the
 * result an amplitude: numeric parts are combined exactly, anything symbolic becomes an expression
 * string that mathjs evaluates later. Used by the builder and the model builders, never per k.
 */
import type { Amplitude } from './spec.js';

/** (re, im) of an amplitude that is a fixed number, otherwise null. */
export function numericValue(a: Amplitude): [number, number] | null {
  if (typeof a === 'number') return [a, 0];
  if (typeof a === 'object' && a !== null && typeof a.re === 'number' && typeof a.im === 'number') return [a.re, a.im];
  return null;
}

/** A fixed complex number as the simplest amplitude that holds it. */
export function fromComplex(re: number, im: number): Amplitude {
  const r = re === 0 ? 0 : re; // no -0 in saved models
  const i = im === 0 ? 0 : im;
  return i === 0 ? r : { re: r, im: i };
}

/** Whether an amplitude is exactly the number zero. */
export function isZero(a: Amplitude): boolean {
  const v = numericValue(a);
  return v !== null && v[0] === 0 && v[1] === 0;
}

/** The amplitude as a parenthesised mathjs expression. */
export function asExpression(a: Amplitude): string {
  const v = numericValue(a);
  if (v !== null) return v[1] === 0 ? `(${v[0]})` : `complex(${v[0]}, ${v[1]})`;
  if (typeof a === 'string') return `(${a})`;
  const c = a as { re: number | string; im: number | string };
  return `((${c.re}) + i*(${c.im}))`;
}

export function addAmplitudes(a: Amplitude, b: Amplitude): Amplitude {
  if (isZero(a)) return b;
  if (isZero(b)) return a;
  const x = numericValue(a);
  const y = numericValue(b);
  if (x !== null && y !== null) return fromComplex(x[0] + y[0], x[1] + y[1]);
  return `${asExpression(a)} + ${asExpression(b)}`;
}

export function multiplyAmplitudes(a: Amplitude, b: Amplitude): Amplitude {
  const x = numericValue(a);
  const y = numericValue(b);
  if (x !== null && y !== null) return fromComplex(x[0] * y[0] - x[1] * y[1], x[0] * y[1] + x[1] * y[0]);
  if ((x !== null && x[0] === 0 && x[1] === 0) || (y !== null && y[0] === 0 && y[1] === 0)) return 0;
  if (x !== null && x[0] === 1 && x[1] === 0) return b;
  if (y !== null && y[0] === 1 && y[1] === 0) return a;
  if (y !== null && y[0] === -1 && y[1] === 0) return `-${asExpression(a)}`;
  if (x !== null && x[0] === -1 && x[1] === 0) return `-${asExpression(b)}`;
  return `${asExpression(a)} * ${asExpression(b)}`;
}

/** Multiply by a fixed complex number (re, im). */
export function scaleAmplitude(a: Amplitude, re: number, im = 0): Amplitude {
  return multiplyAmplitudes(a, fromComplex(re, im));
}

/** Complex conjugate; parameters are real, so conj(expression) is exact. */
export function conjugateAmplitude(a: Amplitude): Amplitude {
  const v = numericValue(a);
  if (v !== null) return fromComplex(v[0], -v[1]);
  if (typeof a === 'string') return `conj(${a})`;
  const c = a as { re: number | string; im: number | string };
  return { re: c.re, im: typeof c.im === 'number' ? -c.im : `-(${c.im})` };
}

export function negateAmplitude(a: Amplitude): Amplitude {
  return scaleAmplitude(a, -1);
}

/** e^{i phase} times the amplitude (a Peierls factor), keeping numbers numeric. */
export function withPhase(a: Amplitude, phase: number): Amplitude {
  if (phase === 0) return a;
  const c = Math.cos(phase);
  const s = Math.sin(phase);
  // Snap rounding noise so that e.g. e^{i pi} stays exactly -1 in saved models.
  const snap = (x: number): number => (Math.abs(x) < 1e-15 ? 0 : Math.abs(Math.abs(x) - 1) < 1e-15 ? Math.sign(x) : x);
  return scaleAmplitude(a, snap(c), snap(s));
}
