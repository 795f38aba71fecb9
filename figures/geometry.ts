/**
 * Brillouin-zone geometry for drawing. Plots use reduced momentum in units of the reciprocal
 * lattice, kappa_i = k.a_i / 2pi, so the torus the engine samples is [-1/2, 1/2)^2. On a
 * non-square lattice the first Brillouin zone (the Wigner–Seitz cell of the reciprocal lattice) is
 * another shape in those units; boundaryReduced() gives its corners to draw over the map.
 */

export type Vec2 = [number, number];

/** Reciprocal vectors b_i of the 2D lattice a_1, a_2 (first two components), a_i.b_j = 2pi delta_ij. */
export function reciprocal2d(a1: readonly number[], a2: readonly number[]): [Vec2, Vec2] {
  const det = a1[0] * a2[1] - a1[1] * a2[0];
  if (!Number.isFinite(det) || Math.abs(det) < 1e-12) {
    throw new RangeError(`lattice vectors are parallel: a1 = [${a1}], a2 = [${a2}]`);
  }
  const s = (2 * Math.PI) / det;
  return [
    [s * a2[1], -s * a2[0]],
    [-s * a1[1], s * a1[0]],
  ];
}

type Polygon = Vec2[];

/** Keep the part of a convex polygon where p.g <= c (Sutherland–Hodgman, one edge). */
function clip(polygon: Polygon, g: Vec2, c: number): Polygon {
  const out: Polygon = [];
  const side = (p: Vec2) => p[0] * g[0] + p[1] * g[1] - c;
  for (let i = 0; i < polygon.length; i++) {
    const p = polygon[i];
    const q = polygon[(i + 1) % polygon.length];
    const sp = side(p);
    const sq = side(q);
    if (sp <= 0) out.push(p);
    if ((sp < 0 && sq > 0) || (sp > 0 && sq < 0)) {
      const t = sp / (sp - sq);
      out.push([p[0] + t * (q[0] - p[0]), p[1] + t * (q[1] - p[1])]);
    }
  }
  return out;
}

/** Corners of the first Brillouin zone in Cartesian momentum, counter-clockwise. */
export function wignerSeitz(b1: Vec2, b2: Vec2): Polygon {
  const reach = 4 * (Math.hypot(...b1) + Math.hypot(...b2));
  let polygon: Polygon = [
    [-reach, -reach],
    [reach, -reach],
    [reach, reach],
    [-reach, reach],
  ];
  for (let m = -3; m <= 3; m++) {
    for (let n = -3; n <= 3; n++) {
      if (m === 0 && n === 0) continue;
      const g: Vec2 = [m * b1[0] + n * b2[0], m * b1[1] + n * b2[1]];
      polygon = clip(polygon, g, (g[0] * g[0] + g[1] * g[1]) / 2);
    }
  }
  return dedupe(polygon);
}

function dedupe(polygon: Polygon): Polygon {
  const scale = Math.max(...polygon.map((p) => Math.hypot(p[0], p[1])));
  const out: Polygon = [];
  for (const p of polygon) {
    const last = out[out.length - 1];
    if (last === undefined || Math.hypot(p[0] - last[0], p[1] - last[1]) > 1e-9 * scale) out.push(p);
  }
  const first = out[0];
  const last = out[out.length - 1];
  if (out.length > 1 && Math.hypot(first[0] - last[0], first[1] - last[1]) <= 1e-9 * scale) out.pop();
  return out;
}

/**
 * The first Brillouin zone's corners in reduced units (kappa_i = k.a_i / 2pi), or null when it is
 * the reduced square itself (rectangular lattices), where drawing it would only repeat the frame.
 */
export function boundaryReduced(vectors: readonly (readonly number[])[]): Vec2[] | null {
  if (vectors.length < 2) return null;
  const [a1, a2] = vectors;
  const [b1, b2] = reciprocal2d(a1, a2);
  const corners = wignerSeitz(b1, b2).map(
    (k): Vec2 => [(k[0] * a1[0] + k[1] * a1[1]) / (2 * Math.PI), (k[0] * a2[0] + k[1] * a2[1]) / (2 * Math.PI)],
  );
  const isReducedSquare =
    corners.length === 4 && corners.every((p) => Math.abs(Math.abs(p[0]) - 0.5) < 1e-9 && Math.abs(Math.abs(p[1]) - 0.5) < 1e-9);
  return isReducedSquare ? null : corners;
}
