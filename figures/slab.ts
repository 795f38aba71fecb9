/**
 * Slab spectrum (a 3D model finite along the cut's stacking direction; a 2D model's ribbon alike):
 * energies against the momentum along the surface path, each state coloured by where it lives, as
 * the ribbon figure colours its states: red on the bottom layers, blue on the top layers, grey in
 * the bulk. The surface layers are the outer tenth of the slab on each side (at least one plane).
 */
import type { ViewResult } from '../contract/protocol.js';
import type { Data } from './plotly-json.js';
import { BASE_LAYOUT, boundaryWeightedStates, energyUnit, numberArray, ResultShapeError, titled, unitText, withUnit, type Figure, type FigureContext, type Table } from './common.js';
import { cutText, warningText } from './spectral.js';

interface PathShape {
  dim: number;
  count: number;
  fractions: ArrayLike<number>;
  distance: ArrayLike<number>;
  labels: { label: string; distance: number }[];
}

interface SlabData {
  name: string;
  path: PathShape;
  width: number;
  bandCount: number;
  energies: ArrayLike<number>;
  /** Weight of each state on the bottom and on the top surface layers. */
  bottom: Float64Array;
  top: Float64Array;
  surfaceLayers: number;
}

/** Planes counted as each surface of a slab `width` planes wide. */
export function surfaceLayers(width: number): number {
  return Math.max(1, Math.round(width / 10));
}

function read(result: ViewResult): SlabData {
  const path = result.path as Partial<PathShape> | undefined;
  const { bandCount, width } = result;
  if (!path || typeof path.count !== 'number' || path.distance === undefined || !Array.isArray(path.labels)) throw new ResultShapeError(result.kind, 'path', path);
  if (typeof bandCount !== 'number' || !Number.isInteger(bandCount)) throw new ResultShapeError(result.kind, 'bandCount', bandCount);
  if (typeof width !== 'number' || !Number.isInteger(width) || width < 1) throw new ResultShapeError(result.kind, 'width', width);
  const energies = numberArray(result, 'energies');
  const weights = numberArray(result, 'layerWeights');
  const states = path.count * bandCount;
  if (energies.length !== states) throw new ResultShapeError(result.kind, 'energies', energies);
  if (weights.length !== states * width) throw new ResultShapeError(result.kind, 'layerWeights', weights);
  const e = surfaceLayers(width);
  const bottom = new Float64Array(states);
  const top = new Float64Array(states);
  for (let s = 0; s < states; s++) {
    for (let l = 0; l < e; l++) {
      bottom[s] += weights[s * width + l];
      top[s] += weights[s * width + width - 1 - l];
    }
  }
  const name = typeof result.name === 'string' ? result.name : 'slab';
  return { name, path: path as PathShape, width, bandCount, energies, bottom, top, surfaceLayers: e };
}

export function slabFigure(result: ViewResult, ctx: FigureContext): Figure {
  const r = read(result);
  const unit = energyUnit(ctx.spec);
  const layers = `${r.surfaceLayers} plane${r.surfaceLayers > 1 ? 's' : ''}`;
  const data: Data[] = [
    boundaryWeightedStates(r.path.distance, r.bandCount, r.energies, [r.bottom, r.top], { title: `weight on the outer ${layers}<br>bottom − top`, ends: ['bottom', 'top'] },
      `E = %{y:.4f}${unitText(unit)}<br>bottom %{customdata[0]:.2f}, top %{customdata[1]:.2f}<extra></extra>`),
  ];
  const summary = `${r.name} · ${cutText(result)} · ${r.width} planes, ${r.bandCount} states per k · surfaces: outer ${layers}${warningText(result)}`;
  return {
    data,
    layout: {
      ...BASE_LAYOUT,
      title: titled(`Slab spectrum — ${r.name}`),
      xaxis: {
        title: { text: r.path.dim === 1 ? 'k along the edge' : 'k along the surface path' },
        zeroline: false,
        tickmode: 'array',
        tickvals: r.path.labels.map((l) => l.distance),
        ticktext: r.path.labels.map((l) => l.label),
      },
      yaxis: { title: { text: withUnit('E', unit) }, zeroline: false },
    },
    summary,
    invariant: null,
    gapless: false,
  };
}

export function slabTable(result: ViewResult): Table {
  const r = read(result);
  const rows: number[][] = [];
  for (let p = 0; p < r.path.count; p++) {
    for (let n = 0; n < r.bandCount; n++) {
      const i = p * r.bandCount + n;
      rows.push([p, r.path.distance[p], n, r.energies[i], r.bottom[i], r.top[i]]);
    }
  }
  return { columns: ['path point', 'distance along the path', 'state', 'energy', 'bottom-surface weight', 'top-surface weight'], rows };
}
