/**
 * The bulk–boundary check: count the boundary modes of an open sample of a 1D, 2D or 3D model and
 * compare them with the bulk invariant of the same parameters, computed (and its gap proven) for
 * the bands below the energy of the count. One result for every dimension; its `boundary` says
 * which parts were counted: the two `ends` of a chain, the two `edges` of a ribbon, the two
 * `surfaces` of a slab.
 *
 * 2D, at an energy in the bulk gap, from where the ribbon's bands cross it and the signs of their
 * velocities (the modes followed across k by eigenvector overlap, crossings.ts):
 * - Chern (default for spinless models): the net number of modes moving along +A_1 (right minus
 *   left) on the 'first' edge (layer 0; the sample lies on its +A_2 side) is -o C and on the 'last'
 *   edge +o C, with o = sign(A_1 x A_2) the handedness of the cut's basis (our sign convention,
 *   shared/references.md; checked on QWZ and Haldane in both signs of C).
 * - Z2 (default when the orbitals carry spin): the modes on each edge come in Kramers pairs (a right
 *   mover at k, a left mover at -k); the number of pairs is odd exactly when Z2 = 1.
 * 1D chains (chain-ends.ts) and 3D slabs (surface-count.ts) state their own rules.
 * A boundary agrees when its count has the invariant's value (net chirality, pair or cone parity,
 * end polarisation); modes beyond the least number the invariant requires come in trivial pairs:
 * the verdict is then 'extra-modes' and names them.
 */
import { BlochHamiltonian } from '../bloch/hamiltonian.js';
import { ModelError, valueText } from '../model/errors.js';
import type { ModelSpec } from '../model/spec.js';
import { BandSampler } from '../spectra/common.js';
import { chernNumber } from '../topology/chern.js';
import { z2Index } from '../topology/z2.js';
import { zoneBandRanges, energyInGap } from './bulk-gap.js';
import { chainEnds, type EndCount } from './chain-ends.js';
import { cutInfo, wholeNumber, type CutInfo } from './common.js';
import { lineCrossings, type EdgeMode } from './crossings.js';
import type { ProjectedNode } from './fermi-map.js';
import type { CutSpec } from './layers.js';
import { checkedInvariant, judge, openSample, thinSample } from './open-sample.js';
import { slabSurfaces, type SurfaceCount } from './surface-count.js';

export type { EdgeMode } from './crossings.js';
export type { EndCount, EndMode } from './chain-ends.js';
export type { ArcLine, ArcStep, DiracPoint, SurfaceCount } from './surface-count.js';

/**
 * What the count is compared with: 'winding' (chiral chains) or 'majorana' (BdG chains) in 1D,
 * 'chern' or 'z2' in 2D, 'z2' (strong and weak indices) or 'weyl' (the Weyl nodes' chiralities)
 * in 3D; a result says 'none' for a chain no invariant protects.
 */
export type BoundaryInvariant = 'chern' | 'z2' | 'winding' | 'majorana' | 'weyl' | 'none';

/** Which boundary was counted: the two ends of a chain, the two edges of a ribbon, the two surfaces of a slab. */
export type BoundaryKind = 'end' | 'edge' | 'surface';

export interface BulkBoundaryOptions {
  /** The boundary: a periodic direction to cut open, or Miller indices of the lattice planes (1D: 0). */
  cut: CutSpec;
  /** The energy (default: the middle of the gap between the lower and the upper half of the bands; 3D Weyl: the nodes' energy). Chiral and BdG chains count at E = 0. */
  energy?: number;
  /** Default: 1D 'winding' for a chiral chain, 'majorana' for a BdG one; 2D 'z2' when the orbitals carry spin, else 'chern'; 3D 'z2' when they carry spin, else 'weyl'. */
  invariant?: Exclude<BoundaryInvariant, 'none'>;
  /** Lattice planes of the open sample (default 64 cells of a chain, 32 lines of a ribbon, 24 planes of a slab). */
  width?: number;
  /** Layers counted as each end, edge or surface (default a tenth of the width, at least 2). */
  edgeLayers?: number;
  /** k-points along each closed line of the edge or surface zone: 2D, and 3D Weyl (default 256; chains and the 3D Z2 count at fixed k use none). */
  nk?: number;
  /** 1D chiral chains: orbital labels of sublattice A, as `windingNumber` takes them (default: found by two-colouring). */
  sublattice?: string[];
  /**
   * An open sample to count on instead of the plain one (a model with `layer` on its orbitals and
   * one periodic direction fewer than the bulk, e.g. the plain ribbon with a decorated edge); the
   * invariant is still the bulk's.
   */
  ribbon?: ModelSpec;
}

export interface EdgeCount {
  modes: EdgeMode[];
  right: number;
  left: number;
  /** right - left. */
  net: number;
  /** Kramers pairs (z2: the number of right movers), or null for chern. */
  pairs: number | null;
  /** What the invariant requires of this edge: the net count (chern) or the pairs' parity (z2). */
  expected: number | null;
  /** The count has the invariant's value. */
  agrees: boolean | null;
  /** Modes beyond the least number the invariant requires (an even number when it agrees). */
  extra: number;
}

export type BoundaryVerdict = 'agree' | 'extra-modes' | 'disagree' | 'undetermined';

export interface BulkBoundaryResult {
  kind: 'bulk-boundary';
  boundary: BoundaryKind;
  cut: CutInfo;
  energy: number;
  /** The bulk gap the energy lies in: highest band below, lowest band above (sampled); null for a Weyl semimetal (gapless at its nodes). */
  bulkGap: [number, number] | null;
  /** Bulk bands below the energy. */
  bands: number;
  /**
   * The bulk invariant: its value (winding W, Majorana number, C, Z2 or the strong index nu0;
   * 'weyl': the number of Weyl nodes counted with |chirality|; null when not certain), whether it
   * is certified, and in 3D z2 the weak indices (nu1, nu2, nu3).
   */
  invariant: { kind: BoundaryInvariant; value: number | null; certified: boolean; weak?: (number | null)[] };
  /** Lattice planes of the open sample, and how many at each boundary were counted as it. */
  width: number;
  edgeLayers: number;
  /** 1D: the chain's first end (cell 0) and last end. */
  ends?: { first: EndCount; last: EndCount };
  /** 2D: the ribbon's first edge (layer 0) and last edge. */
  edges?: { first: EdgeCount; last: EdgeCount };
  /** 3D: the slab's bottom surface (layer 0; the sample on its +A_3 side) and top surface. */
  surfaces?: { bottom: SurfaceCount; top: SurfaceCount };
  /** 3D Weyl: the bulk nodes, projected onto the surface zone. */
  nodes?: ProjectedNode[];
  /** 'agree': every boundary has exactly the modes the invariant requires; 'extra-modes': the invariant's value, with trivial pairs beside; 'disagree': not its value; 'undetermined': no certain invariant, no invariant at all, or a mode on neither boundary. */
  verdict: BoundaryVerdict;
  /** The verdict in words: the invariant, the count on each boundary, what disagrees. */
  summary: string;
  checks: { warnings: string[]; grid: number[] };
}

/** Count the boundary modes of an open sample and compare them with the bulk invariant. */
export function bulkBoundary(h: BlochHamiltonian, options: BulkBoundaryOptions): BulkBoundaryResult {
  if (options === null || typeof options !== 'object') throw new ModelError('options', `expected {cut, energy, ...}. Value: ${valueText(options)}`);
  if (h.dim < 1 || h.dim > 3) throw new ModelError('model', `the bulk–boundary check counts the ends of 1D, the edges of 2D and the surfaces of 3D models; this model has ${h.dim} periodic directions`);
  if (options.sublattice !== undefined && h.dim !== 1) throw new ModelError('sublattice', `is for 1D chiral chains; this model has ${h.dim} periodic directions. Value: ${valueText(options.sublattice)}`);
  if (h.dim === 1) return chainEnds(h, options);
  if (h.dim === 3) return slabSurfaces(h, options);
  return ribbonEdges(h, options);
}

/** The 2D check: modes on the two edges of a ribbon. */
function ribbonEdges(h: BlochHamiltonian, options: BulkBoundaryOptions): BulkBoundaryResult {
  const sample = openSample(h, options, 32);
  const nk = options.nk === undefined ? 256 : wholeNumber(options.nk, 'nk', 16, 100000);
  const invariantKind = checkedInvariant(h, options.invariant) ?? (h.spec.orbitals.some((o) => o.spin !== undefined) ? 'z2' : 'chern');

  const ranges = zoneBandRanges(h);
  const { energy, below, gap: bulkGap } = energyInGap(ranges, options.energy);

  const warnings: string[] = [];
  let value: number | null, certified: boolean;
  if (invariantKind === 'chern') {
    const c = chernNumber(h, { bands: below });
    value = c.chern;
    certified = c.checks.certified === true;
    warnings.push(...c.checks.warnings.map((w) => `Chern number: ${w}`));
  } else {
    const z = z2Index(h, { bands: below });
    value = z.z2;
    certified = z.checks.certified === true;
    warnings.push(...z.checks.warnings.map((w) => `Z2: ${w}`));
  }

  const window: [number, number] = [energy - 0.8 * (energy - bulkGap[0]), energy + 0.8 * (bulkGap[1] - energy)];
  const found = lineCrossings(new BandSampler(sample.h), sample.onFirst, sample.onLast, energy, window, (t, k) => { k[0] = t; }, nk, sample.edgeLayers);
  warnings.push(...found.warnings);
  const stray = found.stray;
  const thin = thinSample(h, sample, Math.min(energy - bulkGap[0], bulkGap[1] - energy), 'ribbon');
  if (thin !== null) warnings.push(thin);
  const orientation = Math.sign(handedness(h, sample.layers.basis));
  const count = (modes: EdgeMode[], sign: number): EdgeCount => {
    const right = modes.filter((m) => m.velocity > 0).length, left = modes.length - right;
    const net = right - left;
    if (value === null) return { modes, right, left, net, pairs: invariantKind === 'z2' ? right : null, expected: null, agrees: null, extra: 0 };
    if (invariantKind === 'chern') {
      const expected = sign * orientation * value + 0;
      return { modes, right, left, net, pairs: null, expected, agrees: net === expected, extra: modes.length - Math.abs(expected) };
    }
    const pairs = right;
    if (right !== left) warnings.push(`an edge has ${right} right and ${left} left movers: they are not Kramers pairs, so the ribbon does not look time-reversal symmetric`);
    return { modes, right, left, net, pairs, expected: value, agrees: right === left && pairs % 2 === value, extra: 2 * (pairs - value) };
  };
  const edges = { first: count(found.first, -1), last: count(found.last, 1) };
  const verdict = judge(value === null || stray > 0 || thin !== null, [edges.first, edges.last]);
  return {
    kind: 'bulk-boundary',
    boundary: 'edge',
    cut: cutInfo(sample.layers),
    energy,
    bulkGap,
    bands: below,
    invariant: { kind: invariantKind, value, certified },
    width: sample.width,
    edgeLayers: sample.edgeLayers,
    edges,
    verdict,
    summary: summarise(invariantKind, value, energy, edges, verdict, stray, thin !== null ? sample.width : 0),
    checks: { warnings, grid: ranges.grid },
  };
}

/** sign(A_1 x A_2) of the cut's basis in Cartesian coordinates. */
function handedness(h: BlochHamiltonian, basis: number[][]): number {
  const a = h.spec.vectors;
  const cart = basis.map((row) => a[0].map((_, c) => row.reduce((s, x, j) => s + x * a[j][c], 0)));
  return cart[0][0] * cart[1][1] - cart[0][1] * cart[1][0];
}

function summarise(kind: BoundaryInvariant, value: number | null, energy: number, edges: { first: EdgeCount; last: EdgeCount }, verdict: BoundaryVerdict, stray: number, thinWidth: number): string {
  const name = kind === 'chern' ? 'C' : 'Z2';
  const describe = (label: string, e: EdgeCount): string => {
    const modes = `${e.modes.length} mode${e.modes.length === 1 ? '' : 's'} (${e.right} right, ${e.left} left${e.pairs !== null ? `, ${e.pairs} Kramers pair${e.pairs === 1 ? '' : 's'}` : ''})`;
    if (e.agrees === null) return `${label} edge: ${modes}`;
    const need = kind === 'chern' ? `net ${e.expected}` : `an ${e.expected === 1 ? 'odd' : 'even'} number of pairs`;
    if (!e.agrees) return `${label} edge: ${modes}, but ${name} = ${value} requires ${need}`;
    if (e.extra > 0) return `${label} edge: ${modes}: ${need} as ${name} = ${value} requires, plus ${e.extra} extra modes in trivial pairs (an even number${kind === 'z2' ? ` of modes, ${e.extra / 2} extra Kramers pairs` : ''}), allowed but not protected by the invariant`;
    return `${label} edge: ${modes}, as ${name} = ${value} requires`;
  };
  const head = verdict === 'undetermined'
    ? value === null ? `undetermined: the bulk ${name} is not certain at these parameters` : thinWidth > 0 ? `undetermined: the ribbon (${thinWidth} lines) is too narrow for its edge modes (see the warnings)` : `undetermined: ${stray} crossing${stray === 1 ? '' : 's'} on neither edge`
    : verdict === 'agree' ? `agree: ${name} = ${value}` : verdict === 'extra-modes' ? `disagree in number, agree in ${kind === 'chern' ? 'net chirality' : 'parity'}: ${name} = ${value}` : `disagree: ${name} = ${value}`;
  return `${head} at E = ${energy.toPrecision(4)}; ${describe('first', edges.first)}; ${describe('last', edges.last)}`;
}

/** Memory and time of a bulk–boundary check before it runs (n: the model's orbitals, dim: its periodic directions). */
export function bulkBoundaryCost(n: number, options: Partial<BulkBoundaryOptions>, dim = 2): { bytes: number; seconds: number } {
  const width = typeof options.width === 'number' && options.width >= 1 ? options.width : [64, 64, 32, 24][dim] ?? 32;
  const nk = typeof options.nk === 'number' && options.nk >= 1 ? options.nk : 256;
  const big = n * width;
  const solve = (m: number): number => 4e-6 + 1.5e-7 * m ** 2 + 4e-9 * m ** 3;
  // The sample's spectrum (a chain once; a ribbon along its zone; a slab at four TRIMs, or along a
  // few lines between Weyl nodes), the bulk gap's grid, and the invariant (a few thousand bulk solves).
  const sampleSolves = dim === 1 ? 1 : dim === 2 ? nk + 16 : 4 + 4 * nk;
  const bulkSolves = dim === 1 ? 512 + 4000 : dim === 2 ? 64 * 64 + 4000 : 16 ** 3 + 4 * 64 * 32 + 24 ** 3 + 8000;
  return { bytes: 8 * 16 * big * big + nk * big * 8, seconds: sampleSolves * solve(big) + bulkSolves * solve(n) };
}
