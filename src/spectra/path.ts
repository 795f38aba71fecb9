/**
 * k-paths through labelled points, sampled with the cumulative Cartesian |k| as the horizontal axis.
 *
 * Points are in units of the reciprocal lattice vectors (fractions f; reduced k = 2 pi f). The
 * distance axis is the length of the path in Cartesian momentum, |sum_i df_i b_i|, in inverse units
 * of the model's `vectors`, so segments of different true length get their true share of the axis.
 */
import { checkInterrupt } from '../interrupt.js';
import { ModelError, valueText } from '../model/errors.js';
import type { ModelSpec } from '../model/spec.js';
import { highSymmetryPoints, reciprocalVectors } from './lattice.js';

/** A labelled point, `k` in units of the reciprocal lattice vectors. */
export interface PathPoint {
  label: string;
  k: number[];
}

/**
 * A path: labels of the lattice's high-symmetry points ('Γ X M Γ'; 'G' stands for Γ; '|' jumps),
 * or an array of labelled points and '|' jumps. Omitted: the lattice's customary path.
 */
export type PathSpec = string | (string | PathPoint)[];

export interface PathOptions {
  path?: PathSpec;
  /** Intervals sampled along each segment (default 60). */
  pointsPerSegment?: number;
}

export interface KPath {
  kind: 'k-path';
  /** `fractions` are in units of the reciprocal lattice vectors; multiply by 2 pi for reduced k. */
  units: 'reciprocal-lattice';
  /** Number of periodic directions. */
  dim: number;
  /** Number of sampled points. */
  count: number;
  /** Sampled points, `dim` numbers each. */
  fractions: Float64Array;
  /** Cumulative Cartesian |k| at each point (inverse units of the model's vectors). */
  distance: Float64Array;
  /** Labelled points: index into the samples and position on the distance axis ('X|M' at a jump). */
  labels: { label: string; index: number; distance: number }[];
  /** Indices where a new, unconnected piece starts after a jump (do not draw a line into them). */
  breaks: number[];
}

type Resolved = PathPoint | '|';

function resolvePath(model: Pick<ModelSpec, 'vectors' | 'periodic'>, spec: PathSpec | undefined): Resolved[] {
  const dim = model.periodic;
  let named: Record<string, number[]> | undefined;
  const lookup = (label: string, field: string): PathPoint => {
    named ??= highSymmetryPoints(model).points;
    const key = label === 'G' || label === 'Gamma' ? 'Γ' : label;
    const k = named[key];
    if (k === undefined) throw new ModelError(field, `unknown point ${valueText(label)} for this lattice; known: ${Object.keys(named).join(', ')} (or give {label, k})`);
    return { label: key, k };
  };
  const items: (string | PathPoint)[] = spec === undefined
    ? highSymmetryPoints(model).path
    : typeof spec === 'string'
      ? spec.replace(/\|/g, ' | ').split(/[\s,\-–]+/).filter((s) => s.length > 0)
      : spec;
  if (!Array.isArray(items)) throw new ModelError('path', `expected a string of point labels or an array of points. Value: ${valueText(spec)}`);
  return items.map((item, i) => {
    const field = `path[${i}]`;
    if (item === '|') return '|';
    if (typeof item === 'string') return lookup(item, field);
    if (item === null || typeof item !== 'object' || typeof item.label !== 'string') throw new ModelError(field, `expected a label or {label, k}. Value: ${valueText(item)}`);
    if (!Array.isArray(item.k) || item.k.length !== dim || !item.k.every((x) => typeof x === 'number' && Number.isFinite(x))) {
      throw new ModelError(`${field}.k`, `expected ${dim} finite numbers (units of the reciprocal lattice vectors). Value: ${valueText(item.k)}`);
    }
    return { label: item.label, k: [...item.k] };
  });
}

/** Sample a path through labelled points of the model's Brillouin zone (a single point for a finite model). */
export function kPath(model: Pick<ModelSpec, 'vectors' | 'periodic'>, options: PathOptions = {}): KPath {
  const dim = model.periodic;
  // A finite system (flake, open chain) has one "k": the empty one.
  if (dim === 0) return { kind: 'k-path', units: 'reciprocal-lattice', dim, count: 1, fractions: new Float64Array(0), distance: new Float64Array(1), labels: [], breaks: [] };
  const per = options.pointsPerSegment ?? 60;
  if (!Number.isInteger(per) || per < 1 || per > 100000) throw new ModelError('pointsPerSegment', `expected a whole number from 1 to 100000. Value: ${valueText(per)}`);
  const items = resolvePath(model, options.path);
  // Pieces: runs of points between jumps; each needs at least two points.
  const pieces: PathPoint[][] = [[]];
  for (const item of items) {
    if (item === '|') pieces.push([]);
    else pieces[pieces.length - 1].push(item);
  }
  pieces.forEach((piece, i) => {
    if (piece.length < 2) throw new ModelError('path', `each piece between jumps needs at least two points; piece ${i} has ${piece.length}. Value: ${valueText(options.path)}`);
  });
  const b = reciprocalVectors(model.vectors, dim);
  const count = pieces.reduce((n, piece) => n + (piece.length - 1) * per + 1, 0);
  const fractions = new Float64Array(count * dim);
  const distance = new Float64Array(count);
  const labels: KPath['labels'] = [];
  const breaks: number[] = [];
  const step = new Array<number>(b[0]?.length ?? 0);
  let index = 0;
  let travelled = 0;
  pieces.forEach((piece, p) => {
    checkInterrupt();
    if (p > 0) {
      // The jump: the previous piece's last label and this piece's first share one tick.
      breaks.push(index);
      labels[labels.length - 1].label += `|${piece[0].label}`;
    } else {
      labels.push({ label: piece[0].label, index, distance: travelled });
    }
    for (let s = 0; s + 1 < piece.length; s++) {
      const from = piece[s].k, to = piece[s + 1].k;
      step.fill(0);
      for (let i = 0; i < dim; i++) for (let c = 0; c < step.length; c++) step[c] += (to[i] - from[i]) * b[i][c];
      const length = Math.hypot(...step);
      for (let j = s === 0 ? 0 : 1; j <= per; j++) {
        const t = j / per;
        for (let i = 0; i < dim; i++) fractions[index * dim + i] = from[i] + t * (to[i] - from[i]);
        distance[index] = travelled + t * length;
        index++;
      }
      travelled += length;
      labels.push({ label: piece[s + 1].label, index: index - 1, distance: travelled });
    }
  });
  return { kind: 'k-path', units: 'reciprocal-lattice', dim, count, fractions, distance, labels, breaks };
}
