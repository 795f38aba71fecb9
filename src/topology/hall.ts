/**
 * Anomalous Hall conductivity of 2D models, in units of e^2/h and in siemens.
 *
 * Convention (DEVELOPERS.md): sigma_xy = C e^2/h for a filled band group of Chern number C. For a
 * metal, the Fermi-sea integral at zero temperature,
 *   sigma_xy(mu) = (e^2/h) (1/2pi) sum_n integral over the zone of Theta(mu - E_n(k)) Omega_n(k),
 * with the Kubo curvature of each band; in a gap above a group it equals that group's C.
 */
import { checkInterrupt } from '../interrupt.js';
import { ModelError, valueText } from '../model/errors.js';
import { chernNumber, type ChernOptions, type ChernResult } from './chern.js';
import { compileSource, FrameSampler, orientation2D, resolvePlane, type PlaneSpec, type TopologyChecks, type TopologyOptions, type TopologySource } from './common.js';
import { KuboCurvature } from './curvature.js';

/** Elementary charge and Planck constant, exact in the SI since 2019 (CODATA 2018). */
export const ELEMENTARY_CHARGE = 1.602176634e-19;
export const PLANCK_CONSTANT = 6.62607015e-34;
/** The conductance quantum of the Hall effect, e^2/h in siemens. */
export const HALL_CONDUCTANCE_QUANTUM = (ELEMENTARY_CHARGE * ELEMENTARY_CHARGE) / PLANCK_CONSTANT;

export interface HallOptions extends TopologyOptions {
  /** Chemical potentials (energy units) for the Fermi-sea integral; omit for an insulator's quantised value. */
  mu?: number[];
  /** Insulator: as for Chern numbers ('auto' by default). Fermi sea: k-points per direction (default 128). */
  grid?: number | [number, number] | 'auto';
  plane?: PlaneSpec;
}

export interface HallResult {
  kind: 'hall';
  /** Insulator: sigma_xy of the filled group; null when its Chern number is undefined. */
  sigma?: number | null;
  siemens?: number | null;
  chern?: ChernResult;
  /** Fermi sea: the chemical potentials and sigma_xy(mu) in e^2/h and in siemens. */
  mu?: Float64Array;
  sigmaOfMu?: Float64Array;
  siemensOfMu?: Float64Array;
  unit: 'e^2/h';
  checks: TopologyChecks;
}

export function hallConductivity(source: TopologySource, options: HallOptions = {}): HallResult {
  const h = compileSource(source, options);
  if (options.mu === undefined) {
    const chern = chernNumber(h, options as ChernOptions);
    const sigma = chern.chern;
    return { kind: 'hall', sigma, siemens: sigma === null ? null : sigma * HALL_CONDUCTANCE_QUANTUM, chern, unit: 'e^2/h', checks: chern.checks };
  }
  if (!Array.isArray(options.mu) || options.mu.length === 0 || !options.mu.every((x) => typeof x === 'number' && Number.isFinite(x))) {
    throw new ModelError('mu', `expected a non-empty array of chemical potentials. Value: ${valueText(options.mu)}`);
  }
  const plane = resolvePlane(h.dim, options.plane);
  const grid = options.grid === undefined ? 128 : options.grid;
  if (grid === 'auto') throw new ModelError('grid', 'the Fermi-sea integral needs an explicit grid (a metal has no integer to converge to). Value: "auto"');
  const [n1, n2] = typeof grid === 'number' ? [grid, grid] : grid;
  if (![n1, n2].every((x) => Number.isInteger(x) && x >= 3 && x <= 100_000)) throw new ModelError('grid', `expected whole numbers of k-points from 3 to 100000. Value: ${valueText(grid)}`);
  const nb = h.size;
  // Every band's curvature: the "group" is band 0 (any group works; only the per-band values are used).
  const sampler = new FrameSampler(h, { lo: 0, hi: 0 });
  const kubo = new KuboCurvature(sampler);
  const all = { lo: 0, hi: nb - 1 };
  const energies = new Float64Array(n1 * n2 * nb);
  const curvature = new Float64Array(n1 * n2 * nb);
  const k = Float64Array.from(plane.origin);
  const [ax1, ax2] = plane.axes;
  for (let b = 0; b < n2; b++) {
    checkInterrupt();
    k[ax2] = -Math.PI + (2 * Math.PI * b) / n2;
    for (let a = 0; a < n1; a++) {
      k[ax1] = -Math.PI + (2 * Math.PI * a) / n1;
      kubo.at(k, ax1, ax2, { lo: 0, hi: 0 }, all);
      const at = (b * n1 + a) * nb;
      energies.set(sampler.energies, at);
      curvature.set(kubo.perBand, at);
    }
  }
  // Sort the states by energy once; sigma(mu) is then a running sum.
  const order = Array.from({ length: energies.length }, (_, i) => i).sort((x, y) => energies[x] - energies[y]);
  const weight = (orientation2D(h.spec) * ((2 * Math.PI) / n1) * ((2 * Math.PI) / n2)) / (2 * Math.PI);
  const mus = Float64Array.from(options.mu);
  const byMu = Array.from(mus.keys()).sort((x, y) => mus[x] - mus[y]);
  const sigmaOfMu = new Float64Array(mus.length);
  let running = 0, next = 0;
  for (const i of byMu) {
    while (next < order.length && energies[order[next]] < mus[i]) running += curvature[order[next++]];
    sigmaOfMu[i] = running * weight;
  }
  const checks: TopologyChecks = { minGap: null, grid: [n1, n2], warnings: [] };
  if (nb > 1 && kubo.minSplitting <= sampler.tolerance(options.gapTolerance)) {
    checks.warnings.push(`two bands touch on the grid (splitting ${kubo.minSplitting.toExponential(2)}): their separate curvatures diverge there and sigma(mu) between them is unreliable`);
  }
  return { kind: 'hall', mu: mus, sigmaOfMu, siemensOfMu: sigmaOfMu.map((s) => s * HALL_CONDUCTANCE_QUANTUM), unit: 'e^2/h', checks };
}
