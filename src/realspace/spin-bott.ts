/**
 * Spin Bott index for time-reversal-symmetric samples (Huang & Liu, PRL 120, 126401 (2018)): the
 * occupied projector P is split by the spin operator, P s_z P = sum_i sigma_i |phi_i><phi_i| over
 * the occupied states, into the states with sigma > 0 (P+) and sigma < 0 (P-); each sector gets
 * its Bott index (bott.ts) and
 *   spin Bott = (Bott(P+) - Bott(P-)) / 2.
 * The split is sound only while P s_z P has a gap around 0: its smallest |sigma| is reported
 * (`spinGap`), and the index is null when it is below 1e-6. s_z = +1 on orbitals with spin 'up',
 * -1 on 'down' (the model's orbital spins); a model without spins is refused.
 */
import type { BlochHamiltonian } from '../bloch/hamiltonian.js';
import { HermitianEigensolver } from '../linalg/eigh.js';
import { ModelError } from '../model/errors.js';
import { refuseIfTooLarge } from './budget.js';
import { bottCost, bottOfCompressed, checkTwoDimensional, compressedPositions } from './bott.js';
import { checkFermiOptions, occupiedStates, type FermiOptions, type SpectrumAtFermi } from './occupied.js';
import { adjointMultiplyRect, compressDiagonal, multiplyRect } from './products.js';
import { buildSample, checkSampleOptions, type Boundary, type DisorderDescription, type Sample, type SampleOptions } from './sample.js';

export interface SpinBottOptions extends SampleOptions, FermiOptions {}

export interface SpinBottChecks extends SpectrumAtFermi {
  /** Smallest |eigenvalue| of P s_z P on the occupied states: the gap that separates the sectors. */
  spinGap: number;
  /** Occupied states in the sectors sigma > 0 and sigma < 0. */
  sectors: [number, number];
  /** Smallest |eigenvalue| of v u v^dagger u^dagger in either sector (bott.ts). */
  minEigenvalueModulus: number;
}

export interface SpinBottResult {
  kind: 'spin-bott';
  /** (Bott(P+) - Bott(P-)) / 2, or null when the projector or the spin split is ill-defined. */
  spinBott: number | null;
  /** Bott indices of the two sectors (sigma > 0 first). */
  sectorBott: [number, number] | null;
  orbitals: number;
  sizes: number[];
  boundary: Boundary[];
  disorder: DisorderDescription;
  checks: SpinBottChecks;
}

const SPIN_GAP = 1e-6;
const SINGULAR = 1e-8;

export function spinBottIndex(h: BlochHamiltonian, options: SpinBottOptions): SpinBottResult {
  checkTwoDimensional(h.dim, 'the spin Bott index');
  const checked = checkSampleOptions(options, h.dim);
  checkFermiOptions(options);
  if (!h.spec.orbitals.some((o) => o.spin !== undefined)) throw new ModelError('model', `the spin Bott index needs orbitals with spins; "${h.spec.name}" has none`);
  refuseIfTooLarge('the dense spin Bott index', checked.sizes, (sizes) => bottCost(h.size, { sizes }));
  return spinBottOfSample(buildSample(h, options), options);
}

/** The columns `cols` of an m x m matrix, as an m x cols.length frame. */
function columns(m: number, a: Float64Array, cols: number[]): Float64Array {
  const k = cols.length;
  const out = new Float64Array(2 * m * k);
  for (let i = 0; i < m; i++) cols.forEach((c, j) => {
    out[2 * (i * k + j)] = a[2 * (i * m + c)];
    out[2 * (i * k + j) + 1] = a[2 * (i * m + c) + 1];
  });
  return out;
}

export function spinBottOfSample(sample: Sample, options: FermiOptions = {}): SpinBottResult {
  const { frame, checks } = occupiedStates(sample, options);
  const m = checks.occupied;
  const n = sample.size;
  const sz = Float64Array.from(sample.spin);
  const s = compressDiagonal(n, m, frame, sz, null, new Float64Array(2 * m * m));
  const sigma = new Float64Array(m);
  const phi = new Float64Array(2 * m * m);
  new HermitianEigensolver(m).solve(s, sigma, phi);
  const up: number[] = [], down: number[] = [];
  let spinGap = Infinity;
  sigma.forEach((x, i) => {
    (x > 0 ? up : down).push(i);
    spinGap = Math.min(spinGap, Math.abs(x));
  });
  const [u, v] = compressedPositions(sample, frame, m);
  const sector = (cols: number[]) => {
    const k = cols.length;
    const f = columns(m, phi, cols);
    const project = (a: Float64Array) => adjointMultiplyRect(k, m, k, f, multiplyRect(m, m, k, a, f, new Float64Array(2 * m * k)), new Float64Array(2 * k * k));
    return bottOfCompressed(k, project(u), project(v));
  };
  const plus = sector(up), minus = sector(down);
  const minModulus = Math.min(plus.minEigenvalueModulus, minus.minEigenvalueModulus);
  const warnings = [...checks.warnings];
  if (spinGap < SPIN_GAP) warnings.push(`P s_z P has an eigenvalue ${spinGap.toExponential(2)} at 0: the spin sectors cannot be separated and no spin Bott index is given`);
  if (minModulus < SINGULAR) warnings.push(`the compressed position unitaries of a spin sector are singular (${minModulus.toExponential(2)}): the index is undefined`);
  const ok = !checks.gapless && spinGap >= SPIN_GAP && minModulus >= SINGULAR;
  const b: [number, number] = [Math.round(sample.orientation * plus.raw) + 0, Math.round(sample.orientation * minus.raw) + 0];
  return {
    kind: 'spin-bott',
    spinBott: ok ? (b[0] - b[1]) / 2 : null,
    sectorBott: ok ? b : null,
    orbitals: n,
    sizes: sample.sizes,
    boundary: sample.boundary,
    disorder: sample.disorder,
    checks: { ...checks, warnings, spinGap, sectors: [up.length, down.length], minEigenvalueModulus: minModulus },
  };
}
