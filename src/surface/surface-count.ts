/**
 * The bulk–boundary check of a 3D model on the two surfaces of a slab (`width` planes along the
 * cut), against the bulk Z2 indices or the chiralities of the bulk Weyl nodes.
 *
 * Z2 (time-reversal-symmetric insulators; Fu, Kane & Mele, PRL 98, 106803 (2007)): a surface
 * Dirac point is a Kramers pair of surface states at a surface TRIM (k_par = 0 or pi along each
 * surface vector) inside the bulk gap projected onto that TRIM (the bulk bands below and above the
 * energy over every k_perp). Localisation criterion: the slab's states in that gap are rotated to
 * the eigenvectors of P_bottom - P_top within their span; above 1/2 a state is on the bottom, below
 * -1/2 on the top, else on neither. The bulk requires on a surface with vectors A_1, A_2: an odd
 * number of Dirac points when the strong index nu0 = 1 (at least 1); when nu0 = 0, an even number,
 * at least 2 when the weak indices nu = (nu1, nu2, nu3) (topology/z2.ts: z at k_i = pi) have
 * (A_1·nu, A_2·nu) != (0, 0) mod 2, else none required. (Derived from FKM's surface polarisations:
 * pi(L_a) pi(L_b) for two surface TRIMs is the Z2 of the bulk plane holding the four bulk TRIMs
 * they project from, which is A_i·nu mod 2 when nu0 = 0; a weak TI of stacked layers along nu shows
 * no protected cone on the surface normal to nu, two on the others.)
 *
 * Weyl (Wan, Turner, Vishwanath & Savrasov, PRB 83, 205101 (2011)): a bulk plane k'_a = c (k'_i the
 * momentum along the cut's basis vector A_i) holding no node is a 2D insulator; its Chern number
 * changes, from one plane to a later one, by the total chirality of the nodes in between (Gauss's
 * law for the Berry flux), and the surface line k'_a = c carries that many chiral modes: the Fermi
 * arcs crossing it. Lines are placed halfway between the node projections along axis a (the
 * surface axis along which they differ); on each, the modes crossing the energy are followed
 * along k'_b (crossings.ts). Sign (our convention, from the 2D rule of bulk-boundary.ts and the
 * reduced-coordinate flux): the net count along +A_b on the bottom surface changes from a line to
 * the next (+A_a side) by -e_ab3 o chi, on the top by +e_ab3 o chi, where chi is the total
 * Cartesian chirality of the nodes in between (topology/weyl.ts), o = sign det(A_1, A_2, A_3)
 * (Cartesian) and e_ab3 = +1 for (a, b) = (1, 2), -1 for (2, 1).
 */
import type { BlochHamiltonian } from '../bloch/hamiltonian.js';
import { ModelError, valueText } from '../model/errors.js';
import { BandSampler } from '../spectra/common.js';
import { weylPoints } from '../topology/weyl.js';
import { z2Index } from '../topology/z2.js';
import { bandRanges, energyInGap, zoneBandRanges, type BandRanges } from './bulk-gap.js';
import { cutInfo, projectToSurface, wholeNumber } from './common.js';
import { column, expectation, lineCrossings, rotateByDiagonal } from './crossings.js';
import type { ProjectedNode } from './fermi-map.js';
import type { PrincipalLayers } from './layers.js';
import { judge, type ArcLine, type ArcStep, type BoundaryInvariant, type BulkBoundaryOptions, type BulkBoundaryResult, type DiracPoint, type SurfaceCount } from './boundary-result.js';
import { checkedInvariant, openSample, thinSample, type OpenSample } from './open-sample.js';

/** 3 x 3 inverse of the cut's integer basis (rows A_i, in old lattice units): k = A^-1 k'. */
function inverse3(a: number[][]): number[][] {
  const [[a0, a1, a2], [b0, b1, b2], [c0, c1, c2]] = a;
  const det = a0 * (b1 * c2 - b2 * c1) - a1 * (b0 * c2 - b2 * c0) + a2 * (b0 * c1 - b1 * c0);
  return [
    [(b1 * c2 - b2 * c1) / det, (a2 * c1 - a1 * c2) / det, (a1 * b2 - a2 * b1) / det],
    [(b2 * c0 - b0 * c2) / det, (a0 * c2 - a2 * c0) / det, (a2 * b0 - a0 * b2) / det],
    [(b0 * c1 - b1 * c0) / det, (a1 * c0 - a0 * c1) / det, (a0 * b1 - a1 * b0) / det],
  ];
}

/** Bulk bands over the bulk momenta k' = (k'_1, k'_2, q) with the fixed coordinates given (NaN: swept), nq (or nt x nq) points. */
function planeRanges(h: BlochHamiltonian, layers: PrincipalLayers, fixed: [number, number], nt: number, nq: number): BandRanges {
  const inv = inverse3(layers.basis);
  const free = fixed.findIndex((x) => Number.isNaN(x));
  const kp = [0, 0, 0];
  return bandRanges(h, (free >= 0 ? nt : 1) * nq, (p, k) => {
    kp[0] = fixed[0]; kp[1] = fixed[1];
    if (free >= 0) kp[free] = -Math.PI + (2 * Math.PI * Math.floor(p / nq)) / nt;
    kp[2] = -Math.PI + (2 * Math.PI * (p % nq)) / nq;
    for (let j = 0; j < 3; j++) k[j] = kp[0] * inv[j][0] + kp[1] * inv[j][1] + kp[2] * inv[j][2];
  });
}

/** The 3D check: surface Dirac points (Z2) or Fermi-arc crossings (Weyl) on the two surfaces of a slab. */
export function slabSurfaces(h: BlochHamiltonian, options: BulkBoundaryOptions): BulkBoundaryResult {
  const sample = openSample(h, options, 24);
  const nk = options.nk === undefined ? 256 : wholeNumber(options.nk, 'nk', 16, 100000);
  const kind: BoundaryInvariant = checkedInvariant(h, options.invariant) ?? (h.spec.orbitals.some((o) => o.spin !== undefined) ? 'z2' : 'weyl');
  return kind === 'z2' ? diracPoints(h, options, sample) : fermiArcs(h, options, sample, nk);
}

function diracPoints(h: BlochHamiltonian, options: BulkBoundaryOptions, sample: OpenSample): BulkBoundaryResult {
  const ranges = zoneBandRanges(h);
  const { energy, below, gap } = energyInGap(ranges, options.energy);
  const warnings: string[] = [];
  const z = z2Index(h, { bands: below });
  warnings.push(...z.checks.warnings.map((w) => `Z2: ${w}`));
  const value = z.z2, weak = z.weak ?? [null, null, null];
  const certified = z.checks.certified === true;
  const known = value !== null && weak.every((x) => x !== null);
  // The weak indices seen by the surface: (A_1·nu, A_2·nu) mod 2.
  const seen = sample.layers.basis.slice(0, 2).map((row) => (((row.reduce((s, x, j) => s + x * (weak[j] ?? 0), 0)) % 2) + 2) % 2);
  const least = !known ? null : value === 1 ? 1 : seen.some((x) => x === 1) ? 2 : 0;

  const sampler = new BandSampler(sample.h);
  const n = sampler.bandCount;
  const matrix = new Float64Array(2 * n * n);
  const side = Float64Array.from(sample.onFirst, (f, i) => f - sample.onLast[i]);
  const cones: { bottom: DiracPoint[]; top: DiracPoint[] } = { bottom: [], top: [] };
  let stray = 0;
  for (const f of [[0, 0], [0.5, 0], [0, 0.5], [0.5, 0.5]]) {
    const kPar = f.map((x) => 2 * Math.PI * x);
    const projected = planeRanges(h, sample.layers, [kPar[0], kPar[1]], 1, 64);
    const lo = projected.hi[below - 1], hi = projected.lo[below];
    if (!(lo < hi)) {
      warnings.push(`no bulk gap projected onto the surface TRIM (${f.join(', ')}): bands ${below - 1} and ${below} overlap there, so no Dirac point is counted at it`);
      continue;
    }
    const e = sampler.solveWithVectors(kPar);
    sample.h.fill(kPar, matrix);
    const inGap: Float64Array[] = [];
    for (let b = 0; b < n; b++) if (e[b] > lo && e[b] < hi) inGap.push(column(sampler.vectors, n, b));
    const { values, states } = rotateByDiagonal(inGap, side);
    for (const [surface, pick] of [['bottom', (x: number) => x > 0.5], ['top', (x: number) => x < -0.5]] as const) {
      const here = states.filter((_, i) => pick(values[i]));
      if (here.length % 2 === 1) warnings.push(`the ${surface} surface has ${here.length} states in the gap at the TRIM (${f.join(', ')}): not Kramers pairs, so the slab does not look time-reversal symmetric`);
      const energies = here.map((v) => expectation(matrix, n, v)).sort((x, y) => x - y);
      for (let p = 0; p + 1 < energies.length; p += 2) cones[surface].push({ kPar: f, energy: (energies[p] + energies[p + 1]) / 2 });
    }
    stray += values.filter((x) => Math.abs(x) <= 0.5).length;
  }
  const thin = thinSample(h, sample, Math.min(energy - gap[0], gap[1] - energy), 'slab');
  if (thin !== null) warnings.push(thin);
  if (stray > 0) warnings.push(`${stray} state(s) in the projected gaps at the surface TRIMs lie on neither surface (the outer ${sample.edgeLayers} planes of each hold less than half of it): the slab (${sample.width} planes) may be too thin`);
  const count = (found: DiracPoint[]): SurfaceCount => {
    if (least === null) return { cones: found, count: found.length, expected: null, agrees: null, extra: 0 };
    return { cones: found, count: found.length, expected: least, agrees: found.length % 2 === value && found.length >= least, extra: found.length - least };
  };
  const surfaces = { bottom: count(cones.bottom), top: count(cones.top) };
  const verdict = judge(!known || stray > 0 || thin !== null, [surfaces.bottom, surfaces.top]);
  const describe = (label: string, s: SurfaceCount): string => {
    const at = s.cones!.map((c) => `(${c.kPar.join(', ')})`).join(', ');
    const what = `${s.count} Dirac point${s.count === 1 ? '' : 's'}${s.count > 0 ? ` at ${at}` : ''}`;
    if (s.agrees === null) return `${label} surface: ${what}`;
    const need = value === 1 ? 'an odd number' : s.expected === 2 ? 'an even number, at least 2 (the weak indices)' : 'an even number';
    if (!s.agrees) return `${label} surface: ${what}, but nu0 = ${value}, nu = (${weak.join(', ')}) require ${need}`;
    if (s.extra > 0) return `${label} surface: ${what}: ${need} as the indices require, ${s.extra} beyond the ${s.expected} they protect`;
    return `${label} surface: ${what}, as the indices require`;
  };
  const head = verdict === 'undetermined'
    ? !known ? 'undetermined: the bulk Z2 indices are not certain at these parameters' : thin !== null ? `undetermined: the slab (${sample.width} planes) is too thin for its surface modes (see the warnings)` : `undetermined: ${stray} gap state(s) on neither surface`
    : `${verdict === 'agree' ? 'agree' : verdict === 'extra-modes' ? 'disagree in number, agree in parity' : 'disagree'}: nu0 = ${value}, nu = (${weak.join(', ')})`;
  return {
    kind: 'bulk-boundary',
    boundary: 'surface',
    cut: cutInfo(sample.layers),
    energy,
    bulkGap: gap,
    bands: below,
    invariant: { kind: 'z2', value, certified, weak },
    width: sample.width,
    edgeLayers: sample.edgeLayers,
    surfaces,
    verdict,
    summary: `${head} on the surface ${valueText(sample.layers.miller)}; ${describe('bottom', surfaces.bottom)}; ${describe('top', surfaces.top)}`,
    checks: { warnings, grid: ranges.grid },
  };
}

/** Signed handedness of the cut's basis in Cartesian coordinates. */
function orientation3(h: BlochHamiltonian, basis: number[][]): number {
  const a = h.spec.vectors;
  const [u, v, w] = basis.map((row) => a[0].map((_, c) => row.reduce((s, x, j) => s + x * a[j][c], 0)));
  return Math.sign(u[0] * (v[1] * w[2] - v[2] * w[1]) - u[1] * (v[0] * w[2] - v[2] * w[0]) + u[2] * (v[0] * w[1] - v[1] * w[0]));
}

/** x mod 1 in [0, 1) (a value within 1e-12 of 1 is 0). */
const frac = (x: number): number => { const f = x - Math.floor(x); return f > 1 - 1e-12 ? 0 : f; };

function fermiArcs(h: BlochHamiltonian, options: BulkBoundaryOptions, sample: OpenSample, nk: number): BulkBoundaryResult {
  const warnings: string[] = [];
  // More candidates than the locator's default: a missed node would read as a wrong arc count.
  const weyl = weylPoints(h, { maxCandidates: 32 });
  warnings.push(...weyl.checks.warnings.map((w) => `Weyl points: ${w}`));
  const layers = sample.layers;
  const nodes: ProjectedNode[] = weyl.points.map((p) => ({ k: p.fractions, kPar: projectToSurface(layers, p.k).map((x) => x / (2 * Math.PI)), chirality: p.chirality }));
  const below = weyl.bands[1] + 1;
  // The chiralities of every node of a periodic zone sum to zero (Nielsen & Ninomiya, Nucl. Phys. B 185, 20 (1981)): any other sum means a node was missed.
  const complete = weyl.total === 0;
  if (weyl.total !== null && !complete) warnings.push(`the Weyl nodes found have chiralities summing to ${weyl.total}, not 0: a node was missed, so the arcs cannot be checked`);
  const certified = complete && weyl.points.every((p) => p.chirality !== null);
  const value = certified ? weyl.points.reduce((s, p) => s + Math.abs(p.chirality!), 0) : null;

  // The energy: given, or the nodes' mean energy (the middle of the crossing bands there).
  let energy: number;
  if (options.energy !== undefined) {
    if (typeof options.energy !== 'number' || !Number.isFinite(options.energy)) throw new ModelError('energy', `expected a finite number. Value: ${valueText(options.energy)}`);
    energy = options.energy;
  } else if (weyl.points.length > 0) {
    const bulk = new BandSampler(h);
    energy = weyl.points.reduce((s, p) => { const e = bulk.solve(p.k); return s + (e[below - 1] + e[below]) / 2; }, 0) / weyl.points.length;
  } else energy = energyInGap(zoneBandRanges(h), undefined).energy;

  // The lines: halfway between consecutive distinct node projections along the axis where they differ most.
  const distinct = (axis: number): number[] => {
    const v = nodes.map((n) => frac(n.kPar[axis])).sort((x, y) => x - y);
    return v.filter((x, i) => i === 0 || x - v[i - 1] > 1e-6).filter((x, i, all) => !(i === all.length - 1 && all.length > 1 && all[0] + 1 - x <= 1e-6));
  };
  const axis = distinct(1).length > distinct(0).length ? 1 : 0;
  const other = 1 - axis;
  const values = distinct(axis);
  const at = values.length === 0 ? [0] : values.map((x, i) => frac(i + 1 < values.length ? (x + values[i + 1]) / 2 : (x + values[0] + 1) / 2));
  at.sort((x, y) => x - y);
  const sampler = new BandSampler(sample.h);
  const lines: { bottom: ArcLine[]; top: ArcLine[] } = { bottom: [], top: [] };
  let stray = 0, open = 0, narrowest = Infinity;
  for (const c of at) {
    const fixed: [number, number] = [NaN, NaN];
    fixed[axis] = 2 * Math.PI * c;
    const plane = planeRanges(h, layers, fixed, 64, 32);
    const lo = plane.hi[below - 1], hi = plane.lo[below];
    if (!(lo < energy && energy < hi)) {
      open++;
      warnings.push(`the bulk plane k'_${axis + 1} = ${c.toFixed(4)} x 2pi is not gapped at E = ${energy.toPrecision(4)} (bands ${below - 1} and ${below} span up to ${lo.toPrecision(4)} and from ${hi.toPrecision(4)}): its line is not counted`);
      for (const s of ['bottom', 'top'] as const) lines[s].push({ axis, at: c, modes: null, right: 0, left: 0, net: 0 });
      continue;
    }
    narrowest = Math.min(narrowest, energy - lo, hi - energy);
    const found = lineCrossings(sampler, sample.onFirst, sample.onLast, energy, [energy - 0.8 * (energy - lo), energy + 0.8 * (hi - energy)], (t, k) => { k[axis] = 2 * Math.PI * c; k[other] = t; }, nk, sample.edgeLayers);
    stray += found.stray;
    warnings.push(...found.warnings);
    for (const [s, modes] of [['bottom', found.first], ['top', found.last]] as const) {
      const right = modes.filter((m) => m.velocity > 0).length;
      lines[s].push({ axis, at: c, modes, right, left: modes.length - right, net: 2 * right - modes.length });
    }
  }
  const thin = Number.isFinite(narrowest) ? thinSample(h, sample, narrowest, 'slab') : null;
  if (thin !== null) warnings.push(thin);
  const sign = -(axis === 0 ? 1 : -1) * orientation3(h, layers.basis);
  const count = (ls: ArcLine[], surfaceSign: number): SurfaceCount => {
    const steps: ArcStep[] = ls.map((line, i) => {
      const next = ls[(i + 1) % ls.length];
      const end = i + 1 < ls.length ? next.at : next.at + 1;
      const between = nodes.filter((n) => { const x = frac(n.kPar[axis]); return (x > line.at && x < end) || (x + 1 > line.at && x + 1 < end); });
      const chirality = between.every((n) => n.chirality !== null) ? between.reduce((s, n) => s + n.chirality!, 0) : null;
      const jump = next.net - line.net;
      const expected = chirality === null ? null : surfaceSign * sign * chirality + 0;
      const agrees = expected === null || line.modes === null || next.modes === null ? null : jump === expected;
      return { from: line.at, to: next.at, chirality, jump, expected, agrees };
    });
    const crossings = ls.reduce((s, l) => s + (l.modes?.length ?? 0), 0);
    const extra = ls.reduce((s, l) => s + (l.modes === null ? 0 : l.modes.length - Math.abs(l.net)), 0);
    const expected = steps.every((s) => s.expected !== null) ? steps.reduce((s, x) => s + Math.abs(x.expected!), 0) : null;
    const agrees = steps.some((s) => s.agrees === false) ? false : steps.every((s) => s.agrees === true) ? true : null;
    return { lines: ls, steps, count: crossings, expected, agrees, extra };
  };
  const surfaces = { bottom: count(lines.bottom, 1), top: count(lines.top, -1) };
  const verdict = judge(!certified || stray > 0 || open > 0 || thin !== null, [surfaces.bottom, surfaces.top]);
  const describe = (label: string, s: SurfaceCount): string => {
    const nets = s.lines!.map((l) => `${l.net} at ${l.at.toFixed(3)}`).join(', ');
    const bad = s.steps!.filter((x) => x.agrees === false).map((x) => `from ${x.from.toFixed(3)} to ${x.to.toFixed(3)} the net count changes by ${x.jump}, but the nodes between (chirality ${x.chirality}) require ${x.expected}`);
    return `${label} surface: net crossings ${nets}${bad.length > 0 ? `; ${bad.join('; ')}` : ''}${s.extra > 0 ? `; ${s.extra} crossings beyond the net counts (trivial pairs)` : ''}`;
  };
  const head = verdict === 'undetermined'
    ? !complete ? `undetermined: the nodes found have chiralities summing to ${weyl.total ?? 'an uncertain value'}, not 0` : !certified ? 'undetermined: a Weyl node\'s chirality is not certain' : open > 0 ? `undetermined: ${open} line(s) where the bulk is not gapped at the energy` : thin !== null ? `undetermined: the slab (${sample.width} planes) is too thin for its surface modes (see the warnings)` : `undetermined: ${stray} crossing(s) on neither surface`
    : `${verdict === 'agree' ? 'agree' : verdict === 'extra-modes' ? 'disagree in number, agree in net chirality' : 'disagree'}: ${nodes.length} Weyl node${nodes.length === 1 ? '' : 's'} (chiralities ${nodes.map((n) => n.chirality).join(', ') || 'none'})`;
  return {
    kind: 'bulk-boundary',
    boundary: 'surface',
    cut: cutInfo(layers),
    energy,
    bulkGap: null,
    bands: below,
    invariant: { kind: 'weyl', value, certified },
    width: sample.width,
    edgeLayers: sample.edgeLayers,
    surfaces,
    nodes,
    verdict,
    summary: `${head}, lines k'_${axis + 1} = const of the surface ${valueText(layers.miller)} at E = ${energy.toPrecision(4)}; ${describe('bottom', surfaces.bottom)}; ${describe('top', surfaces.top)}`,
    checks: { warnings, grid: [64, 32] },
  };
}
