/**
 * Band structures along a k-path.
 */
import { checkInterrupt } from '../interrupt.js';
import { BandSampler, bandGroup, compileSource, groupGap, type BandGroup, type BandSelection, type SourceOptions, type SpectrumChecks, type SpectrumSource } from './common.js';
import { kPath, type KPath, type PathOptions } from './path.js';

export interface BandsOptions extends SourceOptions, PathOptions {
  /** The band group whose gap `checks` reports (default: the lower half). */
  bands?: BandSelection;
  /** Gap below which `checks.gapless` is set (default 1e-6, energy units of the model). */
  tolerance?: number;
}

export interface BandsResult {
  kind: 'bands';
  path: KPath;
  bandCount: number;
  /** Ascending energies, `bandCount` per path point (point-major). */
  energies: Float64Array;
  /** The group whose gap the checks measure; null when the model has a single band. */
  group: BandGroup | null;
  checks: SpectrumChecks;
}

/** Energies along a path (default: the lattice's customary high-symmetry path). */
export function bandStructure(source: SpectrumSource, options: BandsOptions = {}): BandsResult {
  const hamiltonian = compileSource(source, options);
  const path = kPath(hamiltonian.spec, options);
  const sampler = new BandSampler(hamiltonian);
  const nb = sampler.bandCount;
  const energies = new Float64Array(path.count * nb);
  const k = new Float64Array(path.dim);
  // Solve piece by piece so an interrupt lands within one segment's worth of work.
  const rowLength = Math.max(1, Math.ceil(path.count / Math.max(1, path.labels.length)));
  for (let p = 0; p < path.count; p++) {
    if (p % rowLength === 0) checkInterrupt();
    for (let i = 0; i < path.dim; i++) k[i] = 2 * Math.PI * path.fractions[p * path.dim + i];
    energies.set(sampler.solve(k), p * nb);
  }
  const group = nb > 1 || options.bands !== undefined ? bandGroup(options.bands, nb) : null;
  const checks: SpectrumChecks = { minGap: null, warnings: [] };
  if (group !== null) {
    let best = Infinity, at = 0;
    for (let p = 0; p < path.count; p++) {
      const g = groupGap(energies, p * nb, group, nb);
      if (g < best) { best = g; at = p; }
    }
    checks.minGap = best;
    checks.minGapAt = Array.from(path.fractions.subarray(at * path.dim, (at + 1) * path.dim));
    const tolerance = options.tolerance ?? 1e-6;
    if (best < tolerance) {
      checks.gapless = true;
      checks.warnings.push(`bands ${group.lo}..${group.hi}: the direct gap closes on the path (${best.toExponential(2)} at k = [${checks.minGapAt.map((x) => x.toFixed(4)).join(', ')}] reciprocal-lattice units)`);
    }
  }
  return { kind: 'bands', path, bandCount: nb, energies, group, checks };
}
