/**
 * A grid diagnostic split into parts that join into exactly the unsplit result, so a host with
 * several workers can share one request among them.
 *
 * Part i of c holds a contiguous run of rows, [floor(i*rows/c), floor((i+1)*rows/c)): for a
 * curvature map the plaquette (or grid-point) rows along the plane's second axis, for a
 * Wannier-centre flow the nAcross + 1 across-points. Each part computes what it needs at its edge
 * (a map the row above its last, a flow the column before its first) and reports statistics only
 * of the momenta it holds, in the unsplit sampling order, so the join reproduces every value, the
 * checks and the invariant. The unsplit call is itself part 0 of 1 joined alone: one finishing path.
 *
 * This module is light (no model compilation, no mathjs, no linear algebra): a main thread can
 * import it to join parts computed in workers.
 */
import { ModelError, valueText } from '../model/errors.js';
import { COARSE_LINK, COARSE_PLAQUETTE_PHASE, formatK, gapChecks, gapTolerance, mergeGaps, type GapRecord } from './checks.js';
import type { SpectrumChecks } from '../spectra/common.js';

export type { GapRecord } from './checks.js';

/** Which part of a split request to compute: part `index` (from 0) of `count`. */
/** The results a grid request makes, whole or joined from its parts (curvature.ts, wilson.ts). */
export type CurvatureMethod = 'lattice' | 'kubo';

export interface CurvatureChecks extends SpectrumChecks {
  maxPlaquettePhase?: number;
  coarse?: boolean;
}

export interface CurvatureResult {
  kind: 'curvature';
  method: CurvatureMethod;
  convention: 'lattice' | 'orbital';
  bands: [number, number];
  plane: { axes: [number, number]; normal?: number; at?: number };
  /** [n1, n2]; values[b * n1 + a] belongs to k1[a], k2[b]. */
  grid: [number, number];
  /** Momenta of the samples (radians): plaquette centres ('lattice') or grid points ('kubo'). */
  k1: Float64Array;
  k2: Float64Array;
  /** Curvature of the group (per rad^2). */
  values: Float64Array;
  /** With perBand: band-major, one map per band of the group (band lo first). */
  perBand?: Float64Array;
  /** (1/2pi) sum of values times the cell area: the Chern number ('lattice': an integer exactly); null when gapless. */
  total: number | null;
  checks: CurvatureChecks;
}

export interface WannierFlowChecks extends SpectrumChecks {
  /** Smallest link modulus along / across; below 0.9 the grid is too coarse in that direction. */
  minLinkAlong: number;
  minLinkAcross: number;
  /** Largest jump of the sum of centres between neighbouring across-points (in units of 1). */
  maxStep: number;
  coarse?: boolean;
}

export interface WannierFlowResult {
  kind: 'wannier-flow';
  convention: 'lattice' | 'orbital';
  bands: [number, number];
  /** Reduced axes: Wilson loops run along axes[1]; the flow is drawn against axes[0]. */
  plane: { axes: [number, number]; normal?: number; at?: number };
  /** Across-momenta k1 (radians), -pi to pi inclusive (nAcross + 1 points). */
  across: Float64Array;
  /** Hybrid Wannier centres in [0, 1), m per across point, ascending within each. */
  centres: Float64Array;
  /** Sum of the centres at each across point, unwrapped to be continuous. */
  sum: Float64Array;
  /** Midpoint of the largest gap between centres at each across point. */
  gapMidpoint: Float64Array;
  /** Net advance of the sum over the zone (the Chern number of the group), null when gapless. */
  winding: number | null;
  checks: WannierFlowChecks;
}

export interface PartSpec {
  index: number;
  count: number;
}

type PlaneInfo = { axes: [number, number]; normal?: number; at?: number };

/** The rows [rows[0], rows[1]) of a curvature map, and what the join needs to finish the map. */
export interface CurvaturePart {
  kind: 'curvature-part';
  part: PartSpec;
  /** Rows along the second axis held here (plaquette rows for 'lattice', grid rows for 'kubo'). */
  rows: [number, number];
  method: CurvatureMethod;
  convention: 'lattice' | 'orbital';
  bands: [number, number];
  plane: PlaneInfo;
  grid: [number, number];
  /** The explicit gap tolerance asked for, or null for the default (relative to the energy scale). */
  gapTolerance: number | null;
  /** The rows' curvature, final (per rad^2, oriented): values[(b - rows[0]) * n1 + a]. */
  values: Float64Array;
  /** With perBand: band-major, each band's rows as in `values`. */
  perBand?: Float64Array;
  /** The group's gap over the k-points of the rows held. */
  gap: GapRecord;
  /** 'lattice': largest |plaquette phase| over the rows (group and, with perBand, each band). */
  maxPlaquettePhase?: number;
  /** 'lattice' with perBand: each band's own gap. */
  bandGaps?: GapRecord[];
  /** 'kubo' with perBand: smallest energy splitting met inside the band pairs used. */
  minSplitting?: number;
  /** The gap certificate over the strip of k2 the rows held span. */
  proof: StripProof;
}

/** The across-points [columns[0], columns[1]) of a Wannier-centre flow, and what the join needs. */
export interface WannierFlowPart {
  kind: 'wannier-flow-part';
  part: PartSpec;
  /** Across-point indices held, of 0..nAcross. */
  columns: [number, number];
  convention: 'lattice' | 'orbital';
  bands: [number, number];
  plane: PlaneInfo;
  /** [nAlong, nAcross]. */
  grid: [number, number];
  /** +1, or -1 when a1 x a2 < 0: the sign the winding takes. */
  orientation: number;
  gapTolerance: number | null;
  /** Sorted centres, m per across-point held. */
  centres: Float64Array;
  /** Sum of the centres at each across-point held, not yet unwrapped. */
  centreSums: Float64Array;
  gapMidpoint: Float64Array;
  /** Smallest link modulus along the loops held, and across into each column held (Infinity: none). */
  minLinkAlong: number;
  minLinkAcross: number;
  gap: GapRecord;
  /** The gap certificate over the strip of k1 from the column before the first held to the last held. */
  proof: StripProof;
}

/** What a part's gap certificate found over its strip of the plane. */
export interface StripProof {
  verdict: 'gapped' | 'gapless' | 'unproven';
  minGap: number;
  /** Reduced k (radians) of the smallest gap met. */
  minGapAt: number[];
  reason?: string;
}

export type DiagnosticPart = CurvaturePart | WannierFlowPart;

/**
 * Whether every part proved the gap over its strip; when one did not, its closing or its reason
 * joins the warnings (gapless when it found the bands touching between the samples).
 */
function provenOverStrips(parts: readonly { proof: StripProof }[], checks: SpectrumChecks, [lo, hi]: [number, number], what: string): boolean {
  const failed = parts.find((p) => p.proof.verdict !== 'gapped')?.proof;
  if (failed === undefined) return true;
  if (!checks.gapless) {
    const where = `k = ${formatK(failed.minGapAt)}, gap ${failed.minGap.toExponential(2)}`;
    if (failed.verdict === 'gapless') checks.gapless = true;
    checks.warnings.push(
      failed.verdict === 'gapless'
        ? `gapless: bands ${lo}-${hi} touch the other bands between the samples (${where}); ${what} is undefined`
        : `gap not proven: ${failed.reason} (${where}); ${what} is withheld`,
    );
  }
  return false;
}

/** The engine's default grid of the kinds that split (curvature.ts, wilson.ts). */
export const DEFAULT_SPLIT_GRID = 64;

/** The rows a split grid request has: the smaller grid count (the default when not given). */
function gridRows(request: Readonly<Record<string, unknown>>): number {
  const grid = request.grid;
  if (typeof grid === 'number') return grid;
  if (Array.isArray(grid) && grid.every((n) => typeof n === 'number')) return Math.min(...(grid as number[]));
  return DEFAULT_SPLIT_GRID;
}

/**
 * The kinds whose requests split into parts, and the rows each request has to share. The registry's
 * kind modules point here (src/diagnostics/kinds/), and so does a page's main thread, which plans
 * and joins parts without loading the engine (this module is light).
 */
export const SPLIT_ROWS = {
  curvature: gridRows,
  'wannier-flow': gridRows,
} as const;

/** First and one-past-last row of part `index` of `count` over `rows` rows. */
export function partBounds(index: number, count: number, rows: number): [number, number] {
  return [Math.floor((index * rows) / count), Math.floor(((index + 1) * rows) / count)];
}

/** A validated part over `rows` rows (default: the whole, part 0 of 1) with its bounds. */
export function resolvePart(part: PartSpec | undefined, rows: number, field = 'part'): PartSpec & { lo: number; hi: number } {
  if (part === undefined) return { index: 0, count: 1, lo: 0, hi: rows };
  if (part === null || typeof part !== 'object') throw new ModelError(field, `expected {index, count}. Value: ${valueText(part)}`);
  const { index, count } = part;
  if (!Number.isInteger(count) || count < 1 || count > rows) {
    throw new ModelError(`${field}.count`, `expected a whole number from 1 to ${rows} (the rows to share). Value: ${valueText(count)}`);
  }
  if (!Number.isInteger(index) || index < 0 || index >= count) {
    throw new ModelError(`${field}.index`, `expected a whole number from 0 to ${count - 1}. Value: ${valueText(index)}`);
  }
  const [lo, hi] = partBounds(index, count, rows);
  return { index, count, lo, hi };
}

/** The k of grid index j of n along one axis (radians): a grid point, or with half = 0.5 a plaquette centre. */
export function gridMomentum(j: number, n: number, half: number): number {
  return -Math.PI + (2 * Math.PI * (j + half)) / n;
}

/** Across-point i of a flow with nAcross steps (radians): -pi to pi inclusive. */
export function acrossMomentum(i: number, nAcross: number): number {
  return -Math.PI + (2 * Math.PI * i) / nAcross;
}

/** A field's value as text, to compare parts and to valueText in an error. */
function describe(value: unknown): string {
  return JSON.stringify(value) ?? String(value);
}

/**
 * Parts in index order, after checking they split one request: one kind, the same settings
 * (`same`), a full set of indices, each holding exactly its rows.
 */
function orderParts<P extends DiagnosticPart>(
  parts: readonly P[], kind: P['kind'], same: readonly (keyof P & string)[], rowsOf: (p: P) => number, span: (p: P) => [number, number],
): P[] {
  if (!Array.isArray(parts) || parts.length === 0) throw new ModelError('parts', `expected a nonempty array of parts. Value: ${valueText(parts)}`);
  const first = parts[0];
  parts.forEach((p, i) => {
    if (p === null || typeof p !== 'object' || p.kind !== kind) throw new ModelError(`parts[${i}].kind`, `expected "${kind}". Value: ${valueText(p?.kind ?? p)}`);
    if (p.part === null || typeof p.part !== 'object') throw new ModelError(`parts[${i}].part`, `expected {index, count}. Value: ${valueText(p.part)}`);
    if (p.gap === null || typeof p.gap !== 'object' || typeof p.gap.minGap !== 'number') throw new ModelError(`parts[${i}].gap`, `expected a gap record. Value: ${valueText(p.gap)}`);
    for (const key of same) {
      if (describe(p[key]) !== describe(first[key])) {
        throw new ModelError(`parts[${i}].${key}`, `differs from parts[0].${key} = ${describe(first[key])}: not parts of one request. Value: ${describe(p[key])}`);
      }
    }
    if (p.part.count !== first.part.count) {
      throw new ModelError(`parts[${i}].part.count`, `differs from parts[0].part.count = ${valueText(first.part.count)}: not parts of one split. Value: ${valueText(p.part.count)}`);
    }
  });
  const count = first.part.count;
  if (parts.length !== count) throw new ModelError('parts', `expected ${valueText(count)} parts (their part.count), got ${parts.length}`);
  const ordered = new Array<P | undefined>(count);
  parts.forEach((p, i) => {
    const index = p.part.index;
    if (!Number.isInteger(index) || index < 0 || index >= count) throw new ModelError(`parts[${i}].part.index`, `expected a whole number from 0 to ${count - 1}. Value: ${valueText(index)}`);
    if (ordered[index] !== undefined) throw new ModelError(`parts[${i}].part.index`, `part ${index} of ${count} appears twice`);
    ordered[index] = p;
    const want = partBounds(index, count, rowsOf(p));
    const [lo, hi] = span(p);
    if (lo !== want[0] || hi !== want[1]) throw new ModelError(`parts[${i}]`, `holds rows [${lo}, ${hi}) but part ${index} of ${count} is [${want[0]}, ${want[1]})`);
  });
  return ordered as P[];
}

function expectLength(array: unknown, length: number, field: string): void {
  if (!(array instanceof Float64Array) || array.length !== length) {
    throw new ModelError(field, `expected a Float64Array of length ${length}. Value: ${array instanceof Float64Array ? `length ${array.length}` : valueText(array)}`);
  }
}

function expectNumber(value: unknown, field: string): number {
  if (typeof value !== 'number' || Number.isNaN(value)) throw new ModelError(field, `expected a number. Value: ${valueText(value)}`);
  return value;
}

/** The curvature map its parts make: exactly `curvatureMap` of the unsplit request. */
export function joinCurvatureParts(parts: readonly CurvaturePart[]): CurvatureResult {
  const ordered = orderParts(parts, 'curvature-part', ['method', 'convention', 'bands', 'plane', 'grid', 'gapTolerance'], (p) => p.grid[1], (p) => p.rows);
  const first = ordered[0];
  const [n1, n2] = first.grid;
  const [lo, hi] = first.bands;
  const m = hi - lo + 1;
  const tolerance = first.gapTolerance ?? undefined;
  const withBands = first.perBand !== undefined;
  const values = new Float64Array(n1 * n2);
  const perBand = withBands ? new Float64Array(m * n1 * n2) : undefined;
  ordered.forEach((p) => {
    const i = p.part.index;
    const size = (p.rows[1] - p.rows[0]) * n1;
    expectLength(p.values, size, `parts[${i}].values`);
    values.set(p.values, p.rows[0] * n1);
    if (perBand !== undefined) {
      expectLength(p.perBand, m * size, `parts[${i}].perBand`);
      for (let j = 0; j < m; j++) perBand.set(p.perBand!.subarray(j * size, (j + 1) * size), j * n1 * n2 + p.rows[0] * n1);
    } else if (p.perBand !== undefined) {
      throw new ModelError(`parts[${i}].perBand`, 'present although parts[0] has none: not parts of one request');
    }
  });

  const gap = mergeGaps(ordered.map((p) => p.gap));
  const checks: CurvatureChecks = gapChecks(gap, { lo, hi }, [n1, n2], tolerance, 'the curvature of the group');
  if (first.method === 'lattice') {
    checks.maxPlaquettePhase = ordered.reduce((x, p, i) => Math.max(x, expectNumber(p.maxPlaquettePhase, `parts[${i}].maxPlaquettePhase`)), 0);
    if (withBands) {
      for (let j = 0; j < m; j++) {
        const band = mergeGaps(ordered.map((p, i) => {
          if (p.bandGaps?.length !== m) throw new ModelError(`parts[${i}].bandGaps`, `expected one gap record per band (${m}). Value: ${valueText(p.bandGaps)}`);
          return p.bandGaps[j];
        }));
        const c = gapChecks(band, { lo: lo + j, hi: lo + j }, [n1, n2], tolerance, `the curvature of band ${lo + j}`);
        if (c.gapless) checks.warnings.push(...c.warnings);
      }
    }
  } else if (withBands && m > 1) {
    const splitting = ordered.reduce((x, p, i) => Math.min(x, expectNumber(p.minSplitting, `parts[${i}].minSplitting`)), Infinity);
    if (splitting <= gapTolerance(tolerance, gap.energyScale)) {
      checks.warnings.push(`bands inside the group touch (splitting ${splitting.toExponential(2)}): their separate curvatures diverge there; the group total is unaffected`);
    }
  }

  const cell = ((2 * Math.PI) / n1) * ((2 * Math.PI) / n2);
  let total = 0;
  for (let i = 0; i < values.length; i++) total += values[i];
  total *= cell / (2 * Math.PI);
  if (!checks.gapless && (checks.maxPlaquettePhase ?? 0) > COARSE_PLAQUETTE_PHASE) {
    checks.coarse = true;
    checks.warnings.push(`grid ${n1}x${n2} is coarse: largest plaquette phase ${checks.maxPlaquettePhase!.toFixed(3)} rad (limit pi/2)`);
  }
  const proven = provenOverStrips(ordered, checks, first.bands, 'the Chern number of the map');
  const half = first.method === 'lattice' ? 0.5 : 0;
  return {
    kind: 'curvature',
    method: first.method,
    convention: first.convention,
    bands: [lo, hi],
    plane: first.plane,
    grid: [n1, n2],
    k1: Float64Array.from({ length: n1 }, (_, a) => gridMomentum(a, n1, half)),
    k2: Float64Array.from({ length: n2 }, (_, b) => gridMomentum(b, n2, half)),
    values,
    ...(perBand !== undefined ? { perBand } : {}),
    total: checks.gapless || !proven ? null : total,
    checks,
  };
}

/** The Wannier-centre flow its parts make: exactly `wannierFlow` of the unsplit request. */
export function joinWannierFlowParts(parts: readonly WannierFlowPart[]): WannierFlowResult {
  const ordered = orderParts(parts, 'wannier-flow-part', ['convention', 'bands', 'plane', 'grid', 'orientation', 'gapTolerance'], (p) => p.grid[1] + 1, (p) => p.columns);
  const first = ordered[0];
  const [nAlong, nAcross] = first.grid;
  const [lo, hi] = first.bands;
  const m = hi - lo + 1;
  const points = nAcross + 1;
  const centres = new Float64Array(points * m);
  const raw = new Float64Array(points);
  const gapMidpoint = new Float64Array(points);
  let minLinkAlong = Infinity;
  let minLinkAcross = Infinity;
  ordered.forEach((p) => {
    const i = p.part.index;
    const [c0, c1] = p.columns;
    expectLength(p.centres, (c1 - c0) * m, `parts[${i}].centres`);
    expectLength(p.centreSums, c1 - c0, `parts[${i}].centreSums`);
    expectLength(p.gapMidpoint, c1 - c0, `parts[${i}].gapMidpoint`);
    centres.set(p.centres, c0 * m);
    raw.set(p.centreSums, c0);
    gapMidpoint.set(p.gapMidpoint, c0);
    minLinkAlong = Math.min(minLinkAlong, expectNumber(p.minLinkAlong, `parts[${i}].minLinkAlong`));
    minLinkAcross = Math.min(minLinkAcross, expectNumber(p.minLinkAcross, `parts[${i}].minLinkAcross`));
  });

  // Unwrap the summed centres into a continuous line, one step at a time.
  const sum = new Float64Array(points);
  let maxStep = 0;
  sum[0] = raw[0];
  for (let i = 1; i < points; i++) {
    const s = raw[i];
    const prevWrapped = sum[i - 1] - Math.floor(sum[i - 1]);
    let d = s - Math.floor(s) - prevWrapped;
    d -= Math.round(d);
    sum[i] = sum[i - 1] + d;
    maxStep = Math.max(maxStep, Math.abs(d));
  }

  const gap = mergeGaps(ordered.map((p) => p.gap));
  const checks = gapChecks(gap, { lo, hi }, [nAlong, nAcross], first.gapTolerance ?? undefined, 'the Wannier-centre winding') as WannierFlowChecks;
  const proven = provenOverStrips(ordered, checks, first.bands, 'the Wannier-centre winding');
  checks.minLinkAlong = Math.min(1, minLinkAlong);
  checks.minLinkAcross = Math.min(1, minLinkAcross);
  checks.maxStep = maxStep;
  if (!checks.gapless && (checks.minLinkAlong < COARSE_LINK || checks.minLinkAcross < COARSE_LINK || maxStep > 0.25)) {
    checks.coarse = true;
    checks.warnings.push(
      `grid ${nAlong}x${nAcross} is too coarse to trust the flow: smallest link modulus along ${checks.minLinkAlong.toFixed(3)}, ` +
        `across ${checks.minLinkAcross.toFixed(3)} (limit ${COARSE_LINK}), largest step of the summed centres ${maxStep.toFixed(3)} (limit 0.25)`,
    );
  }
  return {
    kind: 'wannier-flow',
    convention: first.convention,
    bands: [lo, hi],
    plane: first.plane,
    across: Float64Array.from({ length: points }, (_, i) => acrossMomentum(i, nAcross)),
    centres,
    sum,
    gapMidpoint,
    winding: checks.gapless || !proven ? null : first.orientation * Math.round(sum[nAcross] - sum[0]) + 0,
    checks,
  };
}

/**
 * The result a split request's parts make, exactly as the request computed whole: the parts of one
 * request, every index of 0..count-1 once, in any order. Throws ModelError naming the first part
 * that does not fit (another kind, grid or setting; a missing or repeated index).
 */
export function joinParts(parts: readonly CurvaturePart[]): CurvatureResult;
export function joinParts(parts: readonly WannierFlowPart[]): WannierFlowResult;
export function joinParts(parts: readonly DiagnosticPart[]): CurvatureResult | WannierFlowResult;
export function joinParts(parts: readonly DiagnosticPart[]): CurvatureResult | WannierFlowResult {
  if (!Array.isArray(parts) || parts.length === 0) throw new ModelError('parts', `expected a nonempty array of parts. Value: ${valueText(parts)}`);
  const kind = (parts[0] as { kind?: unknown } | null)?.kind;
  if (kind === 'curvature-part') return joinCurvatureParts(parts as readonly CurvaturePart[]);
  if (kind === 'wannier-flow-part') return joinWannierFlowParts(parts as readonly WannierFlowPart[]);
  throw new ModelError('parts[0].kind', `expected "curvature-part" or "wannier-flow-part". Value: ${valueText(kind)}`);
}
