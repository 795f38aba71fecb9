// Brillouin-zone drawing geometry.
import { describe, expect, it } from 'vitest';
import { boundaryReduced, reciprocal2d, wignerSeitz } from '../../figures/geometry.js';

const dot = (a: number[], b: number[]) => a[0] * b[0] + a[1] * b[1];

function polygonArea(points: [number, number][]): number {
  let twice = 0;
  for (let i = 0; i < points.length; i++) {
    const [x1, y1] = points[i];
    const [x2, y2] = points[(i + 1) % points.length];
    twice += x1 * y2 - x2 * y1;
  }
  return twice / 2;
}

describe('Brillouin-zone geometry', () => {
  it('reciprocal vectors satisfy a_i . b_j = 2 pi delta_ij (definition; Ashcroft & Mermin ch. 5)', () => {
    const a1 = [1.3, 0.2];
    const a2 = [-0.4, 0.9];
    const [b1, b2] = reciprocal2d(a1, a2);
    expect(dot(a1, b1)).toBeCloseTo(2 * Math.PI, 12);
    expect(dot(a2, b2)).toBeCloseTo(2 * Math.PI, 12);
    expect(dot(a1, b2)).toBeCloseTo(0, 12);
    expect(dot(a2, b1)).toBeCloseTo(0, 12);
  });

  it('names parallel lattice vectors', () => {
    expect(() => reciprocal2d([1, 0], [2, 0])).toThrow(/parallel: a1 = \[1,0\], a2 = \[2,0\]/);
  });

  it('the triangular lattice zone is a regular hexagon with corners at |K| = 4 pi / 3a, a the lattice constant (Castro Neto et al., RMP 81, 109 (2009): K = (2 pi / 3 a_cc)(1, 1/sqrt3), a = sqrt3 a_cc)', () => {
    const a = 1;
    const [b1, b2] = reciprocal2d([a, 0], [a / 2, (a * Math.sqrt(3)) / 2]);
    const corners = wignerSeitz(b1, b2);
    expect(corners).toHaveLength(6);
    for (const c of corners) expect(Math.hypot(c[0], c[1])).toBeCloseTo((4 * Math.PI) / (3 * a), 10);
    // The zone has the area of the reciprocal cell |b1 x b2| (common practice).
    expect(polygonArea(corners)).toBeCloseTo(Math.abs(b1[0] * b2[1] - b1[1] * b2[0]), 9);
  });

  it('an oblique lattice gives a hexagon of the reciprocal-cell area', () => {
    const [b1, b2] = reciprocal2d([1, 0], [0.3, 1.1]);
    const corners = wignerSeitz(b1, b2);
    expect(corners).toHaveLength(6);
    expect(polygonArea(corners)).toBeCloseTo(Math.abs(b1[0] * b2[1] - b1[1] * b2[0]), 9);
  });

  it('in reduced units the hexagonal zone keeps area 1 and K sits at a third of b1 + b2 combinations', () => {
    const corners = boundaryReduced([
      [1, 0],
      [0.5, Math.sqrt(3) / 2],
    ]);
    expect(corners).not.toBeNull();
    expect(Math.abs(polygonArea(corners!))).toBeCloseTo(1, 10);
    // Each corner is a K or K' point: reduced coordinates are multiples of 1/3.
    for (const [x, y] of corners!) {
      expect(Math.abs(3 * x - Math.round(3 * x))).toBeLessThan(1e-9);
      expect(Math.abs(3 * y - Math.round(3 * y))).toBeLessThan(1e-9);
    }
  });

  it('square and rectangular lattices need no extra boundary', () => {
    expect(boundaryReduced([[1, 0], [0, 1]])).toBeNull();
    expect(boundaryReduced([[2, 0], [0, 0.5]])).toBeNull();
  });
});
