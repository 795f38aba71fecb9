// Phase boundaries located by the sweep's bisection, against published phase diagrams.
import { describe, expect, it } from 'vitest';
import { haldane, kitaevChain, qwz } from '../../src/model/catalogue.js';
import { pointFunction } from '../../src/scan/point.js';
import { phaseMapSync } from '../../src/scan/run.js';

describe('QWZ phase boundaries (Qi, Wu, Zhang, PRB 74, 085308 (2006))', () => {
  it('finds the gap closings at u = -2, 0, 2 to 1e-3 from a coarse grid that misses them', () => {
    // Grid step 0.41 from -3.1: neither a grid point nor a bisection midpoint lands exactly on -2,
    // 0 or 2 (one that did would be gapless, giving a bracket on each side of it). The k-grid (24,
    // even) contains (0,0), (pi,0), (0,pi), (pi,pi), where the QWZ gap closes.
    const map = phaseMapSync(
      { kind: 'phase-map', model: qwz(), quantity: 'chern', grid: 24, axes: [{ param: 'u', from: -3.1, to: 3.05, count: 16 }], refine: { tolerance: 1e-3 } },
      pointFunction,
    );
    // C(lower) = 0, +1, -1, 0 on u < -2, -2 < u < 0, 0 < u < 2, u > 2 (shared/references.md convention).
    expect(map.values).toEqual([0, 0, 0, 1, 1, 1, 1, 1, -1, -1, -1, -1, -1, 0, 0, 0]);
    expect(map.boundaries.map((b) => b.values)).toEqual([[0, 1], [1, -1], [-1, 0]]);
    [-2, 0, 2].forEach((uc, n) => {
      const b = map.boundaries[n];
      expect(b.upper - b.lower).toBeLessThanOrEqual(1e-3);
      expect(b.lower).toBeLessThanOrEqual(uc);
      expect(b.upper).toBeGreaterThanOrEqual(uc);
      expect(Math.abs(b.at.u - uc)).toBeLessThanOrEqual(1e-3);
    });
    expect(map.checks.gapless).toBe(false);
  });
});

describe('Haldane phase diagram (Haldane, PRL 61, 2015 (1988), Fig. 2)', () => {
  const t2 = 0.1;
  const critical = (phi: number) => 3 * Math.sqrt(3) * t2 * Math.abs(Math.sin(phi));

  it('locates the boundary M = ±3√3 t2 sin(phi) to 1e-3 along M at fixed phi', () => {
    for (const phi of [Math.PI / 2, 1.0, -2.2]) {
      const map = phaseMapSync(
        { kind: 'phase-map', model: haldane(), quantity: 'chern', grid: 24, params: { t2, phi, t1: 1 }, axes: [{ param: 'M', from: -1, to: 1, count: 9 }], refine: { tolerance: 1e-3 } },
        pointFunction,
      );
      const mc = critical(phi);
      expect(map.boundaries).toHaveLength(2);
      const [low, high] = map.boundaries;
      expect(Math.abs(low.at.M + mc)).toBeLessThanOrEqual(1e-3);
      expect(Math.abs(high.at.M - mc)).toBeLessThanOrEqual(1e-3);
      // Inside, C(lower) = -sign(sin phi) (shared/references.md convention); 0 outside.
      const inside = -Math.sign(Math.sin(phi));
      expect(low.values).toEqual([0, inside]);
      expect(high.values).toEqual([inside, 0]);
    }
  });

  it('maps the (phi, M) plane: every refined bracket straddles the published boundary', () => {
    const map = phaseMapSync(
      {
        kind: 'phase-map', model: haldane(), quantity: 'chern', grid: 24, params: { t2 },
        axes: [{ param: 'phi', from: -3, to: 3, count: 12 }, { param: 'M', from: -0.7, to: 0.7, count: 11 }],
        refine: { tolerance: 1e-3 },
      },
      pointFunction,
    );
    expect(map.values).toHaveLength(132);
    // Grid values: -sign(sin phi) inside the lobes, 0 outside.
    map.axes[1].values.forEach((M, j) =>
      map.axes[0].values.forEach((phi, i) => {
        const expected = Math.abs(M) < critical(phi) ? -Math.sign(Math.sin(phi)) : 0;
        expect(map.values[j * 12 + i], `phi=${phi}, M=${M}`).toBe(expected);
      }),
    );
    expect(map.boundaries.length).toBeGreaterThan(20);
    expect(map.boundaries.some((b) => b.along === 'phi')).toBe(true);
    expect(map.boundaries.some((b) => b.along === 'M')).toBe(true);
    for (const b of map.boundaries) {
      expect(b.upper - b.lower).toBeLessThanOrEqual(1e-3);
      // f = |M| - 3√3 t2 |sin phi| changes sign (or vanishes) between the bracket's ends.
      const end = (x: number) => ({ ...b.at, [b.along]: x });
      const f = (p: Record<string, number>) => Math.abs(p.M) - critical(p.phi);
      expect(f(end(b.lower)) * f(end(b.upper)), JSON.stringify(b)).toBeLessThanOrEqual(0);
    }
  });
});

describe('Kitaev chain (Kitaev, Physics-Uspekhi 44, 131 (2001))', () => {
  it('the Majorana number changes at |mu| = 2|t|, located to 1e-3 in a 2D (mu, t) map', () => {
    const map = phaseMapSync(
      {
        kind: 'phase-map', model: kitaevChain(), quantity: 'majorana', params: { Delta: 1 },
        axes: [{ param: 'mu', from: -3.25, to: 3.15, count: 9 }, { param: 't', from: 0.55, to: 1.45, count: 4 }],
        refine: { tolerance: 1e-3 },
      },
      pointFunction,
    );
    // Topological (Majorana number -1) for |mu| < 2|t|, trivial (+1) outside (no grid point on |mu| = 2t).
    map.axes[1].values.forEach((t, j) =>
      map.axes[0].values.forEach((mu, i) => expect(map.values[j * 9 + i], `mu=${mu}, t=${t}`).toBe(Math.abs(mu) < 2 * t ? -1 : 1)),
    );
    expect(map.boundaries.length).toBeGreaterThanOrEqual(8);
    for (const b of map.boundaries) {
      expect(b.upper - b.lower).toBeLessThanOrEqual(1e-3);
      const f = (x: number) => {
        const p = { ...b.at, [b.along]: x };
        return Math.abs(p.mu) - 2 * Math.abs(p.t);
      };
      // A gapless end (null) sits on the boundary itself, up to rounding; otherwise f changes sign.
      if (b.values.includes(null)) expect(Math.min(Math.abs(f(b.lower)), Math.abs(f(b.upper))), JSON.stringify(b)).toBeLessThan(1e-9);
      else expect(f(b.lower) * f(b.upper), JSON.stringify(b)).toBeLessThanOrEqual(0);
    }
  });
});
