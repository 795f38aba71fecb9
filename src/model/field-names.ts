/**
 * Field names: every object a user writes (a model description, a request) is checked for fields it
 * does not know, and an unknown one is an error naming it and the closest valid name. A misspelt
 * option (`gird`, `tolerence`) would otherwise be ignored and the default used in silence.
 */
import { ModelError } from './errors.js';
import type { ModelSpec } from './spec.js';

/** Exactly the keys of T (each listed once, none extra): the compiler checks such a table. */
export type Exact<T> = { readonly [K in keyof Required<T>]: true };
export const keys = <T>(table: Exact<T>): readonly string[] => Object.keys(table);

export const isObject = (x: unknown): x is Record<string, unknown> => x !== null && typeof x === 'object' && !Array.isArray(x);

/** Fields of a model description and of its parts. */
export const MODEL_FIELDS = {
  model: keys<ModelSpec>({ format: true, version: true, name: true, periodic: true, vectors: true, orbitals: true, parameters: true, terms: true, doc: true }),
  orbital: ['label', 'position', 'spin', 'nambu', 'layer'],
  parameter: ['default', 'range', 'unit', 'doc'],
  term: ['from', 'to', 'cell', 'amplitude'],
  amplitude: ['re', 'im'],
} as const;

/** Edit distance with transpositions (optimal string alignment), for "did you mean". */
export function editDistance(a: string, b: string): number {
  const d: number[][] = Array.from({ length: a.length + 1 }, (_, i) => [i, ...new Array<number>(b.length).fill(0)]);
  for (let j = 1; j <= b.length; j++) d[0][j] = j;
  for (let i = 1; i <= a.length; i++) {
    for (let j = 1; j <= b.length; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      d[i][j] = Math.min(d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + cost);
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1]) d[i][j] = Math.min(d[i][j], d[i - 2][j - 2] + 1);
    }
  }
  return d[a.length][b.length];
}

/** The valid name closest to `name` (case ignored), or null when none is plausibly meant. */
export function closestName(name: string, valid: readonly string[]): string | null {
  let best: string | null = null;
  let bestDistance = Infinity;
  for (const candidate of valid) {
    const distance = editDistance(name.toLowerCase(), candidate.toLowerCase());
    if (distance < bestDistance) [best, bestDistance] = [candidate, distance];
  }
  // A third of the letters may differ, but never all of them ("v" is not a misspelt "u").
  const plausible = bestDistance <= Math.max(1, Math.floor(name.length / 3)) && bestDistance < name.length;
  return plausible ? best : null;
}

/** The suggestion part of an error: `; did you mean "x"?` (or nothing). */
export function didYouMean(name: string, valid: readonly string[]): string {
  const closest = closestName(name, valid);
  return closest === null ? '' : `; did you mean "${closest}"?`;
}

/**
 * Throws a ModelError naming the first own field of `value` that is not in `valid`, with the closest
 * valid name. `prefix` is the path of `value` in the request ('' at the top, 'plane.' below).
 */
export function checkFields(value: object, valid: readonly string[], prefix: string, what: string): void {
  for (const key of Object.keys(value)) {
    if (valid.includes(key)) continue;
    throw new ModelError(`${prefix}${key}`, `unknown field for ${what}${didYouMean(key, valid)} (valid: ${valid.join(', ')})`);
  }
}

/** Checks the field names of a model description and of its orbitals, parameters and terms. */
export function checkModelFields(model: Record<string, unknown>): void {
  checkFields(model, MODEL_FIELDS.model, '', 'a model description');
  const each = (list: unknown, fields: readonly string[], path: string, what: string) => {
    if (Array.isArray(list)) list.forEach((item, i) => isObject(item) && checkFields(item, fields, `${path}[${i}].`, what));
  };
  each(model.orbitals, MODEL_FIELDS.orbital, 'orbitals', 'an orbital');
  each(model.terms, MODEL_FIELDS.term, 'terms', 'a term');
  if (Array.isArray(model.terms)) {
    model.terms.forEach((t, i) => isObject(t) && isObject(t.amplitude) && checkFields(t.amplitude, MODEL_FIELDS.amplitude, `terms[${i}].amplitude.`, 'a complex amplitude'));
  }
  if (isObject(model.parameters)) {
    for (const [name, p] of Object.entries(model.parameters)) if (isObject(p)) checkFields(p, MODEL_FIELDS.parameter, `parameters.${name}.`, 'a parameter');
  }
}
