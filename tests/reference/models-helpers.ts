/**
 * Test-only helpers for the model checks: spectra from the Bloch Hamiltonian and the eigensolver,
 * and a small Fukui–Hatsugai–Suzuki lattice Chern number written from the paper's formula
 * (Fukui, Hatsugai, Suzuki, J. Phys. Soc. Jpn. 74, 1674 (2005)) in the sign convention of
 * ../../shared/references.md: C = -(1/2pi) sum Im ln[U1(k) U2(k+1) U1(k+2)* U2(k)*].
 */
import { blochHamiltonian, eigh, type ModelSpec, type ParameterValues } from '../../src/index.js';

export function spectrum(model: ModelSpec, params: ParameterValues, k: number[]): Float64Array {
  const h = blochHamiltonian(model, params);
  const m = new Float64Array(2 * h.size * h.size);
  h.fill(k, m);
  return eigh(h.size, m).values;
}

/** Eigen-decomposition at many k with one compiled Hamiltonian. */
export function solver(model: ModelSpec, params: ParameterValues = {}) {
  const h = blochHamiltonian(model, params);
  const m = new Float64Array(2 * h.size * h.size);
  return {
    size: h.size,
    at(k: number[]) {
      h.fill(k, m);
      return eigh(h.size, m);
    },
  };
}

/** Chern number of the lowest `bands` bands of a 2D model on an n x n grid, and the smallest direct gap above them. */
export function chern(model: ModelSpec, params: ParameterValues, bands: number, n = 24): { c: number; gap: number } {
  const s = solver(model, params);
  const size = s.size;
  let gap = Infinity;
  const states: Float64Array[][] = [];
  for (let i = 0; i < n; i++) {
    states.push([]);
    for (let j = 0; j < n; j++) {
      const { values, vectors } = s.at([(2 * Math.PI * i) / n - Math.PI, (2 * Math.PI * j) / n - Math.PI]);
      gap = Math.min(gap, values[bands] - values[bands - 1]);
      states[i].push(vectors);
    }
  }
  // det of the bands x bands overlap matrix <u_a(k)|u_b(k')>, as (re, im).
  const link = (u: Float64Array, v: Float64Array): [number, number] => {
    const o = new Float64Array(2 * bands * bands);
    for (let a = 0; a < bands; a++) for (let b = 0; b < bands; b++) {
      let re = 0, im = 0;
      for (let r = 0; r < size; r++) {
        const ur = u[2 * (r * size + a)], ui = u[2 * (r * size + a) + 1];
        const vr = v[2 * (r * size + b)], vi = v[2 * (r * size + b) + 1];
        re += ur * vr + ui * vi;
        im += ur * vi - ui * vr;
      }
      o[2 * (a * bands + b)] = re;
      o[2 * (a * bands + b) + 1] = im;
    }
    return complexDet(o, bands);
  };
  let total = 0;
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
    const u00 = states[i][j], u10 = states[(i + 1) % n][j], u11 = states[(i + 1) % n][(j + 1) % n], u01 = states[i][(j + 1) % n];
    const [ar, ai] = link(u00, u10), [br, bi] = link(u10, u11), [cr, ci] = link(u01, u11), [dr, di] = link(u00, u01);
    // U1(k) U2(k+1) conj(U1(k+2)) conj(U2(k))
    let re = ar * br - ai * bi, im = ar * bi + ai * br;
    [re, im] = [re * cr + im * ci, im * cr - re * ci];
    [re, im] = [re * dr + im * di, im * dr - re * di];
    total += Math.atan2(im, re);
  }
  return { c: -total / (2 * Math.PI), gap };
}

function complexDet(a: Float64Array, n: number): [number, number] {
  const m = Float64Array.from(a);
  let dr = 1, di = 0;
  for (let c = 0; c < n; c++) {
    let p = c;
    for (let r = c + 1; r < n; r++) if (Math.hypot(m[2 * (r * n + c)], m[2 * (r * n + c) + 1]) > Math.hypot(m[2 * (p * n + c)], m[2 * (p * n + c) + 1])) p = r;
    if (p !== c) {
      for (let k = 0; k < 2 * n; k++) [m[2 * c * n + k], m[2 * p * n + k]] = [m[2 * p * n + k], m[2 * c * n + k]];
      dr = -dr; di = -di;
    }
    const pr = m[2 * (c * n + c)], pi = m[2 * (c * n + c) + 1];
    [dr, di] = [dr * pr - di * pi, dr * pi + di * pr];
    const q = pr * pr + pi * pi;
    if (q === 0) return [0, 0];
    for (let r = c + 1; r < n; r++) {
      const xr = m[2 * (r * n + c)], xi = m[2 * (r * n + c) + 1];
      const fr = (xr * pr + xi * pi) / q, fi = (xi * pr - xr * pi) / q;
      for (let k = c; k < n; k++) {
        const yr = m[2 * (c * n + k)], yi = m[2 * (c * n + k) + 1];
        m[2 * (r * n + k)] -= fr * yr - fi * yi;
        m[2 * (r * n + k) + 1] -= fr * yi + fi * yr;
      }
    }
  }
  return [dr, di];
}
