/**
 * The one diagnostic request, and the one check every edge makes before any work (a cell's
 * `compute`, a widget's worker, a phase map's points, a cluster shard): the kind, the names of all
 * its fields (a misspelt option is an error naming the closest valid one), the shape of its
 * parameter values and its cost (refused, naming the field to reduce and the largest value that
 * fits, when it cannot fit the budget: src/cost.ts). The model and the option values are checked
 * when the model is compiled and the diagnostic runs.
 */
import { computeBudget, fits, formatBytes, formatSeconds, POINT_BYTES, product, count, type CostEstimate } from './cost.js';
import { COMMON_FIELDS, type RequestFields } from './diagnostics/diagnostic.js';
import { diagnosticOf, KIND_NAMES, SWEEP_QUANTITIES, unknownKind, type KindRequest, type SweepQuantity } from './diagnostics/registry.js';
import { ModelError, valueText } from './model/errors.js';
import { checkFields, isObject } from './model/field-names.js';
import type { PhaseMapRequest } from './scan/sweep.js';

export type DiagnosticRequest = KindRequest | PhaseMapRequest;
export type DiagnosticKind = DiagnosticRequest['kind'];

/** Every kind a request may name: the registered ones and the phase map that sweeps them. */
export const DIAGNOSTIC_KINDS: readonly DiagnosticKind[] = [...KIND_NAMES, 'phase-map'];

/** A phase map's own fields; the rest are those of the kind it sweeps. */
const PHASE_MAP_FIELDS = ['axes', 'quantity', 'refine'] as const;
const PHASE_MAP_NESTED = { refine: ['tolerance', 'maxRounds'] };
const AXIS_FIELDS = ['param', 'from', 'to', 'count'];

/** The valid top-level fields of a request of `kind`; for a phase map, those of the swept kind too. */
export function requestFields(kind: DiagnosticKind, quantity?: SweepQuantity): readonly string[] {
  if (kind !== 'phase-map') return [...COMMON_FIELDS, ...diagnosticOf(kind).options];
  const swept = quantity !== undefined && (SWEEP_QUANTITIES as readonly string[]).includes(quantity) ? diagnosticOf(quantity).options : [];
  return [...COMMON_FIELDS, ...PHASE_MAP_FIELDS, ...swept];
}

/** Checks the field names of a request (not their values: each diagnostic checks those). */
function checkRequestFields(r: RequestFields): void {
  const kind = r.kind as DiagnosticKind;
  const mapped = kind === 'phase-map';
  // A phase map named its swept kind `invariant` before it could map gaps and averages too.
  if (mapped && Object.hasOwn(r, 'invariant')) throw new ModelError('invariant', `a phase map names what it sweeps in "quantity" (it was "invariant"). Value: ${valueText(r.invariant)}`);
  const swept = mapped && (SWEEP_QUANTITIES as readonly unknown[]).includes(r.quantity) ? diagnosticOf(r.quantity) : null;
  checkFields(r, requestFields(kind, swept?.kind as SweepQuantity | undefined), '', mapped ? `a phase-map request of ${valueText(r.quantity)}` : `a "${kind}" request`);
  const nested = { ...(mapped ? PHASE_MAP_NESTED : {}), ...((mapped ? swept : diagnosticOf(kind))?.nested ?? {}) };
  for (const [option, fields] of Object.entries(nested)) {
    const value = r[option];
    if (isObject(value)) checkFields(value, fields, `${option}.`, `"${option}"`);
  }
  if (Array.isArray(r.axes)) r.axes.forEach((axis, i) => isObject(axis) && checkFields(axis, AXIS_FIELDS, `axes[${i}].`, 'a swept axis'));
  // The one option of many kinds whose shape varies; each diagnostic checks its values.
  const grid = r.grid;
  if (grid !== undefined && typeof grid !== 'number' && grid !== 'auto' && !(Array.isArray(grid) && grid.length > 0)) {
    throw new ModelError('grid', `expected a number of k-points, one per direction, or "auto". Value: ${valueText(grid)}`);
  }
}

/** The estimate for one request, given its model's orbital count and periodic dimension. */
export function estimateCost(request: DiagnosticRequest, n: number, dim: number): CostEstimate {
  const r = request as unknown as RequestFields;
  if (request.kind !== 'phase-map') return diagnosticOf(request.kind).cost(r, n, dim);
  const axes = Array.isArray(r.axes) ? (r.axes as RequestFields[]) : [];
  const points = product(axes.map((a) => count(a?.count, 1)));
  const quantity = typeof r.quantity === 'string' ? r.quantity : 'chern';
  const each = diagnosticOf(quantity, 'quantity').cost(r, n, dim);
  return { bytes: points * POINT_BYTES + each.bytes, seconds: points * each.seconds };
}

/** The fields whose size drives a request's cost, in the order they are named when it is too large. */
function sizeFields(r: RequestFields): readonly string[] {
  if (r.kind === 'phase-map') {
    const axes = Array.isArray(r.axes) ? (r.axes as RequestFields[]) : [];
    const order = axes.map((a, i) => [i, typeof a.count === 'number' ? a.count : 0]).sort((a, b) => b[1] - a[1]);
    return [...order.map(([i]) => `axes[${i}].count`), 'grid'];
  }
  const own = diagnosticOf(r.kind).sizeFields?.(r);
  if (own !== undefined) return own;
  // The grid, or the largest grid when it refines itself.
  return r.grid === 'auto' || (r.grid === undefined && r.maxGrid !== undefined) ? ['maxGrid'] : ['grid'];
}

function withSize(request: RequestFields, field: string, value: number): RequestFields {
  const axis = /^axes\[(\d+)\]\.count$/.exec(field);
  if (axis) {
    const axes = (request.axes as RequestFields[]).map((a, i) => (i === Number(axis[1]) ? { ...a, count: value } : a));
    return { ...request, axes };
  }
  // A size per direction (a grid, a sample's cells) is capped in every direction.
  const current = request[field];
  if (Array.isArray(current)) return { ...request, [field]: current.map((x: unknown) => (typeof x === 'number' ? Math.min(x, value) : x)) };
  return { ...request, [field]: value };
}

function currentSize(request: RequestFields, field: string): number | null {
  const axis = /^axes\[(\d+)\]\.count$/.exec(field);
  const value = axis ? (request.axes as RequestFields[])[Number(axis[1])]?.count : request[field];
  if (typeof value === 'number' && Number.isInteger(value) && value > 1) return value;
  if (Array.isArray(value) && value.every((x) => typeof x === 'number')) return Math.max(...(value as number[]));
  return null;
}

/**
 * Refuses a request whose estimate does not fit the budget: the error names the field to reduce,
 * the estimate, the budget and the largest value of that field that fits. Requests whose sizes are
 * malformed pass through (the diagnostic names those fields itself).
 */
function checkCost(request: DiagnosticRequest): CostEstimate {
  const r = request as unknown as RequestFields;
  const model = r.model as RequestFields | undefined;
  const n = Array.isArray(model?.orbitals) ? model.orbitals.length : 1;
  const dim = typeof model?.periodic === 'number' ? model.periodic : 2;
  const b = computeBudget();
  const cost = estimateCost(request, n, dim);
  // A size that is not a finite number gives no estimate: the diagnostic names that field itself.
  if (fits(cost, b) || !Number.isFinite(cost.bytes) || !Number.isFinite(cost.seconds)) return cost;
  const over = cost.bytes > b.memoryBytes
    ? `needs about ${formatBytes(cost.bytes)} of memory, over the budget of ${formatBytes(b.memoryBytes)}`
    : `would take about ${formatSeconds(cost.seconds)}, over the budget of ${formatSeconds(b.seconds)}`;
  for (const field of sizeFields(r)) {
    const size = currentSize(r, field);
    if (size === null) continue;
    let lo = 1, hi = size;
    while (hi - lo > 1) {
      const mid = Math.floor((lo + hi) / 2);
      if (fits(estimateCost(withSize(r, field, mid) as unknown as DiagnosticRequest, n, dim), b)) lo = mid;
      else hi = mid;
    }
    if (lo >= 2 && fits(estimateCost(withSize(r, field, lo) as unknown as DiagnosticRequest, n, dim), b)) {
      // A size per direction (a grid, a sample's cells) is named with its largest entry, capped in each.
      const value = Array.isArray(r[field]) ? r[field] : size;
      const largest = Array.isArray(value) ? `${lo} per direction` : String(lo);
      throw new ModelError(field, `${valueText(value)} ${over}; the largest ${field} that fits is ${largest} (value: ${valueText(value)})`);
    }
  }
  throw new ModelError('model.orbitals', `a "${request.kind}" request on ${n} orbitals ${over}, even at its smallest sizes`);
}

/** Checks a request's kind, the names of its fields and the shape of its parameter values. */
export function checkRequestShape(request: DiagnosticRequest): void {
  if (!isObject(request)) throw new ModelError('request', `expected a diagnostic request object. Value: ${valueText(request)}`);
  if (!(DIAGNOSTIC_KINDS as readonly unknown[]).includes(request.kind)) throw unknownKind(request.kind, 'kind', DIAGNOSTIC_KINDS);
  checkRequestFields(request as unknown as RequestFields);
  if (request.params !== undefined && !isObject(request.params)) {
    throw new ModelError('params', `expected an object of parameter values. Value: ${valueText(request.params)}`);
  }
}

/** Checks a request before any work (see the top of this file); returns its cost estimate. */
export function checkRequest(request: DiagnosticRequest): CostEstimate {
  checkRequestShape(request);
  return checkCost(request);
}
