/**
 * Boundary modes of an open sample (a ribbon, a slab, a finite chain) told apart by where they live:
 * states rotated within a subspace to the eigenvectors of a diagonal operator (an edge's projector,
 * the difference of two edges' projectors, the chiral operator), and modes followed across a
 * closed line of the edge zone by eigenvector overlap, each crossing of an energy counted on the
 * edge that holds it.
 */
import { eigh } from '../linalg/eigh.js';
import { checkInterrupt } from '../interrupt.js';
import type { BandSampler } from '../spectra/common.js';

export interface EdgeMode {
  /** Where the band crosses the energy, in fractions of the line's reciprocal vector. */
  k: number;
  /** dE/dk (energy per radian along the line); its sign is the direction along the line. */
  velocity: number;
  /** The state's weight on this edge's layers at the crossing. */
  weight: number;
}

/**
 * Rotate the states (interleaved complex columns of length 2n) to the eigenvectors of the
 * operator diag(d) restricted to their span; returns its eigenvalues (ascending) and the rotated
 * states. Any basis of a subspace is as good as another: this one sorts it by d.
 */
export function rotateByDiagonal(states: Float64Array[], d: ArrayLike<number>): { values: Float64Array; states: Float64Array[] } {
  const m = states.length;
  if (m === 0) return { values: new Float64Array(0), states: [] };
  const p = new Float64Array(2 * m * m);
  for (let a = 0; a < m; a++) {
    for (let b = a; b < m; b++) {
      const x = states[a], y = states[b];
      let re = 0, im = 0;
      for (let r = 0; r < d.length; r++) {
        if (d[r] === 0) continue;
        re += d[r] * (x[2 * r] * y[2 * r] + x[2 * r + 1] * y[2 * r + 1]);
        im += d[r] * (x[2 * r] * y[2 * r + 1] - x[2 * r + 1] * y[2 * r]);
      }
      p[2 * (a * m + b)] = re; p[2 * (a * m + b) + 1] = im;
      p[2 * (b * m + a)] = re; p[2 * (b * m + a) + 1] = -im;
    }
  }
  const { values, vectors: c } = eigh(m, p);
  const out: Float64Array[] = [];
  for (let a = 0; a < m; a++) {
    const v = new Float64Array(states[0].length);
    for (let b = 0; b < m; b++) {
      const cr = c[2 * (b * m + a)], ci = c[2 * (b * m + a) + 1];
      const x = states[b];
      for (let r = 0; r < v.length; r += 2) {
        v[r] += cr * x[r] - ci * x[r + 1];
        v[r + 1] += cr * x[r + 1] + ci * x[r];
      }
    }
    out.push(v);
  }
  return { values, states: out };
}

/** The weight of a state on the rows marked in `mask`. */
export function weightOn(state: Float64Array, mask: Uint8Array): number {
  let w = 0;
  for (let r = 0; r < mask.length; r++) if (mask[r]) w += state[2 * r] ** 2 + state[2 * r + 1] ** 2;
  return w;
}

/** <v|H|v> for an n x n Hermitian matrix (interleaved) and a state of length 2n. */
export function expectation(matrix: Float64Array, n: number, v: Float64Array): number {
  let s = 0;
  for (let r = 0; r < n; r++) {
    let re = 0, im = 0;
    for (let c = 0; c < n; c++) {
      const hr = matrix[2 * (r * n + c)], hi = matrix[2 * (r * n + c) + 1];
      re += hr * v[2 * c] - hi * v[2 * c + 1];
      im += hr * v[2 * c + 1] + hi * v[2 * c];
    }
    s += v[2 * r] * re + v[2 * r + 1] * im;
  }
  return s;
}

/** Column b of an n x n eigenvector matrix, as its own vector. */
export function column(vectors: Float64Array, n: number, b: number): Float64Array {
  const v = new Float64Array(2 * n);
  for (let row = 0; row < n; row++) { v[2 * row] = vectors[2 * (row * n + b)]; v[2 * row + 1] = vectors[2 * (row * n + b) + 1]; }
  return v;
}

interface WindowState { e: number; edge: number; weight: number; weights: [number, number]; vector: Float64Array }

export interface LineCrossings {
  first: EdgeMode[];
  last: EdgeMode[];
  /** Crossings on neither edge (their first three described in `warnings`). */
  stray: number;
  warnings: string[];
}

/**
 * Crossings of `energy` by the states of an open sample along a closed line t in [-pi, pi) of its
 * edge zone (`kAt` writes the sample's momentum at t), sampled at nk points half a step off the
 * symmetric ones. Modes are followed by their eigenvectors, never by sorted bands: where two modes
 * cross at the energy (the two edges' modes at E = 0 of a symmetric ribbon, a Kramers pair at its
 * Dirac point) sorted bands kink and no band crosses. Inside `window`, well within the bulk gap,
 * every state is an edge state; each is given to the edge holding most of it (at least half), and
 * matched to the state of largest overlap (above 1/2) at the next k. A matched pair on either side
 * of the energy is a crossing.
 */
export function lineCrossings(
  sampler: BandSampler, onFirst: Uint8Array, onLast: Uint8Array, energy: number, window: [number, number],
  kAt: (t: number, out: Float64Array) => void, nk: number, edgeLayers: number,
): LineCrossings {
  const nb = sampler.bandCount;
  const k = new Float64Array(sampler.hamiltonian.dim);
  const dk = (2 * Math.PI) / nk;
  // States closer than this in energy are one level: any basis of it is as good, so the one that
  // splits it between the edges is taken.
  const degenerate = 1e-9 * Math.max(1, Math.abs(window[0]), Math.abs(window[1]));
  const firstDiag = Float64Array.from(onFirst);
  const samples: WindowState[][] = [];
  for (let p = 0; p < nk; p++) {
    checkInterrupt();
    kAt(-Math.PI + dk * (p + 0.5), k);
    const e = sampler.solveWithVectors(k);
    const here: WindowState[] = [];
    for (let b = 0; b < nb; b++) {
      if (e[b] <= window[0] || e[b] >= window[1]) continue;
      here.push({ e: e[b], edge: -1, weight: 0, weights: [0, 0], vector: column(sampler.vectors, nb, b) });
    }
    for (let i = 0; i < here.length;) {
      let j = i + 1;
      while (j < here.length && here[j].e - here[j - 1].e < degenerate) j++;
      if (j - i > 1) rotateByDiagonal(here.slice(i, j).map((s) => s.vector), firstDiag).states.forEach((v, a) => { here[i + a].vector = v; });
      i = j;
    }
    for (const state of here) {
      const wf = weightOn(state.vector, onFirst), wl = weightOn(state.vector, onLast);
      state.edge = wf >= 0.5 && wf >= wl ? 0 : wl >= 0.5 ? 1 : -1;
      state.weight = Math.max(wf, wl);
      state.weights = [wf, wl];
    }
    samples.push(here);
  }
  const overlap = (x: Float64Array, y: Float64Array): number => {
    let re = 0, im = 0;
    for (let i = 0; i < x.length; i += 2) {
      re += x[i] * y[i] + x[i + 1] * y[i + 1];
      im += x[i] * y[i + 1] - x[i + 1] * y[i];
    }
    return re * re + im * im;
  };
  const first: EdgeMode[] = [], last: EdgeMode[] = [], warnings: string[] = [];
  let stray = 0;
  for (let p = 0; p < nk; p++) {
    const next = samples[(p + 1) % nk];
    for (const a of samples[p]) {
      let best: WindowState | null = null, bestOverlap = 0.5;
      for (const b of next) {
        const o = overlap(a.vector, b.vector);
        if (o > bestOverlap) [best, bestOverlap] = [b, o];
      }
      if (best === null || (a.e < energy) === (best.e < energy)) continue;
      const t = (energy - a.e) / (best.e - a.e);
      const at = (-Math.PI + dk * (p + 0.5 + t)) / (2 * Math.PI);
      if (a.edge < 0 || best.edge !== a.edge) {
        stray++;
        if (stray <= 3) warnings.push(`a state crossing the energy at k = ${at.toFixed(4)} x 2pi lies on neither edge (weights ${a.weights[0].toFixed(2)} and ${a.weights[1].toFixed(2)} on the outer ${edgeLayers} layers of each): the sample may be too narrow for its boundary modes`);
        continue;
      }
      (a.edge === 0 ? first : last).push({ k: at, velocity: (best.e - a.e) / dk, weight: Math.min(a.weight, best.weight) });
    }
  }
  return { first, last, stray, warnings };
}
