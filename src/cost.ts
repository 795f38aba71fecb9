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
export const solveSeconds = (n: number): number => 4e-6 + 1.5e-7 * n ** 2 + 4e-9 * n ** 3;
/** One record of a phase map's point (coordinates, value, gap, bookkeeping). */
export const POINT_BYTES = 256;

type Fields = Readonly<Record<string, unknown>>;

/** A size as given, or `fallback` when it is not a usable count (the diagnostic then names it). */
export const count = (x: unknown, fallback: number): number => (typeof x === 'number' && Number.isFinite(x) && x >= 1 ? x : fallback);

export function gridCounts(grid: unknown, dim: number, fallback: number): number[] {
  if (typeof grid === 'number') return new Array<number>(Math.max(dim, 1)).fill(count(grid, fallback));
  if (Array.isArray(grid) && grid.length > 0) return grid.map((x) => count(x, fallback));
  return new Array<number>(Math.max(dim, 1)).fill(fallback);
}
export const product = (xs: number[]): number => xs.reduce((a, b) => a * Math.max(b, 1), 1);

export function groupSize(r: Fields, n: number): number {
  if (typeof r.bands === 'number') return Math.min(count(r.bands, 1), n);
  if (Array.isArray(r.bands)) return Math.min(r.bands.length, n);
  return Math.max(1, Math.floor(n / 2));
}

export function pathPoints(r: Fields, perDefault: number): number {
  const per = count(r.pointsPerSegment, perDefault);
  const segments = typeof r.path === 'string' ? Math.max(1, r.path.trim().split(/\s+/).length - 1) : Array.isArray(r.path) ? Math.max(1, r.path.length - 1) : 4;
  return segments * per;
}

/** A grid of k-points with the eigenvectors of one band group kept for a few rows. */
export function gridCost(n: number, m: number, counts: number[], perPointBytes: number): CostEstimate {
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
export function autoGridCost(n: number, m: number, r: Fields, start: number[], at: (grid: number) => number[], perPointBytes: number): CostEstimate {
  const first = gridCost(n, m, start, perPointBytes);
  const largest = gridCost(n, m, at(count(r.maxGrid, 512)), perPointBytes);
  return { bytes: largest.bytes, seconds: first.seconds };
}

export const fits = (cost: CostEstimate, b: ComputeBudget): boolean => cost.bytes <= b.memoryBytes && cost.seconds <= b.seconds;

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
