/**
 * The fields every diagnostic request may carry, by kind, in one table; any other field is an error
 * that names it and the closest valid name. A misspelt option (`gird`, `tolerence`, `param`) would
 * otherwise be ignored and the default used in silence.
 *
 * Each kind's entry is typed against its request type, so adding an option to a diagnostic's
 * options interface without listing it here (or listing one that does not exist) fails to compile.
 */
import type { DiagnosticKind, DiagnosticRequest } from './diagnostics.js';
import { ModelError, show } from './model/errors.js';
import type { ModelSpec } from './model/spec.js';
import type { SweepQuantity } from './scan/sweep.js';

type RequestOf<K extends DiagnosticKind> = Extract<DiagnosticRequest, { kind: K }>;
/** Exactly the keys of T (each listed once, none extra): the compiler checks the table. */
type Exact<T> = { readonly [K in keyof Required<T>]: true };
const keys = <T>(table: Exact<T>): readonly string[] => Object.keys(table);

const BASE = { kind: true, model: true, params: true, convention: true } as const;
const TOPOLOGY = { ...BASE, bands: true, gapTolerance: true } as const;

/** Each kind's valid top-level fields. Phase maps add the fields of the invariant they sweep. */
export const REQUEST_FIELDS: { readonly [K in DiagnosticKind]: readonly string[] } = {
  bands: keys<RequestOf<'bands'>>({ ...BASE, bands: true, tolerance: true, path: true, pointsPerSegment: true }),
  gap: keys<RequestOf<'gap'>>({ ...BASE, bands: true, grid: true, tolerance: true }),
  'gap-closings': keys<RequestOf<'gap-closings'>>({ ...BASE, bands: true, grid: true, tolerance: true, maxCandidates: true }),
  ribbon: keys<RequestOf<'ribbon'>>({ ...BASE, direction: true, width: true, nk: true, edgeLayers: true, path: true }),
  chern: keys<RequestOf<'chern'>>({ ...TOPOLOGY, grid: true, plane: true, maxGrid: true }),
  curvature: keys<RequestOf<'curvature'>>({ ...TOPOLOGY, method: true, grid: true, plane: true, perBand: true, part: true }),
  'wannier-flow': keys<RequestOf<'wannier-flow'>>({ ...TOPOLOGY, grid: true, plane: true, part: true }),
  'berry-phase': keys<RequestOf<'berry-phase'>>({ ...TOPOLOGY, loop: true, wraps: true, points: true }),
  z2: keys<RequestOf<'z2'>>({ ...TOPOLOGY, method: true, grid: true, maxGrid: true, inversion: true }),
  'spin-chern': keys<RequestOf<'spin-chern'>>({ ...TOPOLOGY, grid: true, plane: true, maxGrid: true }),
  winding: keys<RequestOf<'winding'>>({ ...BASE, gapTolerance: true, sublattice: true, points: true }),
  majorana: keys<RequestOf<'majorana'>>({ ...BASE, gapTolerance: true }),
  weyl: keys<RequestOf<'weyl'>>({ ...TOPOLOGY, grid: true, radius: true, sphere: true, maxCandidates: true }),
  hall: keys<RequestOf<'hall'>>({ ...TOPOLOGY, mu: true, grid: true, plane: true }),
  'phase-map': ['kind', 'model', 'params', 'convention', 'axes', 'invariant', 'refine'],
};

/** Fields of the objects inside a request, by the option that holds them. */
const NESTED_FIELDS: Readonly<Record<string, readonly string[]>> = {
  plane: ['normal', 'at'],
  part: ['index', 'count'],
  refine: ['tolerance', 'maxRounds'],
};
const AXIS_FIELDS = ['param', 'from', 'to', 'count'];

/** Fields of a model description and of its parts. */
export const MODEL_FIELDS = {
  model: keys<ModelSpec>({ format: true, version: true, name: true, periodic: true, vectors: true, orbitals: true, parameters: true, terms: true, doc: true }),
  orbital: ['label', 'position', 'spin', 'nambu', 'layer'],
  parameter: ['default', 'range', 'unit', 'doc'],
  term: ['from', 'to', 'cell', 'amplitude'],
  amplitude: ['re', 'im'],
} as const;

/** The valid fields of a request of `kind`; for a phase map, those of the swept invariant too. */
export function requestFields(kind: DiagnosticKind, invariant?: SweepQuantity): readonly string[] {
  if (kind !== 'phase-map') return REQUEST_FIELDS[kind];
  const swept = invariant !== undefined && Object.hasOwn(REQUEST_FIELDS, invariant) ? REQUEST_FIELDS[invariant] : [];
  return [...new Set([...REQUEST_FIELDS['phase-map'], ...swept])];
}

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

const isObject = (x: unknown): x is Record<string, unknown> => x !== null && typeof x === 'object' && !Array.isArray(x);

/** Checks the field names of a request (not their values: each diagnostic checks those). */
export function checkRequestFields(request: DiagnosticRequest): void {
  const r = request as unknown as Record<string, unknown>;
  const kind = request.kind;
  const valid = requestFields(kind, r.invariant as SweepQuantity | undefined);
  const what = kind === 'phase-map' ? `a phase-map request of ${show(r.invariant)}` : `a "${kind}" request`;
  checkFields(r, valid, '', what);
  for (const [option, fields] of Object.entries(NESTED_FIELDS)) {
    if (isObject(r[option])) checkFields(r[option], fields, `${option}.`, `"${option}"`);
  }
  if (Array.isArray(r.axes)) r.axes.forEach((axis, i) => isObject(axis) && checkFields(axis, AXIS_FIELDS, `axes[${i}].`, 'a swept axis'));
  // The one option of many kinds whose shape varies; each diagnostic checks its values.
  const grid = r.grid;
  if (grid !== undefined && typeof grid !== 'number' && grid !== 'auto' && !(Array.isArray(grid) && grid.length > 0)) {
    throw new ModelError('grid', `expected a number of k-points, one per direction, or "auto". Value: ${show(grid)}`);
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
