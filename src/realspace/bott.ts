/**
 * Bott index (Loring & Hastings, EPL 92, 67004 (2010)) of a finite sample: with the occupied frame
 * Psi (n x m, states below E_F) and the position unitaries U = e^{2 pi i x1/L1},
 * V = e^{2 pi i x2/L2} (x in reduced lattice coordinates, L the sample's cells along that
 * direction), compressed to the occupied states, u = Psi^dagger U Psi, v = Psi^dagger V Psi,
 *   Bott = s (1/2pi) Im Tr log(v u v^dagger u^dagger) = s (1/2pi) sum_i arg lambda_i,
 * lambda_i the eigenvalues of v u v^dagger u^dagger (src/linalg/eigphases.ts, Hessenberg QR),
 * and s = orientation (+1, or -1 when a1 x a2 < 0). So read, the formula gives the Chern number
 * in this project's convention (DEVELOPERS.md; checked on the Qi–Wu–Zhang and Haldane models in
 * tests/reference/realspace.test.ts).
 *
 * det(v u v^dagger u^dagger) = |det u|^2 |det v|^2 > 0, so the phases sum to a multiple of 2pi up to
 * rounding; the index is defined only while no eigenvalue reaches 0 (u or v singular): the
 * smallest |lambda_i| is reported, the index is null when it is below 1e-8 and warned about below
 * 1e-3. (Open flakes sit near 0.02 from their edge states, clean periodic samples near 1.)
 */
import type { BlochHamiltonian } from '../bloch/hamiltonian.js';
import type { CostEstimate } from '../cost.js';
import { UnitaryEigenphases } from '../linalg/eigphases.js';
import { refuseIfTooLarge } from './budget.js';
import { checkFermiOptions, denseSampleBytes, denseSolveSeconds, occupiedStates, type FermiOptions, type SpectrumAtFermi } from './occupied.js';
import { compressDiagonal, multiplyAdjoint, multiplyRect } from './products.js';
import { buildSample, checkSampleOptions, type Boundary, type DisorderDescription, type Sample, type SampleOptions } from './sample.js';
import { ModelError } from '../model/errors.js';

export interface BottOptions extends SampleOptions, FermiOptions {}

export interface BottChecks extends SpectrumAtFermi {
  /** Smallest |eigenvalue| of v u v^dagger u^dagger: near 0 the index is undefined. */
  minEigenvalueModulus: number;
  /** Largest |arg lambda_i|: near pi an eigenvalue is about to cross the branch cut. */
  largestPhase: number;
}

export interface BottResult {
  kind: 'bott';
  /** The Bott index, null when the projector is ambiguous or the compressed unitaries singular. */
  bott: number | null;
  /** (1/2pi) sum of the phases before rounding (an integer up to rounding error). */
  raw: number | null;
  orbitals: number;
  sizes: number[];
  boundary: Boundary[];
  disorder: DisorderDescription;
  checks: BottChecks;
}

/** Below this smallest |lambda| the index is refused. */
const SINGULAR = 1e-8;

/** What `bottOfCompressed` finds: the phases' sum and the checks on the eigenvalues. */
export interface CompressedBott {
  raw: number;
  minEigenvalueModulus: number;
  largestPhase: number;
}

/** Loring–Hastings sum for compressed m x m position matrices u, v (sign not yet applied). */
export function bottOfCompressed(m: number, u: Float64Array, v: Float64Array): CompressedBott {
  if (m === 0) return { raw: 0, minEigenvalueModulus: 1, largestPhase: 0 };
  const vu = multiplyRect(m, m, m, v, u, new Float64Array(2 * m * m));
  const uv = multiplyRect(m, m, m, u, v, new Float64Array(2 * m * m));
  const w = multiplyAdjoint(m, vu, uv, new Float64Array(2 * m * m));
  const solver = new UnitaryEigenphases(m);
  const phases = solver.solve(w, new Float64Array(m));
  let sum = 0, largest = 0, smallest = Infinity;
  for (let i = 0; i < m; i++) {
    sum += phases[i];
    largest = Math.max(largest, Math.abs(phases[i]));
    smallest = Math.min(smallest, Math.hypot(solver.eigenvalues[2 * i], solver.eigenvalues[2 * i + 1]));
  }
  return { raw: sum / (2 * Math.PI), minEigenvalueModulus: smallest, largestPhase: largest };
}

/** The diagonal of e^{2 pi i x_dir / L_dir} over the sample's orbitals. */
export function positionPhases(sample: Sample, dir: number): { re: Float64Array; im: Float64Array } {
  const n = sample.size;
  const re = new Float64Array(n), im = new Float64Array(n);
  const scale = (2 * Math.PI) / sample.sizes[dir];
  for (let i = 0; i < n; i++) {
    const phi = scale * sample.positions[i * sample.dim + dir];
    re[i] = Math.cos(phi);
    im[i] = Math.sin(phi);
  }
  return { re, im };
}

/** The compressed position unitaries u, v of the occupied frame (n x m). */
export function compressedPositions(sample: Sample, frame: Float64Array, m: number): [Float64Array, Float64Array] {
  return [0, 1].map((dir) => {
    const { re, im } = positionPhases(sample, dir);
    return compressDiagonal(sample.size, m, frame, re, im, new Float64Array(2 * m * m));
  }) as [Float64Array, Float64Array];
}

/** Memory and time of a dense real-space invariant on `orbitals` x cells orbitals. */
export function bottCost(orbitals: number, options: Pick<SampleOptions, 'sizes'>): CostEstimate {
  const cells = (Array.isArray(options.sizes) ? options.sizes : [1]).reduce((a, b) => a * Math.max(1, b), 1);
  const n = cells * orbitals;
  const m = Math.ceil(n / 2);
  // the compressed matrices and their products, and the real parts the products take (kernels.ts)
  return { bytes: denseSampleBytes(n) + 6 * 16 * m * m + 8 * (8 * n * m + 3 * m * m), seconds: denseSolveSeconds(n) + 7 * 4e-9 * m ** 3 };
}

export function checkTwoDimensional(dim: number, what: string): void {
  if (dim !== 2) throw new ModelError('model', `${what} needs a model with two periodic directions; this one has ${dim}`);
}

/** The Bott index of the sample described by `options`. */
export function bottIndex(h: BlochHamiltonian, options: BottOptions): BottResult {
  checkTwoDimensional(h.dim, 'the Bott index');
  const checked = checkSampleOptions(options, h.dim);
  checkFermiOptions(options);
  refuseIfTooLarge('the dense Bott index', checked.sizes, (sizes) => bottCost(h.size, { sizes }));
  return bottOfSample(buildSample(h, options), options);
}

/** The Bott index of a built sample. */
export function bottOfSample(sample: Sample, options: FermiOptions = {}): BottResult {
  checkTwoDimensional(sample.dim, 'the Bott index');
  const { frame, checks } = occupiedStates(sample, options);
  const m = checks.occupied;
  const [u, v] = compressedPositions(sample, frame, m);
  const found = bottOfCompressed(m, u, v);
  const warnings = [...checks.warnings];
  const singular = found.minEigenvalueModulus < SINGULAR;
  if (singular) warnings.push(`the compressed position unitaries are singular (smallest |eigenvalue| of v u v^dagger u^dagger ${found.minEigenvalueModulus.toExponential(2)}): the Bott index is undefined`);
  else if (found.minEigenvalueModulus < 1e-3) warnings.push(`an eigenvalue of v u v^dagger u^dagger is close to 0 (${found.minEigenvalueModulus.toPrecision(3)}): the sample is too small or too disordered for a trustworthy index`);
  const ok = !checks.gapless && !singular;
  const raw = sample.orientation * found.raw;
  return {
    kind: 'bott',
    bott: ok ? Math.round(raw) + 0 : null,
    raw: ok ? raw : null,
    orbitals: sample.size,
    sizes: sample.sizes,
    boundary: sample.boundary,
    disorder: sample.disorder,
    checks: { ...checks, warnings, minEigenvalueModulus: found.minEigenvalueModulus, largestPhase: found.largestPhase },
  };
}
