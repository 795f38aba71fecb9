/**
 * Local Chern marker (Bianco & Resta, PRB 84, 241106(R) (2011); formula and sign in marker.ts) at
 * chosen cells of a large sample, with the projector as a Jackson-damped Chebyshev series of the
 * step at E_F (kpm.ts; Weisse et al., RMP 78, 275 (2006)). For each orbital r of a cell:
 *   a = P e_r,  c = y a - P (y a),  C(r) = -4 pi s Im <x a | c>,
 * two series per orbital, only a few vectors of the sample's length alive: memory linear in it.
 * The series of GROUP orbitals run as one batch (ChebyshevBatch, kpm.ts: one pass over the matrix
 * per step for all of them), first P e_r at orders N and N/2, then P (y a) for both.
 *
 * Checks: the marker again with the series cut at N/2 (`halfOrderMarker`; their difference is the
 * convergence check), and the local density of states at E_F at each cell from the moments of the
 * first series, which is not small when states sit at E_F within the kernel's resolution pi a/N
 * (a closed gap, or edge states: the Chebyshev path cannot see the sample's spectrum otherwise).
 *
 * Fermi energy rule (default): the middle of the clean crystal's gap at half filling, from the
 * Bloch bands on a 48 x 48 grid (48 points in 1D, 16^3 in 3D); refused when the clean bands overlap
 * there (then E_F must be given).
 */
import type { BlochHamiltonian } from '../bloch/hamiltonian.js';
import type { CostEstimate } from '../cost.js';
import { HermitianEigensolver } from '../linalg/eigh.js';
import { ModelError } from '../model/errors.js';
import { refuseIfTooLarge } from './budget.js';
import { checkTwoDimensional } from './bott.js';
import { ChebyshevBatch, chebyshevScaling, checkOrder, deltaCoefficients, scaledEnergy, stepCoefficients } from './kpm.js';
import { checkCells, edgeDistance, type LocalMarkerResult } from './marker.js';
import { checkFermiOptions, type FermiOptions } from './occupied.js';
import { buildSample, checkSampleOptions, sampleCost, type Sample, type SampleOptions } from './sample.js';

export interface ChebyshevMarkerOptions extends SampleOptions, Pick<FermiOptions, 'fermiEnergy'> {
  /** Chebyshev order N; default 1000. */
  order?: number;
  /** Cells to report; default the centre cell. */
  cells?: number[][];
}

/** Orbitals whose series run together: two series each, so one batch holds 2 GROUP of them. */
const GROUP = 2;

/** The clean crystal's gap middle at half filling, and the gap. */
export function cleanGapMiddle(h: BlochHamiltonian): { energy: number; gap: number } {
  const n = h.size, half = Math.floor(n / 2);
  if (half === 0 || half === n) throw new ModelError('fermiEnergy', `a model of ${n} orbital(s) has no gap at half filling; give the Fermi energy`);
  const counts = h.dim === 1 ? [48] : h.dim === 2 ? [48, 48] : [16, 16, 16];
  const total = counts.reduce((a, b) => a * b, 1);
  const mat = new Float64Array(2 * n * n), w = new Float64Array(n);
  const solver = new HermitianEigensolver(n);
  let top = -Infinity, bottom = Infinity;
  const k = new Array<number>(h.dim).fill(0);
  for (let p = 0; p < total; p++) {
    let rest = p;
    for (let j = 0; j < h.dim; j++) {
      k[j] = -Math.PI + (2 * Math.PI * (rest % counts[j])) / counts[j];
      rest = Math.floor(rest / counts[j]);
    }
    solver.solve(h.fill(k, mat), w);
    top = Math.max(top, w[half - 1]);
    bottom = Math.min(bottom, w[half]);
  }
  if (!(bottom > top)) throw new ModelError('fermiEnergy', `the clean bands overlap at half filling (band ${half} reaches ${top}, band ${half + 1} ${bottom}): give the Fermi energy`);
  return { energy: (top + bottom) / 2, gap: bottom - top };
}

/** Nonzero entries per row times rows, from the model's terms per cell. */
const entries = (orbitals: number, terms: number, cells: number) => cells * (orbitals + 2 * terms);

export function chebyshevMarkerCost(orbitals: number, terms: number, options: ChebyshevMarkerOptions): CostEstimate {
  const sizes = Array.isArray(options.sizes) ? options.sizes : [1];
  const cells = sizes.reduce((a, b) => a * Math.max(1, b), 1);
  const n = cells * orbitals;
  const order = typeof options.order === 'number' ? options.order : 1000;
  const chosen = Array.isArray(options.cells) ? options.cells.length : 1;
  const base = sampleCost(orbitals, terms, sizes);
  // the batch (a copy of the matrix, its vectors) and a, a(N/2), y a for GROUP orbitals
  const nonzeros = entries(orbitals, terms, cells);
  return { bytes: base.bytes + ChebyshevBatch.bytes(n, nonzeros) + 4 * GROUP * 16 * n, seconds: base.seconds + chosen * orbitals * 2.5 * order * entries(orbitals, terms, cells) * 8e-9 };
}

export function chebyshevMarker(h: BlochHamiltonian, options: ChebyshevMarkerOptions): LocalMarkerResult {
  checkTwoDimensional(h.dim, 'the local Chern marker');
  const checked = checkSampleOptions(options, h.dim);
  checkFermiOptions(options);
  const order = checkOrder(options.order, 1000);
  const chosen = checkCells(options.cells, checked.sizes) ?? [checked.sizes.map((s) => Math.floor(s / 2))];
  refuseIfTooLarge('the Chebyshev local marker', checked.sizes, (sizes) => chebyshevMarkerCost(h.size, h.spec.terms.length, { ...options, sizes }));
  let fermiEnergy = options.fermiEnergy, fermiRule = 'given';
  if (fermiEnergy === undefined) {
    const clean = cleanGapMiddle(h);
    fermiEnergy = clean.energy;
    fermiRule = `middle of the clean crystal's gap at half filling (gap ${clean.gap.toPrecision(4)} on a Bloch grid)`;
  }
  return chebyshevMarkerOfSample(buildSample(h, options), fermiEnergy, fermiRule, order, chosen);
}

export function chebyshevMarkerOfSample(sample: Sample, fermiEnergy: number, fermiRule: string, order: number, chosen: number[][]): LocalMarkerResult {
  const s = chebyshevScaling(sample.hamiltonian);
  const xF = scaledEnergy(fermiEnergy, s, 'fermiEnergy');
  const n = sample.size, dim = sample.dim, len = 2 * n;
  const half = Math.max(2, Math.floor(order / 2));
  const full = stepCoefficients(xF, order), halved = stepCoefficients(xF, half);
  const delta = deltaCoefficients(xF, order);
  const x = (i: number) => sample.positions[i * dim];
  const y = (i: number) => sample.positions[i * dim + 1];
  const count = chosen.length;
  const marker = new Float64Array(count), halfMarker = new Float64Array(count), ldos = new Float64Array(count);
  const distance = new Int32Array(count);
  const index = new Map<string, number>();
  chosen.forEach((c, k) => index.set(c.join(','), k));
  const targets: { r: number; k: number }[] = [];
  for (let r = 0; r < n; r++) {
    const k = index.get(Array.from(sample.cells.subarray(r * dim, (r + 1) * dim)).join(','));
    if (k !== undefined) targets.push({ r, k });
  }
  // Orbitals GROUP at a time: both series of each share the batch's passes over the matrix.
  const batch = new ChebyshevBatch(sample.hamiltonian, s);
  const vectors = (count: number) => Array.from({ length: count }, () => new Float64Array(len));
  const a = vectors(GROUP), aHalf = vectors(GROUP), ya = vectors(2 * GROUP);
  const moments = Array.from({ length: GROUP }, () => new Float64Array(order));
  /** -4 pi s Im <x a | y a - P(y a)>, P(y a) in pya. */
  const markerOf = (a: Float64Array, pya: Float64Array) => {
    let im = 0;
    for (let i = 0; i < n; i++) {
      const xr = x(i) * a[2 * i], xi = x(i) * a[2 * i + 1];
      const cr = y(i) * a[2 * i] - pya[2 * i], ci = y(i) * a[2 * i + 1] - pya[2 * i + 1];
      im += xr * ci - xi * cr;
    }
    return -4 * Math.PI * sample.orientation * im;
  };
  const scaleByY = (a: Float64Array, out: Float64Array) => {
    for (let i = 0; i < n; i++) {
      out[2 * i] = y(i) * a[2 * i];
      out[2 * i + 1] = y(i) * a[2 * i + 1];
    }
  };
  for (let g = 0; g < targets.length; g += GROUP) {
    const group = targets.slice(g, g + GROUP);
    // a = P e_r at orders N and N/2, with the local moments of the first series.
    batch.run(group.map(({ r }, j) => {
      ya[j].fill(0);
      ya[j][2 * r] = 1;
      return { input: ya[j], coefficients: [full, halved], outputs: [a[j], aHalf[j]], probe: { index: r, moments: moments[j] } };
    }));
    // P (y a), each at its own order; the results replace the inputs.
    batch.run(group.flatMap((_, j) => {
      scaleByY(a[j], ya[2 * j]);
      scaleByY(aHalf[j], ya[2 * j + 1]);
      return [
        { input: ya[2 * j], coefficients: [full], outputs: [ya[2 * j]] },
        { input: ya[2 * j + 1], coefficients: [halved], outputs: [ya[2 * j + 1]] },
      ];
    }));
    group.forEach(({ k }, j) => {
      let local = 0;
      for (let m = 0; m < order; m++) local += delta[m] * moments[j][m];
      ldos[k] += local / s.halfWidth;
      marker[k] += markerOf(a[j], ya[2 * j]);
      halfMarker[k] += markerOf(aHalf[j], ya[2 * j + 1]);
    });
  }
  chosen.forEach((c, k) => (distance[k] = edgeDistance(c, sample.sizes)));
  const warnings: string[] = [];
  const present = new Set(targets.map((t) => t.k));
  chosen.forEach((c, k) => {
    if (present.has(k)) return;
    marker[k] = halfMarker[k] = NaN;
    warnings.push(`cell ${JSON.stringify(c)} is vacant: no marker`);
  });
  const change = marker.reduce((w, m, k) => (Number.isNaN(m) ? w : Math.max(w, Math.abs(m - halfMarker[k]))), 0);
  if (change > 0.05) warnings.push(`the marker changes by ${change.toPrecision(3)} between orders ${half} and ${order}: not converged; raise the order`);
  const resolution = (Math.PI * s.halfWidth) / order;
  // A cell's states spread evenly over the spectrum would give (orbitals per cell) / width.
  const even = sample.size / sample.sizes.reduce((p, q) => p * q, 1) / (s.bounds[1] - s.bounds[0]);
  const crowded = ldos.reduce((w, v) => Math.max(w, v), 0);
  if (crowded > 0.05 * even) warnings.push(`states at the Fermi energy within the resolution ${resolution.toPrecision(3)} (local density ${crowded.toPrecision(3)} per energy, ${(crowded / even).toPrecision(2)} of an even spread): the gap there is closed or below the resolution`);
  const near = distance.reduce((w, d) => Math.min(w, d), Infinity);
  if (near < 3) warnings.push(`a cell lies ${near} cell(s) from an edge or periodic seam: the marker approaches the Chern number only in the bulk`);
  return {
    kind: 'local-marker', method: 'chebyshev', cells: Int32Array.from(chosen.flat()), marker, edgeDistance: distance, total: null,
    fermiEnergy, orbitals: n, sizes: sample.sizes, boundary: sample.boundary, disorder: sample.disorder,
    checks: { warnings, fermiRule, order, halfOrderMarker: halfMarker, orderChange: change, ldosAtFermi: ldos, resolution, spectrumBounds: s.bounds, boundsRule: s.rule },
  };
}
