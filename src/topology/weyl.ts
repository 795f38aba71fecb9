/**
 * Weyl points: located with the spectra module's gap-closing locator, each given its chirality as
 * the Chern number of the bands below the crossing on a small sphere around it (Fukui–Hatsugai–Suzuki
 * on a (theta, phi) grid, outward orientation). With references.md's convention a crossing
 * H = v_ij q_i sigma_j has chirality sign det v (the lower band of d·sigma carries +deg d/|d|); a
 * left-handed lattice basis flips the sign so chirality refers to Cartesian orientation.
 */
import type { BlochHamiltonian } from '../bloch/hamiltonian.js';
import { checkInterrupt } from '../interrupt.js';
import { ModelError, valueText } from '../model/errors.js';
import { certifyGap, type CertifyRegion } from '../spectra/certify.js';
import { findGapClosings } from '../spectra/gap.js';
import { bandGroup, compileSource, FrameSampler, orientation3D, type BandGroup, type TopologyChecks, type TopologyOptions, type TopologySource } from './common.js';
import { determinantInPlace, overlapMatrix } from './links.js';

export interface WeylOptions extends TopologyOptions {
  /** k-points per direction of the locator's search grid (default: the locator's). */
  grid?: number | number[];
  /** Sphere radius in reduced momentum (radians); default a third of the distance to the nearest other point, at most 0.1. */
  radius?: number;
  /** Sphere grid [theta, phi]; default [24, 48]. */
  sphere?: [number, number];
  /** Most closings refined by the locator (default 8). */
  maxCandidates?: number;
}

export interface WeylPoint {
  /** Reduced momentum (radians) and in fractions of the reciprocal vectors. */
  k: number[];
  fractions: number[];
  /** Direct gap at the refined point. */
  gap: number;
  /** +1 or -1 (or another integer for a multi-Weyl point); null when the sphere touched another crossing. */
  chirality: number | null;
  /** Flux through the sphere / 2pi before rounding. */
  flux: number;
  radius: number;
}

export interface WeylResult {
  kind: 'weyl';
  bands: [number, number];
  points: WeylPoint[];
  /** Sum of the chiralities (zero in a periodic zone, Nielsen–Ninomiya). */
  total: number | null;
  checks: TopologyChecks;
}

/**
 * Berry flux of the group through a sphere of `radius` around `centre` divided by 2pi, in
 * reduced-momentum orientation (theta from the +k3 pole, phi from k1 towards k2).
 */
export function sphereFlux(sampler: FrameSampler, centre: ArrayLike<number>, radius: number, nTheta: number, nPhi: number): { flux: number; maxPhase: number } {
  const { n, m, frameLength: fl } = sampler;
  const rows = nTheta + 1;
  const frames = new Float64Array(rows * nPhi * fl);
  const k = new Float64Array(3);
  for (let i = 0; i < rows; i++) {
    checkInterrupt();
    const theta = (Math.PI * i) / nTheta;
    for (let j = 0; j < nPhi; j++) {
      const phi = (2 * Math.PI * j) / nPhi;
      // The poles are one point: sample them once so their frames agree exactly.
      const pj = i === 0 || i === nTheta ? 0 : phi;
      k[0] = centre[0] + radius * Math.sin(theta) * Math.cos(pj);
      k[1] = centre[1] + radius * Math.sin(theta) * Math.sin(pj);
      k[2] = centre[2] + radius * Math.cos(theta);
      sampler.sample(k, frames, (i * nPhi + j) * fl);
    }
  }
  const scratch = new Float64Array(2 * m * m);
  const det = new Float64Array(2);
  const link = (p: number, q: number): [number, number] => {
    overlapMatrix(n, m, frames, p * fl, frames, q * fl, null, scratch);
    determinantInPlace(m, scratch, det);
    return [det[0], det[1]];
  };
  let total = 0, maxPhase = 0;
  for (let i = 0; i < nTheta; i++) {
    for (let j = 0; j < nPhi; j++) {
      const j1 = (j + 1) % nPhi;
      const a = i * nPhi + j, b = (i + 1) * nPhi + j, c = (i + 1) * nPhi + j1, d = i * nPhi + j1;
      // Around (theta, phi) -> (theta+, phi) -> (theta+, phi+) -> (theta, phi+): e_theta x e_phi is outward.
      const u1 = link(a, b), u2 = link(b, c), u3 = link(c, d), u4 = link(d, a);
      let re = u1[0] * u2[0] - u1[1] * u2[1], im = u1[0] * u2[1] + u1[1] * u2[0];
      let t = re * u3[0] - im * u3[1]; im = re * u3[1] + im * u3[0]; re = t;
      t = re * u4[0] - im * u4[1]; im = re * u4[1] + im * u4[0]; re = t;
      const f = -Math.atan2(im, re);
      total += f;
      maxPhase = Math.max(maxPhase, Math.abs(f));
    }
  }
  return { flux: total / (2 * Math.PI), maxPhase };
}

function distance(a: number[], b: number[]): number {
  let s = 0;
  for (let i = 0; i < 3; i++) {
    let d = a[i] - b[i];
    d -= 2 * Math.PI * Math.round(d / (2 * Math.PI));
    s += d * d;
  }
  return Math.sqrt(s);
}

/**
 * The sphere of `radius` around `centre` for the gap certificate, in (theta, phi): a step of
 * (dtheta, dphi) moves each Cartesian-reduced component of k by at most radius (|dtheta| + |dphi|).
 */
function sphereRegion(centre: ArrayLike<number>, radius: number): CertifyRegion {
  return {
    axes: [0, 1],
    origin: [0, 0, 0],
    ranges: [[0, Math.PI], [0, 2 * Math.PI]],
    chart: {
      place: (u, k) => {
        const theta = u[0], phi = u[1];
        k[0] = centre[0] + radius * Math.sin(theta) * Math.cos(phi);
        k[1] = centre[1] + radius * Math.sin(theta) * Math.sin(phi);
        k[2] = centre[2] + radius * Math.cos(theta);
      },
      reach: (half, steps) => steps.fill(radius * (half[0] + half[1])),
    },
  };
}

/** Weyl points of a 3D model between the group and the band above it, with chiralities. */
export function weylPoints(source: TopologySource, options: WeylOptions = {}): WeylResult {
  const h: BlochHamiltonian = compileSource(source, options);
  if (h.dim !== 3) throw new ModelError('periodic', `Weyl points are located in 3D models. Value: ${h.dim}`);
  const group: BandGroup = bandGroup(options.bands, h.size);
  const [nTheta, nPhi] = options.sphere ?? [24, 48];
  if (![nTheta, nPhi].every((x) => Number.isInteger(x) && x >= 4 && x <= 4096)) throw new ModelError('sphere', `expected [theta points, phi points], whole numbers from 4 to 4096. Value: ${valueText(options.sphere)}`);
  if (options.radius !== undefined && !(options.radius > 0 && options.radius < Math.PI)) throw new ModelError('radius', `expected a radius between 0 and pi (radians). Value: ${valueText(options.radius)}`);
  const located = findGapClosings(h, {
    bands: options.bands,
    ...(options.grid !== undefined ? { grid: options.grid } : {}),
    ...(options.maxCandidates !== undefined ? { maxCandidates: options.maxCandidates } : {}),
    ...(options.gapTolerance !== undefined ? { tolerance: options.gapTolerance } : {}),
  });
  const closed = located.points.filter((p) => p.closed);
  const sampler = new FrameSampler(h, { lo: 0, hi: group.hi });
  const sign = orientation3D(h.spec);
  const warnings = [...located.checks.warnings];
  const points: WeylPoint[] = closed.map((p, idx) => {
    const others = closed.filter((_, j) => j !== idx).map((q) => distance(p.k, q.k));
    const nearest = others.length > 0 ? Math.min(...others) : Infinity;
    const radius = options.radius ?? Math.min(0.1, nearest / 3);
    sampler.resetGap();
    const { flux, maxPhase } = sphereFlux(sampler, p.k, radius, nTheta, nPhi);
    const proof = certifyGap(h, { lo: 0, hi: group.hi }, sphereRegion(p.k, radius), { tolerance: options.gapTolerance });
    let chirality: number | null = sign * Math.round(flux) + 0;
    if (proof.verdict !== 'gapped' || maxPhase > Math.PI / 2 || Math.abs(flux - Math.round(flux)) > 1e-3) {
      chirality = null;
      const gap = proof.verdict === 'gapped' ? `gap proven above ${proof.lowerBound.toExponential(2)}` : `gap not proven on it, ${proof.minGap.toExponential(2)} at the smallest`;
      warnings.push(`Weyl point at k = (${p.fractions.map((x) => x.toFixed(4)).join(', ')}): the sphere of radius ${radius.toPrecision(3)} is not sound (${gap}, largest plaquette phase ${maxPhase.toFixed(3)}, flux ${flux.toFixed(4)}); give a smaller radius or a finer sphere`);
    }
    if (nearest < 2 * radius) warnings.push(`Weyl point at k = (${p.fractions.map((x) => x.toFixed(4)).join(', ')}): another crossing lies within ${nearest.toPrecision(3)} rad`);
    return { k: [...p.k], fractions: [...p.fractions], gap: p.gap, chirality, flux: sign * flux, radius };
  });
  const total = points.some((p) => p.chirality === null) ? null : points.reduce((s, p) => s + p.chirality!, 0);
  const minGap = closed.length > 0 ? Math.min(...closed.map((p) => p.gap)) : located.checks.minGap;
  return { kind: 'weyl', bands: [0, group.hi], points, total, checks: { minGap, warnings, grid: [nTheta, nPhi] } };
}
