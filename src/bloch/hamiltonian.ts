/**
 * A model compiled once into typed arrays, then H(k) and dH/dk_i at any reduced momentum k
 * (k_i = k·a_i, radians). New parameter values re-evaluate the amplitudes in place; the structure
 * (which orbitals, which phases) is never rebuilt.
 *
 * A term <R,b|H|0,a> = t in the basis |k,a> = sum_R e^{ik·R}|R,a> gives H_ba(k) += t e^{-ik·R}
 * (and e^{-ik·(R + r_b - r_a)} in the 'orbital' convention, where |k,a> carries e^{ik·r_a}).
 */
import type { CMatrix } from '../linalg/cmatrix.js';
import { eigh } from '../linalg/eigh.js';
import { ModelError, valueText } from '../model/errors.js';
import { compileAmplitude, resolveParameters, type AmplitudeEvaluator } from '../model/expressions.js';
import type { ModelSpec, ParameterValues } from '../model/spec.js';
import { validateModel } from '../model/validate.js';

/**
 * `'lattice'`: |k,a> = sum_R e^{ik·R}|R,a> (H periodic in k). `'orbital'`: the phase also carries the
 * orbital positions, e^{ik·(R + r_b - r_a)}. Chern numbers do not depend on it; Berry phases and
 * Wannier centres do.
 */
export type BlochConvention = 'lattice' | 'orbital';

export interface BlochOptions {
  convention?: BlochConvention;
}

/** A model's terms at fixed parameter values (`BlochHamiltonian.hoppings`). */
export interface Hoppings {
  count: number;
  /** Components of each cell vector: every direction of the model, periodic first. */
  cellDim: number;
  from: Int32Array;
  to: Int32Array;
  cells: Int32Array;
  re: Float64Array;
  im: Float64Array;
}

/** The spectral norm of a Hermitian m x m matrix: closed form up to 2 x 2, else its eigenvalues. */
function hermitianNorm(m: number, M: Float64Array): number {
  if (m === 1) return Math.abs(M[0]);
  if (m === 2) {
    const mean = (M[0] + M[6]) / 2, half = (M[0] - M[6]) / 2;
    return Math.abs(mean) + Math.sqrt(half * half + M[2] * M[2] + M[3] * M[3]);
  }
  const values = eigh(m, M).values;
  return Math.max(Math.abs(values[0]), Math.abs(values[m - 1]));
}

export class BlochHamiltonian {
  readonly spec: ModelSpec;
  /** Number of orbitals: the matrix size. */
  readonly size: number;
  /** Number of periodic directions: the length of k. */
  readonly dim: number;
  readonly convention: BlochConvention;
  /** Current parameter values (defaults filled in). */
  params: ParameterValues;

  private readonly termFrom: Int32Array;
  private readonly termTo: Int32Array;
  private readonly termOnsite: Uint8Array;
  /** Index of each term's phase vector in `phaseVectors`. */
  private readonly termPhase: Int32Array;
  /** Distinct displacement vectors (dim per entry) whose phases are computed once per k. */
  private readonly phaseVectors: Float64Array;
  private readonly phaseCount: number;
  private readonly evaluators: AmplitudeEvaluator[];
  /** Current amplitudes, interleaved (re, im) per term. */
  private readonly amplitudes: Float64Array;
  /** Per-k scratch: (cos, sin) of each distinct phase. */
  private readonly phases: Float64Array;
  /** Each phase's sup_theta ||T e^{i theta} + h.c.|| at the current amplitudes (slotNorms); null until asked. */
  private phaseNorms: Float64Array | null = null;

  constructor(model: ModelSpec, params: ParameterValues = {}, options: BlochOptions = {}) {
    const spec = validateModel(model);
    this.spec = spec;
    this.size = spec.orbitals.length;
    this.dim = spec.periodic;
    this.convention = options.convention ?? 'lattice';
    if (this.convention !== 'lattice' && this.convention !== 'orbital') {
      throw new ModelError('convention', `expected "lattice" or "orbital". Value: ${valueText(this.convention)}`);
    }
    const index = new Map(spec.orbitals.map((o, i) => [o.label, i]));
    const parameterNames = new Set(Object.keys(spec.parameters));
    const n = spec.terms.length;
    this.termFrom = new Int32Array(n);
    this.termTo = new Int32Array(n);
    this.termOnsite = new Uint8Array(n);
    this.termPhase = new Int32Array(n);
    this.evaluators = [];
    const phaseKeys = new Map<string, number>();
    const vectors: number[] = [];
    spec.terms.forEach((t, i) => {
      const a = index.get(t.from)!;
      const b = index.get(t.to)!;
      this.termFrom[i] = a;
      this.termTo[i] = b;
      this.termOnsite[i] = a === b && t.cell.every((c) => c === 0) ? 1 : 0;
      const d = t.cell.map((c, j) =>
        this.convention === 'orbital' ? c + spec.orbitals[b].position[j] - spec.orbitals[a].position[j] : c,
      );
      const key = d.join(',');
      let slot = phaseKeys.get(key);
      if (slot === undefined) {
        slot = phaseKeys.size;
        phaseKeys.set(key, slot);
        vectors.push(...d);
      }
      this.termPhase[i] = slot;
      this.evaluators.push(compileAmplitude(t.amplitude, `terms[${i}].amplitude`, parameterNames));
    });
    this.phaseVectors = Float64Array.from(vectors);
    this.phaseCount = phaseKeys.size;
    this.phases = new Float64Array(2 * this.phaseCount);
    this.amplitudes = new Float64Array(2 * n);
    this.params = {};
    this.setParameters(params);
  }

  /** Re-evaluate every amplitude for new parameter values (defaults fill the rest). */
  setParameters(values: ParameterValues): this {
    const resolved = resolveParameters(this.spec, values);
    const amps = this.amplitudes;
    for (let i = 0; i < this.evaluators.length; i++) {
      this.evaluators[i](resolved, amps, 2 * i);
      if (this.termOnsite[i] && Math.abs(amps[2 * i + 1]) > 1e-12 * Math.max(1, Math.abs(amps[2 * i]))) {
        throw new ModelError(
          `terms[${i}].amplitude`,
          `an onsite energy must be real (a non-Hermitian onsite block). Value: ${amps[2 * i]} + ${amps[2 * i + 1]}i`,
        );
      }
    }
    this.params = resolved;
    this.phaseNorms = null;
    return this;
  }

  /**
   * The model's terms at the current parameter values, as plain arrays: term t is
   * <cell(t), to(t)| H |0, from(t)> = re(t) + i im(t), with `cells` holding the spec's integer cell
   * vector (all of the model's directions, periodic first) of term t at [t*D, (t+1)*D). Onsite terms
   * (from = to, cell 0) appear once; every other term stands for itself and its Hermitian partner.
   * Real-space samples and principal layers are built from this, never from H(k).
   */
  hoppings(): Hoppings {
    const count = this.termFrom.length;
    const cellDim = this.spec.vectors.length;
    const cells = new Int32Array(count * cellDim);
    this.spec.terms.forEach((t, i) => t.cell.forEach((c, j) => (cells[i * cellDim + j] = c)));
    const re = new Float64Array(count);
    const im = new Float64Array(count);
    for (let t = 0; t < count; t++) [re[t], im[t]] = [this.amplitudes[2 * t], this.amplitudes[2 * t + 1]];
    return { count, cellDim, from: this.termFrom.slice(), to: this.termTo.slice(), cells, re, im };
  }

  /**
   * Term t's amplitude at complete parameter values `values` (defaults already filled), into
   * out[offset], out[offset + 1]: a sample whose parameters vary from bond to bond evaluates its
   * terms one by one. The model's own values are left as they are.
   */
  termAmplitude(t: number, values: ParameterValues, out: Float64Array, offset = 0): void {
    this.evaluators[t](values, out, offset);
  }

  private computePhases(k: ArrayLike<number>): void {
    const dim = this.dim;
    if (k.length < dim) throw new ModelError('k', `expected ${dim} components. Value: ${valueText(Array.from(k))}`);
    const v = this.phaseVectors;
    const ph = this.phases;
    for (let p = 0; p < this.phaseCount; p++) {
      let phi = 0;
      for (let j = 0; j < dim; j++) phi -= k[j] * v[p * dim + j];
      ph[2 * p] = Math.cos(phi);
      ph[2 * p + 1] = Math.sin(phi);
    }
  }

  /** H(k) into `out` (size x size). */
  fill(k: ArrayLike<number>, out: CMatrix): CMatrix {
    this.computePhases(k);
    return this.accumulate(out, -1);
  }

  /** dH/dk_dir (reduced momentum) into `out`. */
  fillDerivative(k: ArrayLike<number>, dir: number, out: CMatrix): CMatrix {
    if (!Number.isInteger(dir) || dir < 0 || dir >= this.dim) throw new ModelError('dir', `expected 0..${this.dim - 1}. Value: ${dir}`);
    this.computePhases(k);
    return this.accumulate(out, dir);
  }

  /**
   * A bound on ||H(k + delta) - H(k)|| (spectral norm) valid at every k and every step with
   * |delta_i| <= steps[i] (reduced radians). Each term changes its matrix element by
   * |t| |e^{-i d·delta} - 1| <= |t| min(2, x), x = sum_i |d_i| steps_i. With `capped` false the
   * min(2, ...) is dropped, so steps of 1 along one axis bound sup_k ||dH/dk_i||. By Weyl's
   * inequality every eigenvalue moves by at most this much between k and k + delta.
   */
  variationBound(steps: ArrayLike<number>, capped = true): number {
    return this.changeBound(steps, capped ? (x) => Math.min(2, x) : (x) => x);
  }

  /**
   * A bound on ||H(k + delta) - H(k) - sum_i delta_i dH/dk_i|| at every k for |delta_i| <= steps[i]:
   * the second-order remainder, |e^{-ix} - 1 + ix| <= x^2/2 per term.
   */
  remainderBound(steps: ArrayLike<number>): number {
    return this.changeBound(steps, (x) => (x * x) / 2);
  }

  /**
   * The smaller of two bounds on the norm of a change of H(k) whose every phase factor e^{-i d·k}
   * changes by at most change(x), x = sum_i |d_i| steps_i:
   * - by rows (rowSumBound), term by term;
   * - by phases: the terms sharing a phase vector d add up to A(k) = T e^{-i d·k} + h.c., and a
   *   change z of its phase factor changes A by T z + h.c. = |z| (T e^{i theta} + h.c.) for some
   *   theta, whose norm is at most |z| sup_theta ||T e^{i theta} + h.c.|| (slotNorms). Where the
   *   terms of one phase share rows (a Pauli structure: cos k sz + sin k sx) this is up to twice
   *   tighter: the rows count |cos| and |sin| apart, the norm counts them together.
   */
  private changeBound(steps: ArrayLike<number>, change: (x: number) => number): number {
    const norms = this.slotNorms();
    const dim = this.dim;
    let byPhase = 0;
    for (let p = 0; p < this.phaseCount; p++) {
      if (norms[p] === 0) continue;
      let x = 0;
      for (let j = 0; j < dim; j++) x += Math.abs(this.phaseVectors[p * dim + j]) * steps[j];
      byPhase += norms[p] * change(x);
    }
    return Math.min(this.rowSumBound(steps, change), byPhase);
  }

  /**
   * For each phase vector, an upper bound on sup_theta ||T e^{i theta} + T^dagger e^{-i theta}||, T the
   * sum of its terms: the largest norm at 64 angles, plus how far the norm can move between them,
   * 2 ||T|| pi / 64 with ||T|| <= sqrt(largest row sum x largest column sum of |T|); never more than
   * 2 ||T||. Solved on the few orbitals the phase's terms touch (above 12 of them only 2 ||T||).
   */
  private slotNorms(): Float64Array {
    if (this.phaseNorms !== null) return this.phaseNorms;
    const ANGLES = 64, MAX_ORBITALS = 12;
    const norms = new Float64Array(this.phaseCount);
    const amps = this.amplitudes;
    for (let p = 0; p < this.phaseCount; p++) {
      const terms: number[] = [];
      for (let t = 0; t < this.termFrom.length; t++) if (this.termPhase[t] === p && !this.termOnsite[t]) terms.push(t);
      if (terms.length === 0) continue;
      const orbitals = [...new Set(terms.flatMap((t) => [this.termFrom[t], this.termTo[t]]))];
      const m = orbitals.length;
      const at = new Map(orbitals.map((o, i) => [o, i]));
      // T[to][from], m x m interleaved complex.
      const T = new Float64Array(2 * m * m);
      for (const t of terms) {
        const q = 2 * (at.get(this.termTo[t])! * m + at.get(this.termFrom[t])!);
        T[q] += amps[2 * t];
        T[q + 1] += amps[2 * t + 1];
      }
      const rowSums = new Float64Array(m), colSums = new Float64Array(m);
      for (let r = 0; r < m; r++) for (let c = 0; c < m; c++) {
        const a = Math.hypot(T[2 * (r * m + c)], T[2 * (r * m + c) + 1]);
        rowSums[r] += a;
        colSums[c] += a;
      }
      const normT = Math.sqrt(Math.max(...rowSums) * Math.max(...colSums));
      if (normT === 0) continue;
      if (m > MAX_ORBITALS) {
        norms[p] = 2 * normT;
        continue;
      }
      let largest = 0;
      const M = new Float64Array(2 * m * m);
      for (let j = 0; j < ANGLES; j++) {
        const c = Math.cos((2 * Math.PI * j) / ANGLES), s = Math.sin((2 * Math.PI * j) / ANGLES);
        M.fill(0);
        for (let r = 0; r < m; r++) for (let q = 0; q < m; q++) {
          const re = T[2 * (r * m + q)], im = T[2 * (r * m + q) + 1];
          // T e^{i theta} at (r, q) and its conjugate transpose at (q, r).
          M[2 * (r * m + q)] += re * c - im * s;
          M[2 * (r * m + q) + 1] += re * s + im * c;
          M[2 * (q * m + r)] += re * c - im * s;
          M[2 * (q * m + r) + 1] -= re * s + im * c;
        }
        largest = Math.max(largest, hermitianNorm(m, M));
      }
      // The margin between angles, and a hair for the solver's rounding.
      norms[p] = Math.min(2 * normT, largest + (2 * Math.PI * normT) / ANGLES + 1e-12 * normT * m);
    }
    this.phaseNorms = norms;
    return norms;
  }

  /**
   * max over rows of sum of |t| change(x) over the terms touching the row, x = sum_i |d_i| steps_i:
   * the spectral norm of a Hermitian matrix is at most its largest absolute row sum.
   */
  private rowSumBound(steps: ArrayLike<number>, change: (x: number) => number): number {
    const n = this.size, dim = this.dim;
    const rows = new Float64Array(n);
    const amps = this.amplitudes;
    for (let t = 0; t < this.termFrom.length; t++) {
      const p = this.termPhase[t];
      let x = 0;
      for (let j = 0; j < dim; j++) x += Math.abs(this.phaseVectors[p * dim + j]) * steps[j];
      const w = Math.hypot(amps[2 * t], amps[2 * t + 1]) * change(x);
      rows[this.termFrom[t]] += w;
      rows[this.termTo[t]] += w;
    }
    let worst = 0;
    for (let a = 0; a < n; a++) worst = Math.max(worst, rows[a]);
    return worst;
  }

  /** Sum the terms with their phases; with dir >= 0, each term is multiplied by -i d_dir. */
  private accumulate(out: CMatrix, dir: number): CMatrix {
    const n = this.size;
    out.fill(0, 0, 2 * n * n);
    const amps = this.amplitudes;
    const ph = this.phases;
    const dim = this.dim;
    for (let t = 0; t < this.termFrom.length; t++) {
      const p = this.termPhase[t];
      const tr = amps[2 * t], ti = amps[2 * t + 1];
      const cr = ph[2 * p], ci = ph[2 * p + 1];
      let re = tr * cr - ti * ci;
      let im = tr * ci + ti * cr;
      if (dir >= 0) {
        const d = this.phaseVectors[p * dim + dir];
        const r = im * d;
        im = -re * d;
        re = r;
      }
      const a = this.termFrom[t];
      const b = this.termTo[t];
      out[2 * (b * n + a)] += re;
      out[2 * (b * n + a) + 1] += im;
      if (!this.termOnsite[t]) {
        out[2 * (a * n + b)] += re;
        out[2 * (a * n + b) + 1] -= im;
      }
    }
    return out;
  }
}

/** Compile a model for Bloch Hamiltonians; validates it first. */
export function blochHamiltonian(model: ModelSpec, params?: ParameterValues, options?: BlochOptions): BlochHamiltonian {
  return new BlochHamiltonian(model, params, options);
}
