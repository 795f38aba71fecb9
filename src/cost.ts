/**
 * What a request will cost, known before it runs. Each kind's memory and time are estimated from
 * its sizes (orbitals, k-grid, path points, ribbon width, swept points); a request whose estimate
 * exceeds the budget is refused with an error naming the field, the estimate and the largest value
 * of that field that fits. The limits are not constants: they follow from the budget, which the
 * host sets (the kernel from the cell's memory limit; `setComputeBudget`).
 *
 * The estimates are deliberately rough (the dominant arrays, and the time per k-point measured on
 * the bench machine, see `solveSeconds`) and err on the high side: they exist to refuse what cannot
 * finish, not to predict run times.
 */
import type { DiagnosticKind, DiagnosticRequest } from './diagnostics.js';
import { ModelError } from './model/errors.js';

export interface ComputeBudget {
  /** Bytes one request may allocate. */
  memoryBytes: number;
  /** Seconds one request may be expected to run (interrupt still stops it sooner). */
  seconds: number;
}

let budget: ComputeBudget = { memoryBytes: 2 * 2 ** 30, seconds: 3600 };

/** The budget requests are checked against. */
export function computeBudget(): ComputeBudget {
  return { ...budget };
}

/** Changes the budget (the kernel sets it from the cell's memory limit); returns the previous one. */
export function setComputeBudget(change: Partial<ComputeBudget>): ComputeBudget {
  const previous = budget;
  for (const [name, value] of Object.entries(change)) {
    if (typeof value !== 'number' || !(value > 0)) throw new ModelError(`budget.${name}`, `expected a positive number. Value: ${String(value)}`);
  }
  budget = { ...budget, ...change };
  return previous;
}

export interface CostEstimate {
  bytes: number;
  seconds: number;
}

/** A dense Hermitian problem of n orbitals: the matrix, its eigenvectors and the solver's scratch. */
export const denseBytes = (n: number): number => 8 * 16 * n * n;
/**
 * One k-point of a diagnostic on n orbitals: building H(k), the Hermitian solve with vectors and
 * the overlaps (measured: 4 us at n = 2, 12 us at n = 8, 32 ms at n = 200, 0.44 s at n = 600).
 */
const solveSeconds = (n: number): number => 4e-6 + 1.5e-7 * n ** 2 + 4e-9 * n ** 3;
/** One record of a phase map's point (coordinates, value, gap, bookkeeping). */
const POINT_BYTES = 256;

type Fields = Record<string, unknown>;

/** A size as given, or `fallback` when it is not a usable count (the diagnostic then names it). */
const count = (x: unknown, fallback: number): number => (typeof x === 'number' && Number.isFinite(x) && x >= 1 ? x : fallback);

function gridCounts(grid: unknown, dim: number, fallback: number): number[] {
  if (typeof grid === 'number') return new Array<number>(Math.max(dim, 1)).fill(count(grid, fallback));
  if (Array.isArray(grid) && grid.length > 0) return grid.map((x) => count(x, fallback));
  return new Array<number>(Math.max(dim, 1)).fill(fallback);
}
const product = (xs: number[]): number => xs.reduce((a, b) => a * Math.max(b, 1), 1);

function groupSize(r: Fields, n: number): number {
  if (typeof r.bands === 'number') return Math.min(count(r.bands, 1), n);
  if (Array.isArray(r.bands)) return Math.min(r.bands.length, n);
  return Math.max(1, Math.floor(n / 2));
}

function pathPoints(r: Fields, perDefault: number): number {
  const per = count(r.pointsPerSegment, perDefault);
  const segments = typeof r.path === 'string' ? Math.max(1, r.path.trim().split(/\s+/).length - 1) : Array.isArray(r.path) ? Math.max(1, r.path.length - 1) : 4;
  return segments * per;
}

/** A grid of k-points with the eigenvectors of one band group kept for a few rows. */
function gridCost(n: number, m: number, counts: number[], perPointBytes: number): CostEstimate {
  const points = product(counts);
  const row = counts[0] ?? 1;
  return {
    bytes: denseBytes(n) + 4 * row * 16 * n * m + points * perPointBytes,
    seconds: points * (solveSeconds(n) + 8e-9 * m ** 3),
  };
}

/**
 * A grid refined until its integer is certain ('auto'): the time of the first grid (a gapped model
 * stops there or soon after; an interrupt stops the rest), the memory of the largest it may reach.
 */
function autoGridCost(n: number, m: number, r: Fields, start: number[], at: (grid: number) => number[], perPointBytes: number): CostEstimate {
  const first = gridCost(n, m, start, perPointBytes);
  const largest = gridCost(n, m, at(count(r.maxGrid, 512)), perPointBytes);
  return { bytes: largest.bytes, seconds: first.seconds };
}

/** The estimate for one request, given its model's orbital count and periodic dimension. */
export function estimateCost(request: DiagnosticRequest, n: number, dim: number): CostEstimate {
  const r = request as unknown as Fields;
  const m = groupSize(r, n);
  switch (request.kind as DiagnosticKind) {
    case 'bands': {
      const p = pathPoints(r, 60);
      return { bytes: denseBytes(n) + p * n * 16, seconds: p * solveSeconds(n) };
    }
    case 'gap':
    case 'gap-closings':
    case 'weyl':
      return gridCost(n, 0, gridCounts(r.grid, dim, [1, 256, 64, 24][dim] ?? 24), 16);
    case 'ribbon': {
      const width = count(r.width, 1);
      const nk = count(r.nk, dim === 1 ? 201 : 40 * 4);
      const big = n * width;
      return { bytes: denseBytes(big) + nk * big * 16, seconds: nk * solveSeconds(big) };
    }
    case 'chern':
    case 'spin-chern':
    case 'hall':
      if (r.grid === 'auto' || (r.grid === undefined && !Array.isArray(r.mu))) return autoGridCost(n, m, r, [16, 16], (g) => [g, g], 16);
      return gridCost(n, m, gridCounts(r.grid, 2, Array.isArray(r.mu) ? 128 : 16), 16);
    case 'curvature':
      return gridCost(n, m, gridCounts(r.grid, 2, 64), 8 * (1 + (r.perBand === true ? m : 0)));
    case 'wannier-flow':
    case 'z2': {
      const planes = request.kind === 'z2' && dim === 3 ? 6 : 1;
      const auto = request.kind === 'z2' && (r.grid === 'auto' || r.grid === undefined);
      const [along, across] = auto ? [16, 8] : gridCounts(r.grid, 2, 64);
      const cost = auto ? autoGridCost(n, m, r, [16, 9], (g) => [g, g / 2 + 1], 24 * m) : gridCost(n, m, [along, across + 1], 24 * m);
      return { bytes: cost.bytes, seconds: planes * cost.seconds };
    }
    case 'berry-phase':
    case 'winding': {
      const points = count(r.points, Array.isArray(r.loop) ? r.loop.length : 256);
      return { bytes: denseBytes(n) + 4 * 16 * n * m, seconds: points * solveSeconds(n) };
    }
    case 'majorana':
      return { bytes: denseBytes(n), seconds: 4 * solveSeconds(n) };
    case 'phase-map': {
      const axes = Array.isArray(r.axes) ? (r.axes as Fields[]) : [];
      const points = product(axes.map((a) => count(a?.count, 1)));
      const invariant = typeof r.invariant === 'string' ? r.invariant : 'chern';
      const each = estimateCost({ ...r, kind: invariant } as unknown as DiagnosticRequest, n, dim);
      return { bytes: points * POINT_BYTES + each.bytes, seconds: points * each.seconds };
    }
  }
}

/** The fields whose size drives a kind's cost, in the order they are named when it is too large. */
function sizeFields(request: Fields): string[] {
  switch (request.kind as DiagnosticKind) {
    case 'bands':
      return ['pointsPerSegment'];
    case 'ribbon':
      return ['width', 'nk'];
    case 'berry-phase':
    case 'winding':
      return ['points'];
    case 'phase-map': {
      const axes = Array.isArray(request.axes) ? (request.axes as Fields[]) : [];
      const order = axes.map((a, i) => [i, typeof a.count === 'number' ? a.count : 0]).sort((a, b) => b[1] - a[1]);
      return [...order.map(([i]) => `axes[${i}].count`), 'grid'];
    }
    default:
      return request.grid === 'auto' || (request.grid === undefined && request.maxGrid !== undefined) ? ['maxGrid'] : ['grid'];
  }
}

function withSize(request: Fields, field: string, value: number): Fields {
  const axis = /^axes\[(\d+)\]\.count$/.exec(field);
  if (axis) {
    const axes = (request.axes as Fields[]).map((a, i) => (i === Number(axis[1]) ? { ...a, count: value } : a));
    return { ...request, axes };
  }
  if (field === 'grid' && Array.isArray(request.grid)) return { ...request, grid: request.grid.map((x: unknown) => (typeof x === 'number' ? Math.min(x, value) : x)) };
  return { ...request, [field]: value };
}

function currentSize(request: Fields, field: string): number | null {
  const axis = /^axes\[(\d+)\]\.count$/.exec(field);
  const value = axis ? (request.axes as Fields[])[Number(axis[1])]?.count : request[field];
  if (typeof value === 'number' && Number.isInteger(value) && value > 1) return value;
  if (Array.isArray(value) && value.every((x) => typeof x === 'number')) return Math.max(...(value as number[]));
  return null;
}

const fits = (cost: CostEstimate, b: ComputeBudget): boolean => cost.bytes <= b.memoryBytes && cost.seconds <= b.seconds;

export function formatBytes(bytes: number): string {
  if (bytes >= 2 ** 30) return `${(bytes / 2 ** 30).toPrecision(3)} GB`;
  if (bytes >= 2 ** 20) return `${(bytes / 2 ** 20).toPrecision(3)} MB`;
  return `${Math.ceil(bytes / 1024)} kB`;
}

export function formatSeconds(seconds: number): string {
  if (seconds >= 86400) return `${(seconds / 86400).toPrecision(3)} days`;
  if (seconds >= 3600) return `${(seconds / 3600).toPrecision(3)} h`;
  if (seconds >= 60) return `${(seconds / 60).toPrecision(3)} min`;
  return `${seconds.toPrecision(2)} s`;
}

/**
 * Refuses a request whose estimate does not fit the budget: the error names the field to reduce,
 * the estimate, the budget and the largest value of that field that fits. Requests whose sizes are
 * malformed pass through (the diagnostic names those fields itself).
 */
export function checkCost(request: DiagnosticRequest): CostEstimate {
  const r = request as unknown as Fields;
  const model = r.model as Fields | undefined;
  const n = Array.isArray(model?.orbitals) ? model.orbitals.length : 1;
  const dim = typeof model?.periodic === 'number' ? model.periodic : 2;
  const b = budget;
  const cost = estimateCost(request, n, dim);
  if (fits(cost, b)) return cost;
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
      throw new ModelError(field, `${size} ${over}; the largest ${field} that fits is ${lo} (value: ${size})`);
    }
  }
  throw new ModelError('model.orbitals', `a "${request.kind}" request on ${n} orbitals ${over}, even at its smallest sizes`);
}

/**
 * Refuses a model of `orbitals` orbitals whose dense Hamiltonian cannot fit the budget (builders:
 * supercells, ribbons, flakes, flux lattices), naming `field`, its `value` and the largest `unit`
 * count that fits, given `perUnit` orbitals per unit.
 */
export function checkModelSize(orbitals: number, field: string, value: number, perUnit: number, unit: string): void {
  const b = budget;
  if (denseBytes(orbitals) <= b.memoryBytes) return;
  const largestOrbitals = Math.floor(Math.sqrt(b.memoryBytes / denseBytes(1)));
  const largest = Math.max(0, Math.floor(largestOrbitals / Math.max(perUnit, 1)));
  throw new ModelError(
    field,
    `gives ${orbitals} orbitals, whose dense Hamiltonian needs about ${formatBytes(denseBytes(orbitals))}, over the budget of ${formatBytes(b.memoryBytes)}; the largest ${unit} that fits is ${largest} (value: ${value})`,
  );
}
