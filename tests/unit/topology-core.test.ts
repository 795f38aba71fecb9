/**
 * Core topology machinery on small models built here: link algebra against numpy, FHS Chern numbers
 * with gap refusal and coarse-grid flags, curvature maps, Wannier-centre flow, Berry phases in both
 * Bloch conventions, and the diagnostics dispatcher.
 */
import { execFileSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { blochHamiltonian, compute, lattice, ModelError, type ModelSpec } from '../../src/index.js';
import { berryPhase } from '../../src/topology/berry.js';
import { chernNumber } from '../../src/topology/chern.js';
import { embedding } from '../../src/topology/common.js';
import { curvatureMap } from '../../src/topology/curvature.js';
import { determinantInPlace, UnitaryPhases } from '../../src/topology/links.js';
import { wannierFlow } from '../../src/topology/wilson.js';

// Qi–Wu–Zhang, H = sin kx sx + sin ky sy + (u + cos kx + cos ky) sz (Qi, Wu, Zhang, PRB 74, 085308 (2006)).
function qwz(): ModelSpec {
  return lattice('QWZ', [[1, 0], [0, 1]])
    .parameter('u', { default: -1, range: [-4, 4] })
    .site('a', [0, 0]).site('b', [0, 0])
    .onsite('a', 'u').onsite('b', '-u')
    .hop('a', 'a', [1, 0], 0.5).hop('b', 'b', [1, 0], -0.5)
    .hop('a', 'a', [0, 1], 0.5).hop('b', 'b', [0, 1], -0.5)
    .hop('b', 'a', [1, 0], { re: 0, im: -0.5 }).hop('a', 'b', [1, 0], { re: 0, im: -0.5 })
    .hop('b', 'a', [0, 1], -0.5).hop('a', 'b', [0, 1], 0.5)
    .build();
}

// The same model with its two orbitals placed apart in the cell, so the two Bloch conventions differ.
function qwzDisplaced(): ModelSpec {
  const m = qwz();
  return { ...m, orbitals: [{ label: 'a', position: [0, 0] }, { label: 'b', position: [0.3, 0.2] }] };
}

// SSH chain, A at 0 and B at 1/2 (Su, Schrieffer, Heeger, PRL 42, 1698 (1979)).
function ssh(): ModelSpec {
  return lattice('SSH', [[1]])
    .parameter('v', { default: 1, range: [-2, 2] }).parameter('w', { default: 0.5, range: [-2, 2] })
    .site('A', [0]).site('B', [0.5])
    .hop('A', 'B', [0], 'v').hop('B', 'A', [1], 'w')
    .build();
}

function numpy(script: string): unknown {
  const out = execFileSync('/usr/bin/python3', ['-c', script], { encoding: 'utf8', env: { ...process.env, OPENBLAS_NUM_THREADS: '1' } });
  return JSON.parse(out);
}

describe('small complex algebra of links (numpy as reference)', () => {
  it('determinant and unitary eigenphases of random matrices match numpy.linalg', () => {
    // Fixed pseudo-random matrices, generated the same way on both sides.
    const ref = numpy(`
import numpy as np, json
rng = np.random.default_rng(7)
out = []
for m in (1, 2, 3, 5):
    a = rng.normal(size=(m, m)) + 1j * rng.normal(size=(m, m))
    q, _ = np.linalg.qr(a)
    out.append({"a": [[float(x.real), float(x.imag)] for x in a.flatten()], "q": [[float(x.real), float(x.imag)] for x in q.flatten()],
                "det": [float(np.linalg.det(a).real), float(np.linalg.det(a).imag)], "phases": sorted(np.angle(np.linalg.eigvals(q)).tolist())})
print(json.dumps(out))`) as { a: number[][]; q: number[][]; det: number[]; phases: number[] }[];
    for (const c of ref) {
      const m = Math.round(Math.sqrt(c.a.length));
      const a = Float64Array.from(c.a.flat());
      const det = determinantInPlace(m, a, new Float64Array(2));
      expect(det[0]).toBeCloseTo(c.det[0], 10);
      expect(det[1]).toBeCloseTo(c.det[1], 10);
      const phases = new Float64Array(m);
      const unit = new UnitaryPhases(m).solve(Float64Array.from(c.q.flat()), phases);
      expect(unit).toBeGreaterThan(1 - 1e-10);
      const sorted = Array.from(phases).sort((x, y) => x - y);
      sorted.forEach((p, i) => expect(p).toBeCloseTo(c.phases[i], 9));
    }
  });
});

describe('Fukui–Hatsugai–Suzuki Chern number', () => {
  // Signs: references.md convention (A = i<u|grad u>); QWZ lower band C = 0, +1, +1, -1, -1, 0
  // at u = -3, -1.5, -0.5, 0.5, 1.5, 3 (Qi, Wu, Zhang 2006; Asbóth et al. 2016, ch. 6).
  it.each([[-3, 0], [-1.5, 1], [-0.5, 1], [0.5, -1], [1.5, -1], [3, 0]])('QWZ u = %f gives C = %i, certain on the automatic grid', (u, c) => {
    const r = chernNumber(qwz(), { params: { u } });
    expect(r.chern).toBe(c);
    expect(r.checks.converged).toBe(true);
    expect(r.checks.gapless).toBeUndefined();
    expect(Math.abs(r.total - c)).toBeLessThan(1e-9);
    // The upper band carries the opposite number (total Chern number of all bands is zero).
    expect(chernNumber(qwz(), { params: { u }, bands: [1] }).chern).toBe(0 - c);
  });

  it('refuses a gapless group with a warning naming k and the gap (QWZ u = 0 closes at X = (pi, 0) and (0, pi), on every even grid)', () => {
    for (const grid of ['auto', 24] as const) {
      const r = chernNumber(qwz(), { params: { u: 0 }, grid });
      expect(r.chern).toBeNull();
      expect(r.checks.gapless).toBe(true);
      expect(r.checks.minGap).toBeLessThan(1e-12);
      expect(r.checks.warnings.join(' ')).toMatch(/gapless: band 0 touches the other bands at k = \((-0\.5, 0|0, -0\.5)\).*gap \d\.\d\de-\d+/);
    }
    // u = 2 closes at (pi, pi), where sin kx = sin ky = 0 and u + cos kx + cos ky = 0.
    const r2 = chernNumber(qwz(), { params: { u: 2 }, grid: 16 });
    expect(r2.chern).toBeNull();
    expect(r2.checks.minGapAt).toEqual([-0.5, -0.5]);
  });

  it('flags a grid too coarse near a transition and the automatic grid refines it', () => {
    // u = -1.98: gap 2 * 0.02 at (pi, pi) (common practice: d = 0 there at u = -2).
    const coarse = chernNumber(qwz(), { params: { u: -1.98 }, grid: 7 });
    expect(coarse.checks.coarse).toBe(true);
    expect(coarse.checks.warnings.join(' ')).toMatch(/too coarse/);
    const auto = chernNumber(qwz(), { params: { u: -1.98 } });
    expect(auto.chern).toBe(1);
    expect(auto.checks.converged).toBe(true);
    // A cap too low to resolve it yields null with the reason, never an unchecked integer.
    const capped = chernNumber(qwz(), { params: { u: -1.98 }, maxGrid: 16 });
    expect(capped.chern).toBeNull();
    expect(capped.checks.warnings.join(' ')).toMatch(/more than 16 lines per direction/);
  });

  it('does not depend on the Bloch convention (orbital positions only change the gauge)', () => {
    for (const u of [-1.2, 0.7]) {
      const lat = chernNumber(qwzDisplaced(), { params: { u }, convention: 'lattice' });
      const orb = chernNumber(qwzDisplaced(), { params: { u }, convention: 'orbital' });
      expect(orb.chern).toBe(lat.chern);
      expect(Math.abs(orb.total - lat.total)).toBeLessThan(1e-9);
    }
  });

  it('names bad options', () => {
    expect(() => chernNumber(qwz(), { bands: 2 })).toThrow(ModelError);
    expect(() => chernNumber(qwz(), { bands: 2 })).toThrow(/bands: expected a whole number of lowest bands from 1 to 1. Value: 2/);
    expect(() => chernNumber(qwz(), { grid: 2 })).toThrow(/grid: expected a whole number of k-points from 3 to 100000. Value: 2/);
    expect(() => chernNumber(qwz(), { plane: { normal: 2, at: 0 } })).toThrow(/plane: a 2D model has one plane/);
  });
});

describe('Berry-curvature maps', () => {
  it('the lattice map sums to exactly 2 pi C; the Kubo map integrates to C (QWZ, Qi–Wu–Zhang 2006)', () => {
    for (const [u, c] of [[-1.5, 1], [0.5, -1], [3, 0]]) {
      const lat = curvatureMap(qwz(), { params: { u }, method: 'lattice', grid: 40 });
      const cell = (2 * Math.PI / 40) ** 2;
      const sum = lat.values.reduce((s, x) => s + x, 0) * cell;
      expect(Math.abs(sum - 2 * Math.PI * c)).toBeLessThan(1e-10);
      const kubo = curvatureMap(qwz(), { params: { u }, method: 'kubo', grid: 48 });
      expect(Math.abs(kubo.total! - c)).toBeLessThan(1e-6);
    }
  });

  it('Kubo curvature of the lower band equals the closed form for a d·sigma model', () => {
    // Omega_lower = (1/2) d·(d1 d x d2 d)/|d|^3 in references.md convention (C(lower) = +deg d/|d|).
    const u = -0.8;
    const r = curvatureMap(qwz(), { params: { u }, method: 'kubo', grid: 12, perBand: true });
    for (let b = 0; b < 12; b += 5) {
      for (let a = 0; a < 12; a += 3) {
        const kx = r.k1[a], ky = r.k2[b];
        const d = [Math.sin(kx), Math.sin(ky), u + Math.cos(kx) + Math.cos(ky)];
        const d1 = [Math.cos(kx), 0, -Math.sin(kx)];
        const d2 = [0, Math.cos(ky), -Math.sin(ky)];
        const cross = [d1[1] * d2[2] - d1[2] * d2[1], d1[2] * d2[0] - d1[0] * d2[2], d1[0] * d2[1] - d1[1] * d2[0]];
        const norm = Math.hypot(d[0], d[1], d[2]);
        const expected = (0.5 * (d[0] * cross[0] + d[1] * cross[1] + d[2] * cross[2])) / norm ** 3;
        expect(r.values[b * 12 + a]).toBeCloseTo(expected, 10);
        expect(r.perBand![b * 12 + a]).toBeCloseTo(expected, 10);
      }
    }
  });

  it('per-band lattice maps of all bands sum to zero plaquette by plaquette', () => {
    const r = curvatureMap(qwz(), { params: { u: -0.5 }, bands: [0], grid: 20 });
    const up = curvatureMap(qwz(), { params: { u: -0.5 }, bands: [1], grid: 20 });
    for (let i = 0; i < r.values.length; i++) expect(r.values[i] + up.values[i]).toBeCloseTo(0, 9);
  });
});

describe('Wannier-centre flow', () => {
  it('the summed hybrid Wannier centres wind by the Chern number (QWZ)', () => {
    for (const u of [-1.5, -0.5, 0.5, 3]) {
      const flow = wannierFlow(qwz(), { params: { u }, grid: [48, 48] });
      const chern = chernNumber(qwz(), { params: { u } });
      expect(flow.winding).toBe(chern.chern);
      expect(flow.checks.coarse).toBeUndefined();
      expect(flow.centres.length).toBe(49);
      expect(flow.sum[48] - flow.sum[0]).toBeCloseTo(chern.chern!, 6);
    }
  });

  it('is null and warns when gapless', () => {
    const flow = wannierFlow(qwz(), { params: { u: 0 }, grid: [16, 16] });
    expect(flow.winding).toBeNull();
    expect(flow.checks.gapless).toBe(true);
  });
});

describe('Berry and Zak phases, both Bloch conventions', () => {
  it('the embedding that closes a loop is e^{-iG·r}: H(k + G) = D H(k) D^dagger in the orbital convention', () => {
    const h = blochHamiltonian(qwzDisplaced(), { u: 0.4 }, { convention: 'orbital' });
    const e = embedding(h, 0)!;
    const k = [0.37, -1.1], kg = [0.37 + 2 * Math.PI, -1.1];
    const a = h.fill(k, new Float64Array(8)), b = h.fill(kg, new Float64Array(8));
    for (let i = 0; i < 2; i++) {
      for (let j = 0; j < 2; j++) {
        // (D H D^dagger)_ij = D_i H_ij conj(D_j), D_i = e^{-iG r_i}
        const pr = e[2 * i] * e[2 * j] + e[2 * i + 1] * e[2 * j + 1], pi = e[2 * i + 1] * e[2 * j] - e[2 * i] * e[2 * j + 1];
        const hr = a[2 * (i * 2 + j)], hi = a[2 * (i * 2 + j) + 1];
        expect(b[2 * (i * 2 + j)]).toBeCloseTo(hr * pr - hi * pi, 12);
        expect(b[2 * (i * 2 + j) + 1]).toBeCloseTo(hr * pi + hi * pr, 12);
      }
    }
  });

  it('SSH Zak phase is pi for |v| < |w| and 0 for |v| > |w| (lattice convention; Su, Schrieffer, Heeger 1979)', () => {
    const top = berryPhase(ssh(), { params: { v: 0.5, w: 1 } });
    const triv = berryPhase(ssh(), { params: { v: 1, w: 0.5 } });
    expect(top.convention).toBe('lattice');
    expect(Math.abs(Math.abs(top.phase!) - Math.PI)).toBeLessThan(1e-8);
    expect(Math.abs(triv.phase!)).toBeLessThan(1e-8);
    expect(top.polarization).toBeCloseTo(0.5, 8);
    expect(triv.polarization).toBeCloseTo(0, 8);
  });

  it('orbital convention: Zak phases differ from the lattice ones by 2 pi times the B position weight, and the topological step is still pi', () => {
    // With the orbital phase the polarization is the Wannier centre in cell units: the SSH centre sits
    // on the strong bond, A (x = 0) to B (x = 1/2) at 1/4 when v dominates, B to the next A at 3/4
    // when w does (common practice: the centre of the dimer).
    const top = berryPhase(ssh(), { params: { v: 0.5, w: 1 }, convention: 'orbital' });
    const triv = berryPhase(ssh(), { params: { v: 1, w: 0.5 }, convention: 'orbital' });
    expect(top.convention).toBe('orbital');
    expect(top.polarization!).toBeCloseTo(0.75, 8);
    expect(triv.polarization!).toBeCloseTo(0.25, 8);
  });

  it('an explicit loop in a 2D zone: the lower band of a d·sigma model picks up half the solid angle swept by d/|d|', () => {
    // Common practice (spin-1/2 Berry phase); with references.md's convention the lower band gets +Omega/2.
    const u = -1.5, N = 400, radius = 1.1;
    const loop = Array.from({ length: N }, (_, j) => [radius * Math.cos((2 * Math.PI * j) / N), radius * Math.sin((2 * Math.PI * j) / N)]);
    const unit = (k: number[]) => {
      const d = [Math.sin(k[0]), Math.sin(k[1]), u + Math.cos(k[0]) + Math.cos(k[1])];
      const n = Math.hypot(d[0], d[1], d[2]);
      return d.map((x) => x / n);
    };
    // Solid angle by the Van Oosterom–Strackee triangle formula, fanned from d/|d| at the loop centre.
    const c = unit([0, 0]);
    let solid = 0;
    for (let j = 0; j < N; j++) {
      const p = unit(loop[j]), q = unit(loop[(j + 1) % N]);
      const triple = c[0] * (p[1] * q[2] - p[2] * q[1]) - c[1] * (p[0] * q[2] - p[2] * q[0]) + c[2] * (p[0] * q[1] - p[1] * q[0]);
      const dots = 1 + c[0] * p[0] + c[1] * p[1] + c[2] * p[2] + p[0] * q[0] + p[1] * q[1] + p[2] * q[2] + q[0] * c[0] + q[1] * c[1] + q[2] * c[2];
      solid += 2 * Math.atan2(triple, dots);
    }
    const r = berryPhase(qwz(), { params: { u }, loop });
    const expected = Math.atan2(Math.sin(solid / 2), Math.cos(solid / 2));
    expect(Math.abs(solid)).toBeGreaterThan(1);
    expect(r.phase!).toBeCloseTo(expected, 4);
    expect(() => berryPhase(qwz(), { loop: [[0, 0]] })).toThrow(/loop: expected at least 3 momenta/);
    expect(() => berryPhase(qwz())).toThrow(/loop: a 2D model needs an explicit loop/);
  });
});

describe('compute(request)', () => {
  it('dispatches by kind and names a bad kind', () => {
    const r = compute({ kind: 'chern', model: qwz(), params: { u: -0.5 } });
    expect(r.kind).toBe('chern');
    expect(r.kind === 'chern' && r.chern).toBe(1);
    // @ts-expect-error an unknown kind is a runtime error naming the field
    expect(() => compute({ kind: 'chernn', model: qwz() })).toThrow(/kind: unknown diagnostic "chernn"/);
    expect(() => compute({ kind: 'chern', model: qwz(), params: { u: 9 } })).toThrow(/params\.u: outside its declared range \[-4, 4\]\. Value: 9/);
  });
});
