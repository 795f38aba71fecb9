/**
 * Refusing a real-space request that cannot fit before anything is built: the estimate is compared
 * with the host's budget (`computeBudget()`, src/cost.ts), and the error names the field, the
 * estimate, the budget and the largest sample of the same shape that fits.
 */
import { computeBudget, type CostEstimate } from '../cost.js';
import { ModelError } from '../model/errors.js';

const GIB = 2 ** 30;

export function formatBytes(bytes: number): string {
  if (bytes >= GIB) return `${(bytes / GIB).toFixed(2)} GiB`;
  if (bytes >= 2 ** 20) return `${(bytes / 2 ** 20).toFixed(1)} MiB`;
  return `${Math.ceil(bytes / 1024)} KiB`;
}

/** The sizes scaled down uniformly (each at least 1) to the largest product whose cost fits. */
export function largestFitting(sizes: number[], cost: (sizes: number[]) => CostEstimate, memoryBytes: number): number[] | null {
  const scaled = (f: number) => sizes.map((s) => Math.max(1, Math.floor(s * f)));
  if (cost(scaled(0)).bytes > memoryBytes) return null;
  let lo = 0, hi = 1;
  for (let i = 0; i < 50; i++) {
    const mid = (lo + hi) / 2;
    if (cost(scaled(mid)).bytes <= memoryBytes) lo = mid;
    else hi = mid;
  }
  return scaled(lo);
}

/**
 * Throws a ModelError on `sizes` when the estimate for `sizes` exceeds the memory budget, naming the
 * estimate and the largest sample that fits; returns the estimate otherwise.
 */
export function refuseIfTooLarge(what: string, sizes: number[], cost: (sizes: number[]) => CostEstimate): CostEstimate {
  const estimate = cost(sizes);
  const { memoryBytes } = computeBudget();
  if (estimate.bytes <= memoryBytes) return estimate;
  const fits = largestFitting(sizes, cost, memoryBytes);
  const advice = fits === null ? 'no sample of this model fits' : `the largest sample of this shape that fits is ${fits.join('x')} cells`;
  throw new ModelError(
    'sizes',
    `${what} on ${sizes.join('x')} cells needs about ${formatBytes(estimate.bytes)}, more than the budget of ${formatBytes(memoryBytes)}; ${advice}. Value: ${JSON.stringify(sizes)}`,
  );
}
