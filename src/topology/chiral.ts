/**
 * Invariants of 1D chains: the winding number of a chiral-symmetric model and the Majorana number
 * of a Bogoliubov–de Gennes chain.
 *
 * Winding (stated once): with the orbitals split into sublattices A and B and H(k) = [[0, q^dagger], [q, 0]]
 * in the order (A, B), q = H_BA (rows B, columns A) in the 'lattice' convention, and
 *   nu = (1/2pi i) loop integral of d ln det q(k),  k from -pi to pi.
 * For a two-band chain H = dx sx + dy sy, q = dx + i dy: nu is the winding of the d-vector
 * (Asbóth, Oroszlány, Pályi, Lect. Notes Phys. 919 (2016), ch. 1).
 * (The lattice convention keeps det q periodic; the orbital one would add a non-integer shift.)
 *
 * Majorana number (Kitaev, Physics-Uspekhi 44, 131 (2001)): M = sign Pf A(0) · sign Pf A(pi), where
 * A(k) is the real antisymmetric form of H_BdG(k) in the Majorana basis c = (g1 + i g2)/2 at the
 * particle–hole-symmetric momenta. M = -1: topological (Majorana end modes).
 */
import { BlochHamiltonian } from '../bloch/hamiltonian.js';
import { checkInterrupt } from '../interrupt.js';
import { ComplexPfaffian } from '../linalg/pfaffian.js';
import { ModelError, valueText } from '../model/errors.js';
import { certifyGap, derivativeBounds } from '../spectra/certify.js';
import { certificateChecks } from './checks.js';
import { compileSource, formatK, type TopologyChecks, type TopologyOptions, type TopologySource } from './common.js';
import { determinantInPlace, wrapAngle } from './links.js';

export interface WindingOptions extends Omit<TopologyOptions, 'bands'> {
  /** Orbital labels of sublattice A; default: found by two-colouring the hopping graph (orbital 0 in A). */
  sublattice?: string[];
  /** Points around the zone; default 'auto' (doubled until every step of arg det q is below 0.5 rad). */
  points?: number | 'auto';
}

export interface WindingResult {
  kind: 'winding';
  convention: 'lattice';
  /** The winding number, null when the spectrum touches zero energy. */
  winding: number | null;
  /** Orbital labels of the two sublattices; q = H_BA. */
  sublattices: [string[], string[]];
  points: number;
  checks: TopologyChecks & { maxStep: number };
}

const PROBES = [0.37, -1.91, 2.53];

/** How a chiral or BdG chain's gap closes. */
const ZERO_ENERGY = 'the spectrum reaches zero energy';

/** Two-colour the orbitals so that every matrix element of H(k) joins different colours. */
function findSublattices(h: BlochHamiltonian): boolean[] {
  const n = h.size;
  const mat = new Float64Array(2 * n * n);
  const linked = new Uint8Array(n * n);
  for (const k of PROBES) {
    h.fill([k], mat);
    const scale = Math.max(1e-300, ...Array.from(mat, Math.abs));
    for (let a = 0; a < n; a++) {
      for (let b = 0; b < n; b++) if (Math.hypot(mat[2 * (a * n + b)], mat[2 * (a * n + b) + 1]) > 1e-12 * scale) linked[a * n + b] = 1;
    }
  }
  const colour = new Int8Array(n);
  for (let start = 0; start < n; start++) {
    if (colour[start] !== 0) continue;
    colour[start] = 1;
    const stack = [start];
    while (stack.length > 0) {
      const a = stack.pop()!;
      for (let b = 0; b < n; b++) {
        if (!linked[a * n + b]) continue;
        if (colour[b] === 0) {
          colour[b] = -colour[a] as 1 | -1;
          stack.push(b);
        } else if (colour[b] === colour[a]) {
          throw new ModelError('sublattice', `no chiral (sublattice) symmetry: H couples ${valueText(h.spec.orbitals[a].label)} to ${valueText(h.spec.orbitals[b].label)} within one sublattice (or has an onsite energy), so the winding number is not defined`);
        }
      }
    }
  }
  return Array.from(colour, (c) => c === 1);
}

/** Winding number of a chiral-symmetric 1D model. */
export function windingNumber(source: TopologySource, options: WindingOptions = {}): WindingResult {
  const given = compileSource(source, options);
  if (given.dim !== 1) throw new ModelError('periodic', `the winding number is defined for 1D models. Value: ${given.dim}`);
  const h = given.convention === 'lattice' ? given : new BlochHamiltonian(given.spec, given.params, { convention: 'lattice' });
  const n = h.size;
  const labels = h.spec.orbitals.map((o) => o.label);
  let inA: boolean[];
  if (options.sublattice !== undefined) {
    if (!Array.isArray(options.sublattice)) throw new ModelError('sublattice', `expected an array of orbital labels. Value: ${valueText(options.sublattice)}`);
    options.sublattice.forEach((l, i) => {
      if (!labels.includes(l)) throw new ModelError(`sublattice[${i}]`, `unknown orbital ${valueText(l)}`);
    });
    inA = labels.map((l) => options.sublattice!.includes(l));
  } else inA = findSublattices(h);
  const A = labels.map((_, i) => i).filter((i) => inA[i]);
  const B = labels.map((_, i) => i).filter((i) => !inA[i]);
  if (A.length !== B.length) throw new ModelError('sublattice', `the sublattices must hold equally many orbitals for a square q = H_BA; got ${A.length} and ${B.length}`);
  const nA = A.length;
  const mat = new Float64Array(2 * n * n);
  const q = new Float64Array(2 * nA * nA);
  const det = new Float64Array(2);
  const chiralCheck = (kk: number): void => {
    // Chiral symmetry means H_AA and H_BB vanish; check at this k.
    let worst = 0, scale = 0;
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
      const v = Math.hypot(mat[2 * (i * n + j)], mat[2 * (i * n + j) + 1]);
      scale = Math.max(scale, v);
      if (inA[i] === inA[j]) worst = Math.max(worst, v);
    }
    if (worst > 1e-10 * Math.max(scale, 1e-300)) throw new ModelError('sublattice', `H has a block within one sublattice (|H| = ${worst.toExponential(2)} at k = ${formatK([kk])}): no chiral symmetry for this split`);
  };
  /** The winding of arg det q over ascending momenta from -pi to pi (both ends included). */
  const run = (ks: ArrayLike<number>): { winding: number; maxStep: number } => {
    let total = 0, maxStep = 0, prev = 0;
    for (let j = 0; j < ks.length; j++) {
      if (j % 256 === 0) checkInterrupt();
      h.fill([ks[j]], mat);
      chiralCheck(ks[j]);
      for (let r = 0; r < nA; r++) for (let c = 0; c < nA; c++) {
        q[2 * (r * nA + c)] = mat[2 * (B[r] * n + A[c])];
        q[2 * (r * nA + c) + 1] = mat[2 * (B[r] * n + A[c]) + 1];
      }
      determinantInPlace(nA, q, det);
      const phase = Math.atan2(det[1], det[0]);
      if (j > 0) {
        const step = wrapAngle(phase - prev);
        total += step;
        maxStep = Math.max(maxStep, Math.abs(step));
      }
      prev = phase;
    }
    return { winding: total / (2 * Math.PI), maxStep };
  };
  // Across a segment of width w whose proven gap is g (so every singular value of q is at least
  // g/2), |d arg det q / dk| = |Im tr(q^-1 dq/dk)| <= nA ||q^-1|| ||dq/dk|| <= 2 nA D / g, D the
  // bound on ||dH/dk||. Keeping 2 nA D w / g below pi/2 proves that no step of the phase is
  // mistaken for its wrapped value: the sum of wrapped steps is the exact winding.
  const [D] = derivativeBounds(h, [0]);
  const requested = options.points ?? 'auto';
  const cert = certifyGap(h, { lo: 0, hi: nA - 1 }, { axes: [0], origin: [0] }, {
    tolerance: options.gapTolerance, start: 128,
    cellCondition: requested === 'auto' ? (g, [w]) => (2 * nA * D * w) / g < Math.PI / 2 : undefined,
  });
  let ks: ArrayLike<number>;
  if (requested === 'auto') ks = cert.positions[0];
  else {
    if (!Number.isInteger(requested) || requested < 3 || requested > 1 << 22) throw new ModelError('points', `expected a whole number from 3 to ${1 << 22} or "auto". Value: ${valueText(requested)}`);
    ks = Float64Array.from({ length: requested + 1 }, (_, j) => -Math.PI + (2 * Math.PI * j) / requested);
  }
  const N = ks.length - 1;
  const out = run(ks);
  const checks: WindingResult['checks'] = { ...certificateChecks(cert, { lo: 0, hi: nA - 1 }, [N], 'the winding number', ZERO_ENERGY), maxStep: out.maxStep };
  checks.certified = cert.verdict === 'gapped' && requested === 'auto';
  if (cert.verdict === 'gapped' && out.maxStep > 0.5) checks.warnings.push(`arg det q still jumps by ${out.maxStep.toFixed(3)} rad between neighbouring points at ${N} points`);
  return {
    kind: 'winding',
    convention: 'lattice',
    winding: cert.verdict === 'gapped' ? Math.round(out.winding) + 0 : null,
    sublattices: [A.map((i) => labels[i]), B.map((i) => labels[i])],
    points: N,
    checks,
  };
}

export interface MajoranaResult {
  kind: 'majorana';
  /** -1 topological, +1 trivial; null when the gap closes at k = 0 or pi. */
  majorana: number | null;
  /** sign Pf A(k) at k = 0 and pi. */
  pfaffianSigns: [number, number];
  checks: TopologyChecks;
}

/** Particle and hole orbital indices, paired ("x.e" with "x.h", else in order of appearance). */
function nambuPairs(h: BlochHamiltonian): [number, number][] {
  const orbitals = h.spec.orbitals;
  const particles = orbitals.map((o, i) => ({ o, i })).filter(({ o }) => o.nambu === 'particle');
  const holes = orbitals.map((o, i) => ({ o, i })).filter(({ o }) => o.nambu === 'hole');
  const untagged = orbitals.findIndex((o) => o.nambu === undefined);
  if (untagged >= 0) throw new ModelError(`orbitals[${untagged}].nambu`, `a Majorana number needs a BdG model with every orbital tagged "particle" or "hole" (see the BdG builder). Value: undefined`);
  if (particles.length !== holes.length) throw new ModelError('orbitals', `expected as many hole as particle orbitals; got ${particles.length} particles and ${holes.length} holes`);
  const stem = (label: string) => label.replace(/\.(e|h)$/, '');
  return particles.map(({ o, i }, r) => {
    const match = holes.find(({ o: hOrb }) => stem(hOrb.label) === stem(o.label));
    return [i, match !== undefined ? match.i : holes[r].i];
  });
}

/** Majorana number of a 1D BdG chain. */
export function majoranaNumber(source: TopologySource, options: Omit<TopologyOptions, 'bands'> = {}): MajoranaResult {
  const h = compileSource(source, options);
  if (h.dim !== 1) throw new ModelError('periodic', `the Majorana number is defined for 1D chains. Value: ${h.dim}`);
  const pairs = nambuPairs(h);
  const n = h.size;
  const mat = new Float64Array(2 * n * n);
  const a = new Float64Array(2 * n * n); // A, real, in the complex layout the Pfaffian reads
  const pfaffian = new ComplexPfaffian(n);
  const pf = new Float64Array(2);
  const warnings: string[] = [];
  const signs: number[] = [];
  // Majorana basis: for each pair (p, h), (c, c^dagger) = U (g1, g2), U = [[1, i], [1, -i]]/sqrt2 (columns g1, g2).
  // Column index 2r is g1 of pair r, 2r + 1 is g2.
  const uRe = new Float64Array(n * n), uIm = new Float64Array(n * n);
  pairs.forEach(([p, hh], r) => {
    const s = Math.SQRT1_2;
    uRe[p * n + 2 * r] = s; uIm[p * n + 2 * r + 1] = s;
    uRe[hh * n + 2 * r] = s; uIm[hh * n + 2 * r + 1] = -s;
  });
  // The scale for the symmetry check: the largest matrix element at either momentum.
  let hScale = 1e-300;
  for (const k of [0, Math.PI]) {
    h.fill([k], mat);
    for (let i = 0; i < 2 * n * n; i++) hScale = Math.max(hScale, Math.abs(mat[i]));
  }
  for (const k of [0, Math.PI]) {
    h.fill([k], mat);
    // B = U^dagger H U must be i A with A real antisymmetric (particle–hole symmetry at k = 0, pi).
    let worstReal = 0;
    for (let x = 0; x < n; x++) {
      for (let y = 0; y < n; y++) {
        let re = 0, im = 0;
        for (let i = 0; i < n; i++) {
          const ur = uRe[i * n + x], ui = -uIm[i * n + x];
          if (ur === 0 && ui === 0) continue;
          for (let j = 0; j < n; j++) {
            const vr = uRe[j * n + y], vi = uIm[j * n + y];
            if (vr === 0 && vi === 0) continue;
            const hr = mat[2 * (i * n + j)], hi = mat[2 * (i * n + j) + 1];
            const tr = ur * hr - ui * hi, ti = ur * hi + ui * hr;
            re += tr * vr - ti * vi;
            im += tr * vi + ti * vr;
          }
        }
        a[2 * (x * n + y)] = im;
        worstReal = Math.max(worstReal, Math.abs(re));
      }
    }
    if (worstReal > 1e-9 * hScale) {
      throw new ModelError('model', `H_BdG at k = ${k === 0 ? '0' : 'pi'} is not particle–hole symmetric in the Majorana basis (real part ${worstReal.toExponential(2)}): not a BdG model in the builder's Nambu convention`);
    }
    // Pf of a real antisymmetric matrix is real; an exact zero means a zero mode at this k.
    signs.push(Math.sign(pfaffian.compute(a, pf)[0]));
  }
  // The signs at 0 and pi decide the phase only when the BdG gap at zero energy is open everywhere.
  const half = { lo: 0, hi: n / 2 - 1 };
  const cert = certifyGap(h, half, { axes: [0], origin: [0] }, { tolerance: options.gapTolerance });
  const checks: TopologyChecks = certificateChecks(cert, half, [2], 'the Majorana number', ZERO_ENERGY);
  checks.warnings.push(...warnings);
  if (cert.verdict === 'gapped' && signs.includes(0)) {
    checks.gapless = true;
    checks.warnings.push('gapless: a Pfaffian at k = 0 or pi is exactly zero (a zero mode there); the Majorana number is undefined');
  }
  const defined = cert.verdict === 'gapped' && !signs.includes(0);
  checks.certified = defined;
  return { kind: 'majorana', majorana: defined ? signs[0] * signs[1] : null, pfaffianSigns: [signs[0], signs[1]], checks };
}
