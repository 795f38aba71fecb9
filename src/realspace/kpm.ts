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
