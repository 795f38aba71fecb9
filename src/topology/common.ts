/**
 * Shared machinery of the topology module: what an invariant is computed from, the `checks` every
 * result carries, and a per-k sampler of a band group's eigenvectors ("frames") that owns its
 * scratch, tracks the gap to the other bands and never allocates per k.
 */
import type { BlochHamiltonian, BlochConvention } from '../bloch/hamiltonian.js';
import { HermitianEigensolver } from '../linalg/eigh.js';
import { ModelError, valueText } from '../model/errors.js';
import type { ModelSpec, ParameterValues } from '../model/spec.js';
import { groupGap, type BandGroup, type BandSelection, type SpectrumChecks, type SpectrumSource } from '../spectra/common.js';
import { certifyGap } from '../spectra/certify.js';
import { gapChecks, gapTolerance, type GapRecord } from './checks.js';
import type { StripProof } from './parts.js';

export { bandGroup, compileSource, type BandGroup, type BandSelection } from '../spectra/common.js';
export { formatK } from './checks.js';

/** A model description, or one already compiled (used as is; `params`, if given, are applied). */
export type TopologySource = SpectrumSource;

/** What a result checked while it was computed: the engine-wide `checks` shape. */
export type TopologyChecks = SpectrumChecks;

/** Options every topology function accepts. */
export interface TopologyOptions {
  params?: ParameterValues;
  /** Bloch convention when compiling a model description (Berry phases and Wannier centres depend on it). */
  convention?: BlochConvention;
  /** The band group; default the lower half of the bands. */
  bands?: BandSelection;
  /**
   * A gap at or below this (in energy units) counts as closed. Default: 1e-9 times the largest
   * |energy| sampled, which an exact crossing on the grid always falls below.
   */
  gapTolerance?: number;
}

/** How many numbers a sampler may keep of the frames it solved (`remember`): 64 MB. */
export const FRAME_MEMORY = 8_000_000;

/**
 * Eigenvectors of one band group at any k. A frame is the group's m eigenvectors stored one after
 * another (vector j at offset 2*n*j, n complex entries each), so overlaps read contiguous memory.
 */
export class FrameSampler {
  readonly hamiltonian: BlochHamiltonian;
  readonly group: BandGroup;
  /** Orbitals (matrix size). */
  readonly n: number;
  /** Bands in the group. */
  readonly m: number;
  /** Energies at the latest k, ascending. */
  readonly energies: Float64Array;
  /** All eigenvectors at the latest k, as columns. */
  readonly vectors: Float64Array;
  /** Smallest gap seen since `resetGap`, and where (reduced k). */
  minGap = Infinity;
  readonly minGapAt: Float64Array;
  /** Largest |energy| seen: the scale for the default gap tolerance. */
  energyScale = 0;
  private readonly matrix: Float64Array;
  private readonly solver: HermitianEigensolver;
  /**
   * What `sample` solved (see `remember`): energies then the group's frame per k, in slabs, found
   * through one map per momentum component (numeric keys: no string per k).
   */
  private memo: Map<number, unknown> | null = null;
  private memoRoom = 0;
  private slab = new Float64Array(0);
  private slabUsed = 0;

  constructor(hamiltonian: BlochHamiltonian, group: BandGroup) {
    this.hamiltonian = hamiltonian;
    this.group = group;
    this.n = hamiltonian.size;
    this.m = group.hi - group.lo + 1;
    this.energies = new Float64Array(this.n);
    this.vectors = new Float64Array(2 * this.n * this.n);
    this.matrix = new Float64Array(2 * this.n * this.n);
    this.solver = new HermitianEigensolver(this.n);
    this.minGapAt = new Float64Array(Math.max(hamiltonian.dim, 1));
  }

  /**
   * Diagonalise H(k); write the group's frame into `out` at `offset` (if given); track the gap
   * unless `track` is false (a k that another part of a split computation accounts for).
   */
  sample(k: ArrayLike<number>, out?: Float64Array, offset = 0, track = true): Float64Array {
    const n = this.n;
    const e = this.energies;
    const known = this.memo === null ? undefined : this.recall(k);
    if (known !== undefined) {
      e.set(known.subarray(0, n));
      if (out !== undefined) out.set(known.subarray(n), offset);
      if (track) this.track(k);
      return e;
    }
    this.hamiltonian.fill(k, this.matrix);
    this.solver.solve(this.matrix, e, this.vectors);
    if (track) this.track(k);
    if (out !== undefined) this.frameInto(out, offset);
    if (this.memo !== null && this.memoRoom > 0) this.keep(k);
    return e;
  }

  /**
   * Keep what `sample` solves, up to `doubles` numbers in all, so a k solved once (by a gap proof,
   * say) is not solved again by the computation that follows on the same lines.
   */
  remember(doubles: number): this {
    this.memo = new Map();
    this.memoRoom = doubles;
    return this;
  }

  private recall(k: ArrayLike<number>): Float64Array | undefined {
    let level: unknown = this.memo;
    for (let i = 0; i < this.hamiltonian.dim && level !== undefined; i++) level = (level as Map<number, unknown>).get(k[i]);
    return level as Float64Array | undefined;
  }

  private keep(k: ArrayLike<number>): void {
    const size = this.n + this.frameLength;
    if (this.slabUsed + size > this.slab.length) {
      // Slabs grow from room for 256 k-points, doubling up to 2^16 numbers: a small proof allocates little.
      const grown = Math.min(1 << 16, Math.max(256 * size, 2 * this.slab.length));
      this.slab = new Float64Array(Math.max(size, Math.min(this.memoRoom, grown)));
      this.slabUsed = 0;
    }
    const kept = this.slab.subarray(this.slabUsed, this.slabUsed + size);
    this.slabUsed += size;
    this.memoRoom -= size;
    kept.set(this.energies);
    this.frameInto(kept, this.n);
    const dim = this.hamiltonian.dim;
    let level = this.memo!;
    for (let i = 0; i + 1 < dim; i++) {
      let next = level.get(k[i]) as Map<number, unknown> | undefined;
      if (next === undefined) level.set(k[i], (next = new Map()));
      level = next;
    }
    level.set(k[dim - 1], kept);
  }

  private track(k: ArrayLike<number>): void {
    const e = this.energies, n = this.n;
    const gap = groupGap(e, 0, this.group, n);
    if (gap < this.minGap) {
      this.minGap = gap;
      for (let i = 0; i < this.minGapAt.length; i++) this.minGapAt[i] = k[i];
    }
    const scale = Math.max(Math.abs(e[0]), Math.abs(e[n - 1]));
    if (scale > this.energyScale) this.energyScale = scale;
  }

  /** The group's columns of the latest eigenvectors into `out` at `offset`. */
  private frameInto(out: Float64Array, offset: number): void {
    const n = this.n, v = this.vectors;
    for (let j = 0; j < this.m; j++) {
      const col = this.group.lo + j;
      const base = offset + 2 * n * j;
      for (let a = 0; a < n; a++) {
        out[base + 2 * a] = v[2 * (a * n + col)];
        out[base + 2 * a + 1] = v[2 * (a * n + col) + 1];
      }
    }
  }

  resetGap(): void {
    this.minGap = Infinity;
    this.energyScale = 0;
  }

  /** Frame size in doubles. */
  get frameLength(): number {
    return 2 * this.n * this.m;
  }

  /** The gap tolerance in force (explicit, or relative to the energies seen). */
  tolerance(explicit?: number): number {
    return gapTolerance(explicit, this.energyScale);
  }

  /** The gap statistics since `resetGap`, as plain data. */
  gapRecord(): GapRecord {
    return { minGap: this.minGap, minGapAt: Array.from(this.minGapAt), energyScale: this.energyScale };
  }

  /**
   * The checks of a gap-dependent result: gapless when the smallest gap is at or below tolerance,
   * with a warning naming k and the gap.
   */
  gapChecks(grid: number[], explicitTolerance?: number, what = 'the invariant'): TopologyChecks {
    return gapChecks(this.gapRecord(), this.group, grid, explicitTolerance, what);
  }
}

/** The lines of a uniform n-point axis: k_j = -pi + 2pi j/n. */
export function uniformLines(n: number): Float64Array {
  return Float64Array.from({ length: n }, (_, j) => -Math.PI + (2 * Math.PI * j) / n);
}

/** Insert the midpoint of every marked interval of ascending `lines` (the last interval closes at `end`). */
export function bisectLines(lines: Float64Array, marked: Uint8Array, end: number): Float64Array {
  const out: number[] = [];
  for (let a = 0; a < lines.length; a++) {
    out.push(lines[a]);
    if (marked[a]) out.push((lines[a] + (a + 1 < lines.length ? lines[a + 1] : end)) / 2);
  }
  return Float64Array.from(out);
}

/**
 * The gap certificate over a strip of a plane: plane axis `axis` (0 or 1) restricted to [from, to]
 * (radians), the other spanning the zone. A split diagnostic proves its part's strip.
 */
export function stripProof(h: BlochHamiltonian, group: BandGroup, plane: Plane, axis: 0 | 1, from: number, to: number, tolerance: number | undefined): StripProof {
  const full: [number, number] = [-Math.PI, Math.PI];
  const ranges: [number, number][] = axis === 0 ? [[from, to], full] : [full, [from, to]];
  const cert = certifyGap(h, group, { axes: plane.axes, origin: plane.origin, ranges }, { tolerance });
  const proof: StripProof = { verdict: cert.verdict, minGap: cert.minGap, minGapAt: cert.minGapAt };
  if (cert.reason !== undefined) proof.reason = cert.reason;
  return proof;
}

/** The two in-plane axes and the fixed momentum of a 2D slice of the zone. */
export interface Plane {
  /** Reduced axes spanning the slice, in right-handed (cyclic) order. */
  axes: [number, number];
  /** The full reduced k of the slice's origin (fixed components set, in-plane ones ignored). */
  origin: number[];
}

/** A 2D slice: the whole zone of a 2D model, or `{normal, at}` of a 3D model (k_normal = at, radians). */
export interface PlaneSpec {
  normal: number;
  at: number;
}

export function resolvePlane(dim: number, plane: PlaneSpec | undefined, field = 'plane'): Plane {
  if (dim === 2) {
    if (plane !== undefined) throw new ModelError(field, `a 2D model has one plane, the whole zone; omit "${field}". Value: ${valueText(plane)}`);
    return { axes: [0, 1], origin: [0, 0] };
  }
  if (dim !== 3) throw new ModelError('periodic', `a Brillouin-zone plane needs a 2D or 3D model. Value: ${dim}`);
  if (plane === undefined || typeof plane !== 'object') throw new ModelError(field, `a 3D model needs {normal: 0|1|2, at: k (radians)}. Value: ${valueText(plane)}`);
  if (![0, 1, 2].includes(plane.normal)) throw new ModelError(`${field}.normal`, `expected 0, 1 or 2. Value: ${valueText(plane.normal)}`);
  if (typeof plane.at !== 'number' || !Number.isFinite(plane.at)) throw new ModelError(`${field}.at`, `expected a finite momentum in radians. Value: ${valueText(plane.at)}`);
  const origin = [0, 0, 0];
  origin[plane.normal] = plane.at;
  const axes: [number, number] = [(plane.normal + 1) % 3, (plane.normal + 2) % 3];
  return { axes, origin };
}

/**
 * e^{-i G·r_a} per orbital, as (cos, sin) pairs, for G = 2pi * turns (reduced): the embedding that
 * closes a loop across the zone in the 'orbital' convention, where u(k + G) = e^{-iG·r} u(k) (from
 * H(k + G) = D H(k) D^dagger, D = diag e^{-iG·r}, with H(k) as src/bloch builds it). In the
 * 'lattice' convention H is periodic and this returns null, as it does for G = 0.
 */
export function embeddingFor(h: BlochHamiltonian, turns: ArrayLike<number>): Float64Array | null {
  if (h.convention === 'lattice' || Array.from(turns).every((t) => t === 0)) return null;
  const out = new Float64Array(2 * h.size);
  h.spec.orbitals.forEach((o, a) => {
    let phi = 0;
    for (let i = 0; i < turns.length; i++) phi -= 2 * Math.PI * turns[i] * o.position[i];
    out[2 * a] = Math.cos(phi);
    out[2 * a + 1] = Math.sin(phi);
  });
  return out;
}

/** The embedding for one turn along reduced `axis`. */
export function embedding(h: BlochHamiltonian, axis: number): Float64Array | null {
  const turns = new Array<number>(h.dim).fill(0);
  turns[axis] = 1;
  return embeddingFor(h, turns);
}

/**
 * +1 when the model's first two lattice vectors turn counter-clockwise seen from +z (a1 x a2 > 0),
 * -1 otherwise: reduced-coordinate integrals over the zone are multiplied by it so that Chern
 * numbers keep the Cartesian orientation the published values assume.
 */
export function orientation2D(spec: ModelSpec): number {
  const [a, b] = spec.vectors;
  const cross = a[0] * b[1] - a[1] * b[0];
  return cross < 0 ? -1 : 1;
}

/** +1 for a right-handed triple of lattice vectors, -1 for a left-handed one. */
export function orientation3D(spec: ModelSpec): number {
  const v = spec.vectors;
  const d = v[0][0] * (v[1][1] * v[2][2] - v[1][2] * v[2][1]) - v[0][1] * (v[1][0] * v[2][2] - v[1][2] * v[2][0]) + v[0][2] * (v[1][0] * v[2][1] - v[1][1] * v[2][0]);
  return d < 0 ? -1 : 1;
}
