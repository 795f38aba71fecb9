/**
 * The checks a gap-dependent result makes, built from plain numbers: a band group's gap statistics,
 * the gap tolerance and the coarseness limits. Nothing here compiles a model or diagonalises, so
 * the join of a split diagnostic (parts.ts) builds its checks on a main thread with the very code
 * the unsplit computation uses.
 */
import { ModelError, valueText } from '../model/errors.js';
import type { GapCertificate } from '../spectra/certify.js';
import type { BandGroup, GapProof, SpectrumChecks } from '../spectra/common.js';

/** Plaquette phases above this make a lattice Chern number untrustworthy: the grid is too coarse. */
export const COARSE_PLAQUETTE_PHASE = Math.PI / 2;

/** A link modulus (|det| of a normalised overlap) below this means neighbouring frames differ too much. */
export const COARSE_LINK = 0.9;

/** The gap statistics of a band group over the momenta sampled, in sampling order. */
export interface GapRecord {
  /** Smallest gap between the group and the other bands. */
  minGap: number;
  /** Reduced k (radians) where that gap was first met. */
  minGapAt: number[];
  /** Largest |energy| seen: the scale of the default gap tolerance. */
  energyScale: number;
}

/** "(0.25, 0.5)" for a reduced k in radians, as fractions of the reciprocal vectors. */
export function formatK(k: ArrayLike<number>): string {
  return '(' + Array.from(k, (x) => (x / (2 * Math.PI)).toFixed(4).replace(/\.?0+$/, '') || '0').join(', ') + ')';
}

/** The gap tolerance in force: the explicit one, or 1e-9 times the energy scale seen. */
export function gapTolerance(explicit: number | undefined, energyScale: number): number {
  if (explicit !== undefined) {
    if (!(explicit >= 0) || !Number.isFinite(explicit)) throw new ModelError('gapTolerance', `expected a nonnegative number. Value: ${valueText(explicit)}`);
    return explicit;
  }
  return 1e-9 * Math.max(energyScale, 1e-300);
}

/**
 * Records of consecutive stretches of one sampling order, folded as one sampler seeing them in
 * turn would: the first of equal smallest gaps wins, so the place reported does not depend on how
 * the momenta were split.
 */
export function mergeGaps(records: readonly GapRecord[]): GapRecord {
  let best: GapRecord = { minGap: Infinity, minGapAt: [], energyScale: 0 };
  let scale = 0;
  for (const r of records) {
    if (r.minGap < best.minGap) best = r;
    if (r.energyScale > scale) scale = r.energyScale;
  }
  return { minGap: best.minGap, minGapAt: [...best.minGapAt], energyScale: scale };
}

/**
 * The checks of a gap-dependent result: gapless when the smallest gap is at or below tolerance,
 * with a warning naming k and the gap.
 */
export function gapChecks(gap: GapRecord, group: BandGroup, grid: number[], explicitTolerance: number | undefined, what = 'the invariant'): SpectrumChecks {
  const tol = gapTolerance(explicitTolerance, gap.energyScale);
  const at = gap.minGapAt.map((x) => x / (2 * Math.PI));
  const checks: SpectrumChecks = { minGap: gap.minGap, minGapAt: at, grid: [...grid], warnings: [] };
  if (gap.minGap <= tol) {
    checks.gapless = true;
    const bands = group.lo === group.hi ? `band ${group.lo} touches` : `bands ${group.lo}-${group.hi} touch`;
    checks.warnings.push(
      `gapless: ${bands} the other bands at k = ${formatK(gap.minGapAt)} (fractions of the reciprocal vectors), ` +
        `gap ${gap.minGap.toExponential(2)} <= tolerance ${tol.toExponential(2)}; ${what} is undefined`,
    );
  }
  return checks;
}

/** The certificate as a result's `checks.gapProof`. */
export function gapProof(c: GapCertificate): GapProof {
  const proof: GapProof = { verdict: c.verdict, lowerBound: c.lowerBound, samples: c.samples, lines: c.positions.map((p) => p.length) };
  if (c.reason !== undefined) proof.reason = c.reason;
  return proof;
}

/**
 * The checks of an integer whose gap was certified (spectra/certify.ts): gapless, or a gap that
 * could not be proven, make it undefined, with a warning naming where and how small the gap got.
 * `certified` starts false: the caller sets it once the integer's own lattice condition holds.
 * `touching` words the closing (default: "band 0 touches the other bands").
 */
export function certificateChecks(cert: GapCertificate, group: BandGroup, grid: number[], what: string, touching?: string): SpectrumChecks {
  const at = cert.minGapAt.map((x) => x / (2 * Math.PI));
  const checks: SpectrumChecks = { minGap: cert.minGap, minGapAt: at, grid: [...grid], warnings: [], certified: false, gapProof: gapProof(cert) };
  const bands = touching ?? (group.lo === group.hi ? `band ${group.lo} touches the other bands` : `bands ${group.lo}-${group.hi} touch the other bands`);
  if (cert.verdict === 'gapless') {
    checks.gapless = true;
    checks.warnings.push(
      `gapless: ${bands} at k = ${formatK(cert.minGapAt)} (fractions of the reciprocal vectors), ` +
        `gap ${cert.minGap.toExponential(2)} <= tolerance ${cert.tolerance.toExponential(2)}; ${what} is undefined`,
    );
  } else if (cert.verdict === 'unproven') {
    checks.warnings.push(
      `gap not proven: ${cert.reason}; the smallest gap found is ${cert.minGap.toExponential(2)} at k = ${formatK(cert.minGapAt)}, ` +
        `so ${what} is withheld`,
    );
  }
  return checks;
}
