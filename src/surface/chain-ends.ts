/**
 * The bulk–boundary check of a 1D chain: the zero modes at the two ends of a long open chain
 * (`width` cells, diagonalised whole: exact for the finite chain and cheap), against the winding
 * number of a chiral chain or the Majorana number of a BdG chain.
 *
 * Zero modes: the chain's states inside the bulk gap around E = 0 (within 0.98 of the distance to
 * either edge), so that an end pair a short chain splits away from zero is still counted; in-gap
 * states away from zero come in pairs (E, -E) that add nothing to N_A - N_B or to the parity of
 * the Majorana count. Localisation criterion: those states are rotated to the
 * eigenvectors of P_first - P_last (P the projector on the outer `edgeLayers` cells of an end)
 * within their span; a state belongs to the first end when its eigenvalue exceeds 1/2 (more than
 * half its weight there, more than on the other end), to the last end below -1/2, else to neither
 * (the chain is too short for its end modes: 'undetermined').
 * - Chiral chains (winding, topology/chiral.ts): within one end's modes, the eigenvectors of the
 *   chiral operator Gamma (+1 on sublattice A, -1 on B) give each mode its sublattice. Convention
 *   (stated once here): with windingNumber's sublattices (A first, q = H_BA), the first end (cell 0,
 *   the chain on its +a side) carries N_A - N_B = W and the last end N_A - N_B = -W. (The SSH zero
 *   mode at the first end lives on A for 0 < v < w: psi_A(n) ~ (-v/w)^n solves its equation.)
 * - BdG chains (Majorana number, Kitaev, Physics-Uspekhi 44, 131 (2001)): a zero-energy BdG vector
 *   localised at an end is one Majorana mode; the number per end is odd exactly when M = -1.
 * - A chain with neither symmetry (Rice–Mele with u != 0): no invariant protects end modes, so the
 *   verdict is 'undetermined', with that reason, and the end states near the energy are listed.
 */
import type { BlochHamiltonian } from '../bloch/hamiltonian.js';
import { ModelError, valueText } from '../model/errors.js';
import { BandSampler } from '../spectra/common.js';
import { majoranaNumber, windingNumber } from '../topology/chiral.js';
import { zoneBandRanges, energyInGap } from './bulk-gap.js';
import { cutInfo } from './common.js';
import { column, expectation, rotateByDiagonal, weightOn } from './crossings.js';
import { judge, type BoundaryInvariant, type BoundaryVerdict, type BulkBoundaryOptions, type BulkBoundaryResult, type EndCount, type EndMode } from './boundary-result.js';
import { checkedInvariant, openSample, thinSample } from './open-sample.js';

/** The 1D check: zero modes at the two ends of an open chain. */
export function chainEnds(h: BlochHamiltonian, options: BulkBoundaryOptions): BulkBoundaryResult {
  const sample = openSample(h, options, 64);
  const asked = checkedInvariant(h, options.invariant);
  const warnings: string[] = [];
  let kind: BoundaryInvariant;
  let reason = '';
  let sublattices: [string[], string[]] | null = null;
  let value: number | null = null, certified = false;
  if (asked === 'majorana' || (asked === undefined && h.spec.orbitals.some((o) => o.nambu !== undefined))) {
    kind = 'majorana';
    const m = majoranaNumber(h);
    [value, certified] = [m.majorana, m.checks.certified === true];
    warnings.push(...m.checks.warnings.map((w) => `Majorana number: ${w}`));
  } else {
    try {
      const w = windingNumber(h, { sublattice: options.sublattice });
      kind = 'winding';
      [value, certified, sublattices] = [w.winding, w.checks.certified === true, w.sublattices];
      warnings.push(...w.checks.warnings.map((x) => `winding: ${x}`));
    } catch (e) {
      // Asked for, or the sublattices given: the chiral symmetry is required, so its absence is the error.
      if (!(e instanceof ModelError) || asked === 'winding' || options.sublattice !== undefined || e.field !== 'sublattice') throw e;
      kind = 'none';
      reason = `no invariant protects end modes: the chain is not a BdG chain and has ${e.message.slice(e.field.length + 2)}`;
    }
  }
  const ranges = zoneBandRanges(h);
  const { energy, below, gap } = energyInGap(ranges, options.energy ?? (kind === 'none' ? undefined : 0));
  if (kind !== 'none' && energy !== 0) throw new ModelError('energy', `the end modes of a ${kind === 'winding' ? 'chiral' : 'BdG'} chain are protected at E = 0 only. Value: ${valueText(energy)}`);

  // The chain's states near the energy, rotated to tell the ends apart.
  const sampler = new BandSampler(sample.h);
  const n = sampler.bandCount;
  const e = sampler.solveWithVectors(new Float64Array(0));
  const reach = 0.98 * Math.min(energy - gap[0], gap[1] - energy);
  const near: Float64Array[] = [];
  for (let b = 0; b < n; b++) if (Math.abs(e[b] - energy) < reach) near.push(column(sampler.vectors, n, b));
  const side = Float64Array.from(sample.onFirst, (f, i) => f - sample.onLast[i]);
  const { values, states } = rotateByDiagonal(near, side);
  const first: Float64Array[] = [], last: Float64Array[] = [];
  values.forEach((x, i) => {
    if (x > 0.5) first.push(states[i]);
    else if (x < -0.5) last.push(states[i]);
  });
  const stray = near.length - first.length - last.length;
  const thin = thinSample(h, sample, Math.min(energy - gap[0], gap[1] - energy), 'chain');
  if (thin !== null) warnings.push(thin);
  if (stray > 0) warnings.push(`${stray} state${stray === 1 ? '' : 's'} in the bulk gap (within ${reach.toPrecision(3)} of E = ${energy}) on neither end (the outer ${sample.edgeLayers} cells of each hold less than half of it): the chain (${sample.width} cells) may be too short for its end modes`);

  const matrix = new Float64Array(2 * n * n);
  sample.h.fill(new Float64Array(0), matrix);
  // Gamma on the chain: each chain orbital is its bulk orbital's label + '@cell' (the ribbon builder's naming).
  const gamma = sublattices === null ? null : Float64Array.from(sample.h.spec.orbitals, (o) => (sublattices![0].includes(o.label.replace(/@[^@]*$/, '')) ? 1 : -1));

  const count = (end: Float64Array[], mask: Uint8Array, sign: number): EndCount => {
    let modes: EndMode[];
    if (gamma !== null) {
      const polar = rotateByDiagonal(end, gamma);
      modes = polar.states.map((v, i) => ({ energy: expectation(matrix, n, v), weight: weightOn(v, mask), polarisation: polar.values[i] }));
    } else modes = end.map((v) => ({ energy: expectation(matrix, n, v), weight: weightOn(v, mask), polarisation: null }));
    if (kind === 'winding') {
      const a = modes.filter((m) => m.polarisation! > 0.5).length, b = modes.filter((m) => m.polarisation! < -0.5).length;
      if (a + b < modes.length) warnings.push(`${modes.length - a - b} end mode(s) with no clear sublattice (|<Gamma>| < 1/2): the two ends' modes may still be hybridised`);
      const net = a - b;
      if (value === null) return { modes, sublatticeA: a, sublatticeB: b, net, expected: null, agrees: null, extra: 0 };
      const expected = sign * value + 0;
      return { modes, sublatticeA: a, sublatticeB: b, net, expected, agrees: net === expected && a + b === modes.length, extra: modes.length - Math.abs(expected) };
    }
    const net = modes.length;
    if (kind === 'none' || value === null) return { modes, sublatticeA: null, sublatticeB: null, net, expected: null, agrees: null, extra: 0 };
    const expected = value === -1 ? 1 : 0;
    return { modes, sublatticeA: null, sublatticeB: null, net, expected, agrees: net % 2 === expected, extra: net - expected };
  };
  const ends = { first: count(first, sample.onFirst, 1), last: count(last, sample.onLast, -1) };
  const name = kind === 'winding' ? 'W' : 'M';
  if (kind !== 'none') {
    if (value === null) reason = `the bulk ${name} is not certain at these parameters`;
    else if (thin !== null) reason = `the chain (${sample.width} cells) is too short for its end modes (see the warnings)`;
    else if (stray > 0) reason = `${stray} zero-energy state${stray === 1 ? '' : 's'} on neither end`;
  }
  const verdict = judge(reason !== '', [ends.first, ends.last]);
  return {
    kind: 'bulk-boundary',
    boundary: 'end',
    cut: cutInfo(sample.layers),
    energy,
    bulkGap: gap,
    bands: below,
    invariant: { kind, value, certified },
    width: sample.width,
    edgeLayers: sample.edgeLayers,
    ends,
    verdict,
    summary: summariseEnds(kind, value, energy, ends, verdict, reason),
    checks: { warnings, grid: ranges.grid },
  };
}

function summariseEnds(kind: BoundaryInvariant, value: number | null, energy: number, ends: { first: EndCount; last: EndCount }, verdict: BoundaryVerdict, reason: string): string {
  const name = kind === 'winding' ? 'W' : 'M';
  const describe = (label: string, c: EndCount): string => {
    const modes = `${c.modes.length} ${kind === 'majorana' ? 'Majorana ' : ''}mode${c.modes.length === 1 ? '' : 's'}${c.sublatticeA !== null ? ` (${c.sublatticeA} on A, ${c.sublatticeB} on B)` : ''}`;
    if (c.agrees === null) return `${label} end: ${modes}`;
    const need = kind === 'winding' ? `N_A - N_B = ${c.expected}` : `an ${c.expected === 1 ? 'odd' : 'even'} number`;
    if (!c.agrees) return `${label} end: ${modes}, but ${name} = ${value} requires ${need}`;
    if (c.extra > 0) return `${label} end: ${modes}: ${need} as ${name} = ${value} requires, plus ${c.extra} extra modes in trivial pairs, allowed but not protected by the invariant`;
    return `${label} end: ${modes}, as ${name} = ${value} requires`;
  };
  const head = verdict === 'undetermined' ? `undetermined: ${reason}`
    : verdict === 'agree' ? `agree: ${name} = ${value}` : verdict === 'extra-modes' ? `disagree in number, agree in ${kind === 'winding' ? 'sublattice polarisation' : 'parity'}: ${name} = ${value}` : `disagree: ${name} = ${value}`;
  return `${head} at E = ${energy.toPrecision(4)}; ${describe('first', ends.first)}; ${describe('last', ends.last)}`;
}
