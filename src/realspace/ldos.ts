/**
 * Local density of states at one energy, per cell (summed over the cell's orbitals), by the kernel
 * polynomial method (kpm.ts; Weisse et al., RMP 78, 275 (2006)):
 *   rho_i(E) = (1/a) [g_0 mu_0 + 2 sum_n g_n mu_n T_n(x)] / (pi sqrt(1 - x^2)),  x = (E - b)/a,
 * in states per unit energy, broadened by the Jackson kernel to about pi a / N (`resolution`).
 * - chosen cells: exact local moments mu_n = <i|T_n|i> for each orbital (order/2 products each);
 * - a map of every cell (no `cells`): the stochastic trace, R random-phase probes r (|r_i| = 1,
 *   phases from the seed's stream 1), rho_i ~ mean_r Re[conj(r_i) (delta(E - H) r)_i], unbiased
 *   because the phases average E[conj(r_i) r_j] = delta_ij; each cell's standard error over the R
 *   probes is reported;
 * - method 'dense' (small samples): the same damped series evaluated on the exact eigenpairs,
 *   mu_n = sum_k |psi_ik|^2 T_n(x_k): the cross-check of the sparse recursion.
 */
import type { BlochHamiltonian } from '../bloch/hamiltonian.js';
import type { CostEstimate } from '../cost.js';
import { HermitianEigensolver } from '../linalg/eigh.js';
import { ModelError, valueText } from '../model/errors.js';
import { refuseIfTooLarge } from './budget.js';
import { chebyshevApply, chebyshevScaling, checkOrder, deltaCoefficients, localMoments, scaledEnergy } from './kpm.js';
import { cellIndex, checkCells, chosenCells, edgeDistance } from './marker.js';
import { denseSampleBytes, denseSolveSeconds } from './occupied.js';
import { SeededRandom } from './random.js';
import { buildSample, checkSampleOptions, sampleCost, type Boundary, type DisorderDescription, type Sample, type SampleOptions } from './sample.js';
import { toDense } from './sparse.js';

export interface LocalDensityOptions extends SampleOptions {
  energy: number;
  /** Chebyshev moments N; default 256. */
  order?: number;
  /** Cells to report; default every cell (a map, by the stochastic trace). */
  cells?: number[][];
  /** Random probe vectors of the stochastic trace (maps only); default 32. */
  probes?: number;
  /** 'chebyshev' (default) or 'dense' (exact eigenpairs, small samples). */
  method?: 'chebyshev' | 'dense';
}

export interface LocalDensityResult {
  kind: 'local-density';
  method: 'chebyshev' | 'chebyshev-stochastic' | 'dense';
  energy: number;
  cells: Int32Array;
  /** States per unit energy in each cell. */
  density: Float64Array;
  /** Standard error of each cell's density (stochastic trace), else null. */
  standardError: Float64Array | null;
  edgeDistance: Int32Array;
  order: number;
  /** Energy resolution of the Jackson kernel, pi a / N. */
  resolution: number;
  orbitals: number;
  sizes: number[];
  boundary: Boundary[];
  disorder: DisorderDescription;
  checks: { warnings: string[]; spectrumBounds: [number, number]; boundsRule: string; probes: number | null };
}

function checkProbes(p: unknown): number {
  const n = p ?? 32;
  if (typeof n !== 'number' || !Number.isInteger(n) || n < 2) throw new ModelError('probes', `expected an integer of at least 2 (random vectors). Value: ${valueText(p)}`);
  return n;
}

export function localDensityCost(orbitals: number, terms: number, options: LocalDensityOptions): CostEstimate {
  const sizes = Array.isArray(options.sizes) ? options.sizes : [1];
  const n = sizes.reduce((a, b) => a * Math.max(1, b), 1) * orbitals;
  const order = typeof options.order === 'number' ? options.order : 256;
  if (options.method === 'dense') return { bytes: denseSampleBytes(n), seconds: denseSolveSeconds(n) };
  const base = sampleCost(orbitals, terms, sizes);
  const nnz = n + 2 * terms * (n / Math.max(orbitals, 1));
  const products = options.cells === undefined ? (typeof options.probes === 'number' ? options.probes : 32) * order : options.cells.length * orbitals * (order / 2);
  return { bytes: base.bytes + 6 * 16 * n, seconds: base.seconds + products * nnz * 8e-9 };
}

export function localDensity(h: BlochHamiltonian, options: LocalDensityOptions): LocalDensityResult {
  const checked = checkSampleOptions(options, h.dim);
  const order = checkOrder(options.order, 256);
  const chosen = checkCells(options.cells, checked.sizes);
  const probes = chosen === null ? checkProbes(options.probes) : null;
  const method = options.method ?? 'chebyshev';
  if (method !== 'chebyshev' && method !== 'dense') throw new ModelError('method', `expected "chebyshev" or "dense". Value: ${valueText(method)}`);
  if (typeof options.energy !== 'number' || !Number.isFinite(options.energy)) throw new ModelError('energy', `expected a finite number. Value: ${valueText(options.energy)}`);
  refuseIfTooLarge(`the local density (${method})`, checked.sizes, (sizes) => localDensityCost(h.size, h.spec.terms.length, { ...options, sizes }));
  return densityOfSample(buildSample(h, options), options.energy, order, chosen, probes, method, checked.seed);
}

export function densityOfSample(sample: Sample, energy: number, order: number, chosen: number[][] | null, probes: number | null, method: 'chebyshev' | 'dense', seed: number): LocalDensityResult {
  const s = chebyshevScaling(sample.hamiltonian);
  const x = scaledEnergy(energy, s, 'energy');
  const n = sample.size, dim = sample.dim;
  const cells = chosenCells(chosen, sample.sizes);
  const count = cells.length / dim;
  const slot = new Int32Array(sample.sizes.reduce((a, b) => a * b, 1)).fill(-1);
  for (let c = 0; c < count; c++) slot[cellIndex(cells.subarray(c * dim, (c + 1) * dim), sample.sizes)] = c;
  const orbitalSlot = (i: number) => slot[cellIndex(sample.cells.subarray(i * dim, (i + 1) * dim), sample.sizes)];
  const density = new Float64Array(count);
  let standardError: Float64Array | null = null;
  const coefficients = deltaCoefficients(x, order);
  const perEnergy = 1 / s.halfWidth;
  let kind: LocalDensityResult['method'] = method;
  if (method === 'dense') {
    const values = new Float64Array(n), vectors = new Float64Array(2 * n * n);
    new HermitianEigensolver(n).solve(toDense(sample.hamiltonian), values, vectors);
    const series = new Float64Array(n);
    for (let k = 0; k < n; k++) {
      const theta = Math.acos(Math.max(-1, Math.min(1, (values[k] - s.centre) / s.halfWidth)));
      let sum = 0;
      for (let m = 0; m < order; m++) sum += coefficients[m] * Math.cos(m * theta);
      series[k] = sum;
    }
    for (let i = 0; i < n; i++) {
      const c = orbitalSlot(i);
      if (c < 0) continue;
      let sum = 0;
      for (let k = 0; k < n; k++) sum += (vectors[2 * (i * n + k)] ** 2 + vectors[2 * (i * n + k) + 1] ** 2) * series[k];
      density[c] += sum * perEnergy;
    }
  } else {
    const work: [Float64Array, Float64Array, Float64Array] = [new Float64Array(2 * n), new Float64Array(2 * n), new Float64Array(2 * n)];
    if (probes === null) {
      const moments = new Float64Array(order);
      for (let i = 0; i < n; i++) {
        const c = orbitalSlot(i);
        if (c < 0) continue;
        localMoments(sample.hamiltonian, s, order, i, work, moments);
        let sum = 0;
        for (let m = 0; m < order; m++) sum += coefficients[m] * moments[m];
        density[c] += sum * perEnergy;
      }
    } else {
      kind = 'chebyshev-stochastic';
      const rng = new SeededRandom(seed, 1);
      const r = new Float64Array(2 * n), out = new Float64Array(2 * n);
      const sumSq = new Float64Array(count);
      const one = new Float64Array(count);
      for (let p = 0; p < probes; p++) {
        for (let i = 0; i < n; i++) {
          const phi = 2 * Math.PI * rng.next();
          r[2 * i] = Math.cos(phi);
          r[2 * i + 1] = Math.sin(phi);
        }
        chebyshevApply(sample.hamiltonian, s, [coefficients], r, [out], work);
        one.fill(0);
        for (let i = 0; i < n; i++) one[orbitalSlot(i)] += (r[2 * i] * out[2 * i] + r[2 * i + 1] * out[2 * i + 1]) * perEnergy;
        for (let c = 0; c < count; c++) {
          density[c] += one[c] / probes;
          sumSq[c] += one[c] * one[c];
        }
      }
      standardError = Float64Array.from(density, (mean, c) => Math.sqrt(Math.max(0, sumSq[c] / probes - mean * mean) / (probes - 1)));
    }
  }
  const distance = new Int32Array(count);
  for (let c = 0; c < count; c++) distance[c] = edgeDistance(cells.subarray(c * dim, (c + 1) * dim), sample.sizes);
  return {
    kind: 'local-density', method: kind, energy, cells, density, standardError, edgeDistance: distance, order,
    resolution: (Math.PI * s.halfWidth) / order, orbitals: n, sizes: sample.sizes, boundary: sample.boundary, disorder: sample.disorder,
    checks: { warnings: [], spectrumBounds: s.bounds, boundsRule: s.rule, probes },
  };
}
