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
import { BandSampler } from '../spectra/common.js';
import { chernNumber } from '../topology/chern.js';
import { z2Index } from '../topology/z2.js';
import { judge, type BoundaryInvariant, type BoundaryVerdict, type BulkBoundaryOptions, type BulkBoundaryResult, type EdgeCount } from './boundary-result.js';
import { zoneBandRanges, energyInGap } from './bulk-gap.js';
import { chainEnds } from './chain-ends.js';
import { cutInfo, wholeNumber } from './common.js';
import { lineCrossings, type EdgeMode } from './crossings.js';
import { checkedInvariant, openSample, thinSample } from './open-sample.js';
import { slabSurfaces } from './surface-count.js';

export type { EdgeMode } from './crossings.js';
export type {
  ArcLine, ArcStep, BoundaryInvariant, BoundaryKind, BoundaryVerdict, BulkBoundaryOptions, BulkBoundaryResult, DiracPoint, EdgeCount, EndCount, EndMode, SurfaceCount,
} from './boundary-result.js';

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
