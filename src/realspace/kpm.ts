/**
 * The kernel polynomial method (Weisse, Wellein, Alvermann & Fehske, RMP 78, 275 (2006)): a
 * function of the sample's Hamiltonian applied to a vector as a Chebyshev series,
 *   f(H) v = sum_{n<N} g_n c_n T_n(H~) v,   H~ = (H - b)/a,
 * with the Jackson damping g_n (their eq. 71), which keeps the series positive and resolves
 * energies to about pi a / N. The spectrum is mapped into [-1 + eps/2, 1 - eps/2] (eps = 0.01) from
 * Gershgorin bounds (sparse.ts), which always contain it. Only three vectors of the recursion live
 * at a time: memory is linear in the sample.
 */
import { checkInterrupt } from '../interrupt.js';
import { ModelError, valueText } from '../model/errors.js';
import { MAX_BATCH, MAX_OUTPUTS, MAX_TOTAL_OUTPUTS, realspaceWorkspace, type RealspaceKernels } from './kernels.js';
import { gershgorinBounds, matvec, type SparseMatrix } from './sparse.js';

export interface ChebyshevScaling {
  /** H~ = (H - centre) / halfWidth. */
  centre: number;
  halfWidth: number;
  /** Gershgorin bounds of the spectrum. */
  bounds: [number, number];
  rule: string;
}

const MARGIN = 0.01;

export function chebyshevScaling(h: SparseMatrix): ChebyshevScaling {
  const [lo, hi] = gershgorinBounds(h);
  const width = Math.max(hi - lo, 1e-12);
  return { centre: (hi + lo) / 2, halfWidth: width / (2 - MARGIN), bounds: [lo, hi], rule: 'Gershgorin discs, mapped to [-0.995, 0.995]' };
}

/** Jackson damping factors g_0 .. g_{N-1} (Weisse et al., eq. 71). */
export function jacksonKernel(order: number): Float64Array {
  const g = new Float64Array(order);
  const q = Math.PI / (order + 1);
  for (let n = 0; n < order; n++) g[n] = ((order - n + 1) * Math.cos(q * n) + Math.sin(q * n) / Math.tan(q)) / (order + 1);
  return g;
}

/** Damped coefficients of the step theta(x_F - x) on [-1, 1]: the projector below x_F. */
export function stepCoefficients(xF: number, order: number): Float64Array {
  const g = jacksonKernel(order);
  const phi = Math.acos(Math.max(-1, Math.min(1, xF)));
  const c = new Float64Array(order);
  c[0] = (1 - phi / Math.PI) * g[0];
  for (let n = 1; n < order; n++) c[n] = ((-2 * Math.sin(n * phi)) / (n * Math.PI)) * g[n];
  return c;
}

/** Damped coefficients of delta(x - x0) on [-1, 1] (a density at x0, per unit of x). */
export function deltaCoefficients(x0: number, order: number): Float64Array {
  const g = jacksonKernel(order);
  const theta = Math.acos(x0);
  const w = 1 / (Math.PI * Math.sqrt(1 - x0 * x0));
  const c = new Float64Array(order);
  c[0] = w * g[0];
  for (let n = 1; n < order; n++) c[n] = 2 * w * Math.cos(n * theta) * g[n];
  return c;
}

export function checkOrder(order: unknown, fallback: number): number {
  const n = order ?? fallback;
  if (typeof n !== 'number' || !Number.isInteger(n) || n < 2 || n > 1e6) throw new ModelError('order', `expected an integer from 2 to 1e6 (Chebyshev moments). Value: ${valueText(order)}`);
  return n;
}

/** The scaled coordinate of an energy, refusing one outside the Gershgorin bounds. */
export function scaledEnergy(energy: number, s: ChebyshevScaling, field: string): number {
  if (typeof energy !== 'number' || !Number.isFinite(energy)) throw new ModelError(field, `expected a finite number. Value: ${valueText(energy)}`);
  if (energy <= s.bounds[0] || energy >= s.bounds[1]) {
    throw new ModelError(field, `outside the sample's spectrum, which lies within [${s.bounds[0]}, ${s.bounds[1]}] (Gershgorin bounds). Value: ${energy}`);
  }
  return (energy - s.centre) / s.halfWidth;
}

/**
 * outs[s] = sum_n coefficients[s][n] T_n(H~) v for each set s (sets may differ in length: a series
 * and its half-order check share one recursion). With `probe`, moments[n] receives the real part
 * of component `index` of T_n(H~) v: for v = e_index, the local moments <e_index|T_n(H~)|e_index>.
 * Work vectors are the caller's: three of 2n doubles. v is not modified.
 */
export function chebyshevApply(
  h: SparseMatrix, s: ChebyshevScaling, coefficients: Float64Array[], v: Float64Array, outs: Float64Array[],
  work: [Float64Array, Float64Array, Float64Array], probe: { index: number; moments: Float64Array } | null = null,
): void {
  if (coefficients.length !== outs.length || coefficients.length < 1 || coefficients.length > 2) throw new RangeError('chebyshevApply: one or two coefficient sets, one output each');
  const len = 2 * h.n;
  const order = Math.max(...coefficients.map((c) => c.length));
  const [c0, c1] = coefficients;
  const o0 = outs[0], o1 = outs.length > 1 ? outs[1] : null;
  let [prev, cur, next] = work;
  prev.set(v.subarray(0, len));
  for (let i = 0; i < len; i++) o0[i] = c0[0] * prev[i];
  if (o1 !== null) for (let i = 0; i < len; i++) o1[i] = c1[0] * prev[i];
  if (probe !== null) probe.moments[0] = prev[2 * probe.index];
  if (order < 2) return;
  matvec(h, prev, cur, s.centre, s.halfWidth);
  const k0 = c0.length > 1 ? c0[1] : 0;
  for (let i = 0; i < len; i++) o0[i] += k0 * cur[i];
  if (o1 !== null) {
    const k1 = c1.length > 1 ? c1[1] : 0;
    for (let i = 0; i < len; i++) o1[i] += k1 * cur[i];
  }
  if (probe !== null && probe.moments.length > 1) probe.moments[1] = cur[2 * probe.index];
  for (let n = 2; n < order; n++) {
    chebyshevStep(h, cur, prev, next, s.centre, 2 / s.halfWidth, o0, n < c0.length ? c0[n] : 0, o1, o1 !== null && n < c1.length ? c1[n] : 0);
    if (probe !== null && n < probe.moments.length) probe.moments[n] = next[2 * probe.index];
    [prev, cur, next] = [cur, next, prev];
    if ((n & 63) === 0) checkInterrupt();
  }
}

/**
 * One step of the recursion, fused with the accumulation so each vector is read once:
 * next = f (H - shift) cur - prev (f = 2/a), o0 += k0 next and, when o1 is given, o1 += k1 next.
 */
function chebyshevStep(
  h: SparseMatrix, cur: Float64Array, prev: Float64Array, next: Float64Array, shift: number, f: number,
  o0: Float64Array, k0: number, o1: Float64Array | null, k1: number,
): void {
  const { n, rowStart, columns, values } = h;
  let e = 0;
  for (let i = 0; i < n; i++) {
    let re = -shift * cur[2 * i];
    let im = -shift * cur[2 * i + 1];
    const end = rowStart[i + 1];
    for (; e < end; e++) {
      const c = columns[e] << 1;
      const vr = values[2 * e], vi = values[2 * e + 1];
      const xr = cur[c], xi = cur[c + 1];
      re += vr * xr - vi * xi;
      im += vr * xi + vi * xr;
    }
    const nr = f * re - prev[2 * i];
    const ni = f * im - prev[2 * i + 1];
    next[2 * i] = nr;
    next[2 * i + 1] = ni;
    o0[2 * i] += k0 * nr;
    o0[2 * i + 1] += k0 * ni;
    if (o1 !== null) {
      o1[2 * i] += k1 * nr;
      o1[2 * i + 1] += k1 * ni;
    }
  }
}

/**
 * Local moments mu_n = <e_i| T_n(H~) |e_i>, n < order, by the doubling of Weisse et al. (eq. 34):
 * mu_2k = 2 <t_k|t_k> - mu_0, mu_2k+1 = 2 <t_k+1|t_k> - mu_1, so order/2 products suffice.
 */
export function localMoments(h: SparseMatrix, s: ChebyshevScaling, order: number, index: number, work: [Float64Array, Float64Array, Float64Array], out: Float64Array): Float64Array {
  const len = 2 * h.n;
  let [prev, cur, next] = work;
  prev.fill(0, 0, len);
  prev[2 * index] = 1;
  matvec(h, prev, cur, s.centre, s.halfWidth);
  const dot = (a: Float64Array, b: Float64Array) => {
    let sum = 0;
    for (let i = 0; i < len; i++) sum += a[i] * b[i];
    return sum;
  };
  const mu0 = 1, mu1 = cur[2 * index];
  out[0] = mu0;
  if (order > 1) out[1] = mu1;
  // prev = t_{k-1}, cur = t_k
  for (let k = 1; 2 * k < order; k++) {
    out[2 * k] = 2 * dot(cur, cur) - mu0;
    if (2 * k + 1 >= order) break;
    matvec(h, cur, next, s.centre, s.halfWidth);
    for (let i = 0; i < len; i++) next[i] = 2 * next[i] - prev[i];
    out[2 * k + 1] = 2 * dot(next, cur) - mu1;
    [prev, cur, next] = [cur, next, prev];
    if ((k & 63) === 0) checkInterrupt();
  }
  return out;
}

/** One series of a `ChebyshevBatch` run: outputs[t] = sum_n coefficients[t][n] T_n(H~) input. */
export interface ChebyshevSeries {
  input: Float64Array;
  coefficients: Float64Array[];
  outputs: Float64Array[];
  /** moments[n] receives the real part of component `index` of T_n(H~) input (n < its length). */
  probe?: { index: number; moments: Float64Array };
}

/**
 * `chebyshevApply` for up to MAX_BATCH vectors at once, on the SIMD kernel of kernels.ts: the
 * matrix is streamed once per step for the whole batch (it is most of the memory traffic), and
 * each series stops at its own order. Same recursion, same sums, so the same results to rounding.
 * The matrix is copied into the kernels' memory at construction; keep the batch only for the
 * duration of one computation (the memory is shared between calls, see src/linalg/simd.ts).
 */
export class ChebyshevBatch {
  private readonly kernels: RealspaceKernels;
  private readonly memory: ArrayBuffer;
  private readonly n: number;
  /** Byte addresses of rowStart, columns, values and of the vector slots. */
  private readonly at: { rowStart: number; columns: number; values: number; slots: number };

  /** Bytes of the kernels' memory for a matrix of n rows and `entries` entries. */
  static bytes(n: number, entries: number): number {
    const align = (b: number) => Math.ceil(b / 16) * 16;
    return align(4 * (n + 1)) + align(4 * entries) + 16 * entries + SLOTS * 16 * n;
  }

  constructor(h: SparseMatrix, private readonly s: ChebyshevScaling) {
    const n = h.n, entries = h.rowStart[n];
    const align = (b: number) => Math.ceil(b / 16) * 16;
    const rowStart = 0, columns = align(4 * (n + 1)), values = columns + align(4 * entries);
    this.at = { rowStart, columns, values, slots: values + 16 * entries };
    const { kernels, memory } = realspaceWorkspace(ChebyshevBatch.bytes(n, entries));
    this.kernels = kernels;
    this.memory = memory;
    this.n = n;
    new Int32Array(memory, rowStart, n + 1).set(h.rowStart);
    new Int32Array(memory, columns, entries).set(h.columns.subarray(0, entries));
    new Float64Array(memory, values, 2 * entries).set(h.values.subarray(0, 2 * entries));
  }

  private slot(k: number): Float64Array {
    return new Float64Array(this.memory, this.at.slots + 16 * this.n * k, 2 * this.n);
  }

  /**
   * Runs the series: at most MAX_BATCH, the same number of outputs each (1 to MAX_OUTPUTS), at
   * most MAX_TOTAL_OUTPUTS outputs in all.
   */
  run(series: ChebyshevSeries[]): void {
    const q = series[0]?.coefficients.length ?? 0;
    if (series.length < 1 || series.length > MAX_BATCH || q < 1 || q > MAX_OUTPUTS || series.length * q > MAX_TOTAL_OUTPUTS || series.some((x) => x.coefficients.length !== q || x.outputs.length !== q)) {
      throw new RangeError(`ChebyshevBatch: 1 to ${MAX_BATCH} series with the same number (1 to ${MAX_OUTPUTS}) of coefficient sets and outputs, at most ${MAX_TOTAL_OUTPUTS} outputs in all`);
    }
    const len = 2 * this.n, bytes = 16 * this.n;
    const orderOf = (x: ChebyshevSeries) => Math.max(...x.coefficients.map((c) => c.length), x.probe?.moments.length ?? 0);
    // Longest first: the active series are always a prefix.
    const jobs = series.map((x) => ({ x, order: orderOf(x) })).sort((a, b) => b.order - a.order);
    const k = jobs.length;
    // Slots: three recursion vectors per series (rotating), then q outputs per series.
    const ring = jobs.map((_, j) => [3 * j, 3 * j + 1, 3 * j + 2]);
    const outSlot = (j: number, t: number) => 3 * MAX_BATCH + j * q + t;
    jobs.forEach(({ x }, j) => {
      const t0 = this.slot(ring[j][0]);
      t0.set(x.input.subarray(0, len));
      this.slot(ring[j][2]).fill(0);
      for (let t = 0; t < q; t++) {
        const o = this.slot(outSlot(j, t)), c0 = x.coefficients[t].length > 0 ? x.coefficients[t][0] : 0;
        for (let i = 0; i < len; i++) o[i] = c0 * t0[i];
      }
      if (x.probe !== undefined && x.probe.moments.length > 0) x.probe.moments[0] = t0[2 * x.probe.index];
    });
    const address = (slot: number) => this.at.slots + bytes * slot;
    const { centre, halfWidth } = this.s;
    const args: number[] = [];
    for (let step = 1; ; step++) {
      let active = 0;
      while (active < k && jobs[active].order > step) active++;
      if (active === 0) break;
      // Step 1: T_1 = H~ T_0 (f = 1/a, prev = the zeroed slot); later T_n = 2 H~ T_{n-1} - T_{n-2}.
      const f = (step === 1 ? 1 : 2) / halfWidth;
      args.length = 0;
      args.push(this.at.rowStart, this.at.columns, this.at.values, this.n, f, f * centre);
      for (let j = 0; j < active; j++) {
        const [prev, cur, next] = step === 1 ? [ring[j][2], ring[j][0], ring[j][1]] : ring[j];
        args.push(address(cur), address(prev), address(next));
      }
      for (let j = 0; j < active; j++) for (let t = 0; t < q; t++) args.push(address(outSlot(j, t)));
      for (let j = 0; j < active; j++) {
        for (let t = 0; t < q; t++) {
          const c = jobs[j].x.coefficients[t];
          args.push(step < c.length ? c[step] : 0);
        }
      }
      this.kernels[`step${active}x${q}`](...args);
      for (let j = 0; j < active; j++) {
        const r = ring[j];
        // After step 1: prev = T_0, cur = T_1, next = the spare; afterwards rotate.
        ring[j] = step === 1 ? [r[0], r[1], r[2]] : [r[1], r[2], r[0]];
        const probe = jobs[j].x.probe;
        if (probe !== undefined && step < probe.moments.length) probe.moments[step] = this.slot(ring[j][1])[2 * probe.index];
      }
      if ((step & 63) === 0) checkInterrupt();
    }
    jobs.forEach(({ x }, j) => {
      for (let t = 0; t < q; t++) x.outputs[t].set(this.slot(outSlot(j, t)));
    });
  }
}

/** Vector slots of a batch: three recursion vectors per series, then the outputs. */
const SLOTS = 3 * MAX_BATCH + MAX_TOTAL_OUTPUTS;
