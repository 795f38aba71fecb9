/**
 * Constant-energy maps of a 3D model's surface: A(k_par, E) of both terminations over a grid of
 * the 2D surface zone at one energy (Fermi arcs of a Weyl semimetal, the Dirac cone of a strong
 * topological insulator), with the bulk spectral function beside them and the bulk Weyl points
 * (topology/weyl.ts) projected onto the surface zone, each with its chirality: a Fermi arc ends at
 * the projections of nodes of opposite chirality.
 */
import type { BlochHamiltonian } from '../bloch/hamiltonian.js';
import { ModelError, valueText } from '../model/errors.js';
import { weylPoints } from '../topology/weyl.js';
import { bulkRange, checkEnergyWindow, cutInfo, decimationLimits, positiveNumber, projectToSurface, wholeNumber, type CutInfo, type DecimationOptions } from './common.js';
import { principalLayers, type CutSpec } from './layers.js';
import { BULK_DEFINITION, decimationGrid, decimationSeconds, type SurfaceChecks } from './spectrum.js';

export interface SurfaceMapOptions extends DecimationOptions {
  /** The surface: a periodic direction to cut open, or Miller indices of the lattice planes. */
  cut: CutSpec;
  /** The energy of the map (default 0). */
  energy?: number;
  /** k-points per surface direction: one number or [n1, n2] (default 64). */
  grid?: number | [number, number];
  /** Locate the bulk Weyl points and project them onto the surface zone (default true). */
  nodes?: boolean;
}

/** A bulk Weyl point and where it lands in the surface zone. */
export interface ProjectedNode {
  /** Bulk momentum, fractions of the bulk reciprocal vectors. */
  k: number[];
  /** Its projection, fractions of the surface reciprocal vectors, in [-1/2, 1/2). */
  kPar: number[];
  /** +1 / -1, or null when the bulk diagnostic could not make it certain. */
  chirality: number | null;
}

export interface SurfaceMapResult {
  kind: 'surface-map';
  cut: CutInfo;
  energy: number;
  eta: number;
  /** [n1, n2]; point (j1, j2) is k_par = (-pi + 2 pi j1 / n1, -pi + 2 pi j2 / n2), stored at j2 * n1 + j1. */
  grid: [number, number];
  bottom: Float64Array;
  top: Float64Array;
  bulk: Float64Array;
  bulkDefinition: string;
  /** Projected bulk Weyl points (empty when none, or when `nodes` is false). */
  nodes: ProjectedNode[];
  checks: SurfaceChecks;
}

function resolveGrid(grid: unknown): [number, number] {
  if (grid === undefined) return [64, 64];
  if (typeof grid === 'number') {
    const n = wholeNumber(grid, 'grid', 2, 4096);
    return [n, n];
  }
  if (!Array.isArray(grid) || grid.length !== 2) throw new ModelError('grid', `expected a whole number or [n1, n2]. Value: ${valueText(grid)}`);
  return [wholeNumber(grid[0], 'grid[0]', 2, 4096), wholeNumber(grid[1], 'grid[1]', 2, 4096)];
}

/** The constant-energy surface map of a 3D model. */
export function surfaceMap(h: BlochHamiltonian, options: SurfaceMapOptions): SurfaceMapResult {
  if (options === null || typeof options !== 'object') throw new ModelError('options', `expected {cut, energy, ...}. Value: ${valueText(options)}`);
  if (h.dim !== 3) throw new ModelError('cut', `constant-energy surface maps are for 3D models (a 2D model's edge zone is a line: use the surface spectrum). This model has ${h.dim} periodic directions. Value: ${valueText(options.cut)}`);
  const layers = principalLayers(h, options.cut);
  const limits = decimationLimits(options);
  const [n1, n2] = resolveGrid(options.grid);
  const range = bulkRange(h);
  const energy = options.energy ?? 0;
  if (typeof energy !== 'number' || !Number.isFinite(energy)) throw new ModelError('energy', `expected a finite number. Value: ${valueText(energy)}`);
  checkEnergyWindow(energy, energy, range, 'energy', energy);
  const eta = options.eta === undefined ? 0.01 * Math.max(range.max - range.min, 1e-6) : positiveNumber(options.eta, 'eta', 'the broadening eta');
  if (options.nodes !== undefined && typeof options.nodes !== 'boolean') throw new ModelError('nodes', `expected true or false. Value: ${valueText(options.nodes)}`);

  const kPar = new Float64Array(2 * n1 * n2);
  for (let j2 = 0; j2 < n2; j2++) {
    for (let j1 = 0; j1 < n1; j1++) {
      kPar[2 * (j2 * n1 + j1)] = -Math.PI + (2 * Math.PI * j1) / n1;
      kPar[2 * (j2 * n1 + j1) + 1] = -Math.PI + (2 * Math.PI * j2) / n2;
    }
  }
  const out = { bottom: new Float64Array(n1 * n2), top: new Float64Array(n1 * n2), bulk: new Float64Array(n1 * n2) };
  const run = decimationGrid(layers, kPar, n1 * n2, Float64Array.of(energy), eta, limits, out);
  const warnings = [...run.warnings];
  const nodes: ProjectedNode[] = [];
  if (options.nodes !== false) {
    const weyl = weylPoints(h, {});
    warnings.push(...weyl.checks.warnings.map((w) => `Weyl points: ${w}`));
    for (const p of weyl.points) {
      const kp = projectToSurface(layers, p.k);
      nodes.push({ k: p.fractions, kPar: kp.map((x) => x / (2 * Math.PI)), chirality: p.chirality });
    }
  }
  return {
    kind: 'surface-map',
    cut: cutInfo(layers),
    energy,
    eta,
    grid: [n1, n2],
    ...out,
    bulkDefinition: BULK_DEFINITION,
    nodes,
    checks: { warnings, steps: run.steps, unconverged: run.unconverged, bulkRange: [range.min, range.max] },
  };
}

/** Memory and time of a surface map before it runs (n: the model's orbitals; one plane per principal layer assumed). */
export function surfaceMapCost(n: number, options: Partial<SurfaceMapOptions>): { bytes: number; seconds: number } {
  const g = options.grid;
  const [n1, n2] = typeof g === 'number' && g >= 1 ? [g, g] : Array.isArray(g) && g.every((x) => typeof x === 'number' && x >= 1) ? g : [64, 64];
  const points = n1 * n2;
  // The Weyl locator's grid (24^3 eigenvalue solves and their refinement) when nodes are asked for.
  const nodes = options.nodes === false ? 0 : 24 ** 3 * (4e-6 + 1.5e-7 * n * n);
  return { bytes: 5 * 8 * points + 40 * 16 * n * n, seconds: points * decimationSeconds(n) + nodes };
}
