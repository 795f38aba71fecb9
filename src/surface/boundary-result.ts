/**
 * What the bulk–boundary check reports (bulk-boundary.ts), one shape for a chain's ends, a
 * ribbon's edges and a slab's surfaces, and the one rule that turns the two boundaries' counts
 * into a verdict. Types and that rule only: the counting modules (chain-ends.ts, crossings.ts,
 * surface-count.ts) build parts of it, bulk-boundary.ts puts them together.
 */
import type { ModelSpec } from '../model/spec.js';
import type { CutInfo } from './common.js';
import type { EdgeMode } from './crossings.js';
import type { ProjectedNode } from './fermi-map.js';
import type { CutSpec } from './layers.js';

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

export interface EndMode {
  /** <H> of the mode (near the energy of the count). */
  energy: number;
  /** Its weight on this end's outer `edgeLayers` cells. */
  weight: number;
  /** Chiral chains: <Gamma>, +1 all on sublattice A, -1 all on B; null otherwise. */
  polarisation: number | null;
}

export interface EndCount {
  modes: EndMode[];
  /** Chiral chains: modes on sublattice A and B (polarisation above 1/2, below -1/2); null otherwise. */
  sublatticeA: number | null;
  sublatticeB: number | null;
  /** What the count is compared with: N_A - N_B (winding) or the number of modes (Majorana). */
  net: number;
  /** What the invariant requires: N_A - N_B = +W (first end) or -W (last end); Majorana: 1 for M = -1, 0 for +1. */
  expected: number | null;
  agrees: boolean | null;
  /** Modes beyond the least number the invariant requires (an even number when it agrees). */
  extra: number;
}

/** A surface Dirac point: a Kramers pair of surface states at a surface TRIM. */
export interface DiracPoint {
  /** The surface TRIM, fractions of the surface reciprocal vectors (0 or 1/2). */
  kPar: number[];
  /** The pair's mean <H>. */
  energy: number;
}

/** The modes of one surface crossing the energy along a line k'_axis = at of the surface zone. */
export interface ArcLine {
  /** The surface coordinate held fixed (0: along A_1, 1: along A_2) and its value (fractions). */
  axis: number;
  at: number;
  /** Crossings (k in fractions along the other surface axis), null when the bulk plane is not gapped at the energy. */
  modes: EdgeMode[] | null;
  right: number;
  left: number;
  /** right - left along the other axis. */
  net: number;
}

/** From one line to the next: the change of the net count against the nodes in between. */
export interface ArcStep {
  from: number;
  to: number;
  /** Total chirality of the nodes projected between the lines (null when one is not certain). */
  chirality: number | null;
  /** net(to) - net(from). */
  jump: number;
  /** What the chirality requires of the jump (the sign rule above). */
  expected: number | null;
  agrees: boolean | null;
}

export interface SurfaceCount {
  /** Z2: the Dirac points found at the surface TRIMs. */
  cones?: DiracPoint[];
  /** Weyl: the lines between the node projections, and the steps between them. */
  lines?: ArcLine[];
  steps?: ArcStep[];
  /** Z2: Dirac points; Weyl: crossings on all lines. */
  count: number;
  /** Z2: the least number of Dirac points the indices require (parity nu0); Weyl: the total |chirality| of the steps. */
  expected: number | null;
  agrees: boolean | null;
  /** Z2: Dirac points beyond the least number; Weyl: crossings beyond the net counts (trivial pairs). */
  extra: number;
}

/**
 * The verdict on the two boundaries' counts: 'undetermined' when the caller could not tell, else
 * 'disagree' when a count does not have the invariant's value, 'extra-modes' when it has it with
 * trivial modes beside, 'agree' otherwise. The same for ends, edges and surfaces.
 */
export function judge(undetermined: boolean, counts: readonly { agrees: boolean | null; extra: number }[]): BoundaryVerdict {
  if (undetermined) return 'undetermined';
  if (counts.some((c) => !c.agrees)) return 'disagree';
  if (counts.some((c) => c.extra > 0)) return 'extra-modes';
  return 'agree';
}
