/**
 * Topological invariants of the catalogue models against published values. Sign conventions are
 * those of shared/references.md (A = i<u|grad u>, C(lower band of d·sigma) = +deg d/|d|, hybrid
 * Wannier centres -arg(eig W)/2pi), stated beside each sign test.
 */
import { execFileSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import {
  bhz, chernNumber, compute, coupledWires, curvatureMap, haldane, hallConductivity, HALL_CONDUCTANCE_QUANTUM, hofstadter,
  kaneMele, kitaevChain, lattice, majoranaNumber, qwz, spinChern, ssh, wannierFlow, twoBandWeyl, weylPoints, windingNumber, z2Index,
  berryPhase, type ModelSpec,
} from '../../src/index.js';

const SQRT3 = Math.sqrt(3);

describe('Chern numbers', () => {
  it('Qi–Wu–Zhang: C(lower) = 0, +1, +1, -1, -1, 0 at u = -3, -1.5, -0.5, 0.5, 1.5, 3 (Qi, Wu, Zhang, PRB 74, 085308 (2006); references.md sign convention)', () => {
    const expected = [0, 1, 1, -1, -1, 0];
    [-3, -1.5, -0.5, 0.5, 1.5, 3].forEach((u, i) => {
      const r = chernNumber(qwz(), { params: { u } });
      expect(r.chern).toBe(expected[i]);
      expect(r.checks.converged).toBe(true);
    });
  });

  it('Haldane: C(lower) = -sign(sin phi) inside |M| < 3 sqrt3 t2 |sin phi|, 0 outside (Haldane, PRL 61, 2015 (1988))', () => {
    const t2 = 0.1;
    for (const phi of [Math.PI / 2, -Math.PI / 3, 2.5]) {
      const boundary = 3 * SQRT3 * t2 * Math.abs(Math.sin(phi));
      for (const M of [0, 0.5 * boundary, 1.5 * boundary, -0.8 * boundary]) {
        const r = chernNumber(haldane(), { params: { t1: 1, t2, phi, M } });
        const expected = Math.abs(M) < boundary ? -Math.sign(Math.sin(phi)) : 0;
        expect(r.chern).toBe(expected);
      }
    }
  });

  it('Haldane near the boundary (gap 0.02): K is never on the doubling grids, the automatic grid refines until certain', () => {
    const boundary = 3 * SQRT3 * 0.1;
    const inside = chernNumber(haldane(), { params: { t2: 0.1, phi: Math.PI / 2, M: boundary - 0.01 } });
    expect(inside.chern).toBe(-1);
    expect(inside.checks.minGap).toBeLessThan(0.03);
    expect(inside.checks.grid![0]).toBeGreaterThan(16);
    const outside = chernNumber(haldane(), { params: { t2: 0.1, phi: Math.PI / 2, M: boundary + 0.01 } });
    expect(outside.chern).toBe(0);
  });

  it('Haldane exactly at the boundary, on a grid that contains K and K\' (48 divisible by 3): null with a warning naming k and the gap', () => {
    const r = chernNumber(haldane(), { params: { t2: 0.1, phi: Math.PI / 2, M: 3 * SQRT3 * 0.1 }, grid: 48 });
    expect(r.chern).toBeNull();
    expect(r.checks.gapless).toBe(true);
    expect(r.checks.warnings[0]).toMatch(/gapless: band 0 touches the other bands at k = \(.*\).*gap \d\.\d\de-\d+ <= tolerance/);
    // The reported momentum is a Dirac point: fractions are thirds.
    for (const f of r.checks.minGapAt!) expect(Math.abs(3 * f - Math.round(3 * f))).toBeLessThan(1e-12);
  });

  it('Harper–Hofstadter band Chern numbers at flux 1/3 and 1/5 satisfy the TKNN Diophantine equation (Thouless et al., PRL 49, 405 (1982))', () => {
    for (const [p, q] of [[1, 3], [1, 5]]) {
      const model = hofstadter(p, q);
      let below = 0;
      for (let r = 1; r < q; r++) {
        below += chernNumber(model, { bands: [r - 1], grid: 48 }).chern!;
        // r = q s_r + p t_r with |t_r| <= q/2; counter-clockwise flux e^{+2 pi i p/q} gives sum = -t_r (references.md).
        let t: number | null = null;
        for (let tr = -Math.floor(q / 2); tr <= Math.floor(q / 2); tr++) if ((r - p * tr) % q === 0) t = tr;
        expect(t).not.toBeNull();
        expect(below).toBe(-t!);
        // The summed group directly (non-Abelian links over r bands) agrees.
        expect(chernNumber(model, { bands: r, grid: 48 }).chern).toBe(-t!);
      }
    }
  });

  it('coupled wires: |C| = 1 when the inter-wire coupling dominates, 0 when the dimerization does (common practice: wire construction)', () => {
    expect(Math.abs(chernNumber(coupledWires(), { params: { delta: 0.1, g: 0.3 } }).chern!)).toBe(1);
    expect(chernNumber(coupledWires(), { params: { delta: 0.3, g: 0.1 } }).chern).toBe(0);
    expect(chernNumber(coupledWires(), { params: { delta: -0.1, g: 0.3 } }).chern).toBe(chernNumber(coupledWires(), { params: { delta: 0.1, g: 0.3 } }).chern);
  });
});

describe('curvature maps and Wannier-centre flow', () => {
  it('Haldane: the lattice curvature map sums to 2 pi C to rounding; the Kubo map integrates to C (Haldane 1988)', () => {
    const params = { t2: 0.1, phi: Math.PI / 2, M: 0.2 };
    const lat = curvatureMap(haldane(), { params, grid: 60 });
    const cell = (2 * Math.PI / 60) ** 2;
    expect(Math.abs(lat.values.reduce((s, x) => s + x, 0) * cell - 2 * Math.PI * -1)).toBeLessThan(1e-10);
    const kubo = curvatureMap(haldane(), { params, grid: 90, method: 'kubo' });
    expect(Math.abs(kubo.total! - -1)).toBeLessThan(1e-3);
  });

  it('Haldane: the hybrid Wannier centres wind by the Chern number', () => {
    for (const phi of [Math.PI / 2, -Math.PI / 2]) {
      const params = { t2: 0.1, phi, M: 0.2 };
      const flow = wannierFlow(haldane(), { params, grid: [64, 64] });
      expect(flow.winding).toBe(chernNumber(haldane(), { params }).chern);
      expect(flow.winding).toBe(-Math.sign(Math.sin(phi)));
    }
  });
});

describe('Z2 indices', () => {
  const km = (lambda_v: number) => ({ t: 1, lambda_SO: 0.06, lambda_R: 0, lambda_v });
  const boundary = 3 * SQRT3 * 0.06; // 0.31177 (Kane & Mele, PRL 95, 226801 (2005))

  it('Kane–Mele (lambda_R = 0): Z2 = 1 below lambda_v = 3 sqrt3 lambda_SO, 0 above, from the flow and from the spin Chern number', () => {
    for (const [lv, z] of [[0.1, 1], [0.25, 1], [0.4, 0], [0.6, 0]] as const) {
      const flow = z2Index(kaneMele(), { params: km(lv) });
      expect(flow.z2).toBe(z);
      const spin = spinChern(kaneMele(), { params: km(lv) });
      expect(spin.z2).toBe(z);
      expect(Math.abs(spin.spinChern!)).toBe(z);
      // In the Z2 = 1 phase the spin-up block carries Chern number +-1 and spin down the opposite.
      if (z === 1) expect(spin.up.chern).toBe(-spin.down.chern!);
    }
  });

  it('Kane–Mele close to the transition (gap 0.024 t): the automatic flow grid refines until the count is stable (references.md: 21 points failed where 101 succeeded)', () => {
    const below = z2Index(kaneMele(), { params: km(boundary - 0.012) });
    const above = z2Index(kaneMele(), { params: km(boundary + 0.012) });
    expect(below.z2).toBe(1);
    expect(above.z2).toBe(0);
    expect(below.checks.converged).toBe(true);
    // The sampled gap (K is not on these grids) is close to the true 0.024.
    expect(below.checks.minGap).toBeLessThan(0.05);
  });

  it('Kane–Mele with Rashba coupling (S_z not conserved): the flow still gives Z2 = 1, the spin Chern number refuses by name', () => {
    const params = { t: 1, lambda_SO: 0.06, lambda_R: 0.05, lambda_v: 0.1 };
    expect(z2Index(kaneMele(), { params }).z2).toBe(1);
    expect(() => spinChern(kaneMele(), { params })).toThrow(/S_z is not conserved: H couples A\.(up|dn) and/);
  });

  it('BHZ-type model: Fu–Kane parity products give (-1)^nu = sign(M) sign(M - 4B)^2 sign(M - 8B) at M/B = -1, 1, 3, 9 (Fu & Kane, PRB 76, 045302 (2007))', () => {
    for (const M of [-1, 1, 3, 9]) {
      const B = 1;
      const predicted = Math.sign(M) * Math.sign(M - 4 * B) ** 2 * Math.sign(M - 8 * B) < 0 ? 1 : 0;
      const parity = z2Index(bhz(), { params: { A: 1, B, M }, method: 'parity' });
      expect(parity.inversion).toBe('orbital parities');
      expect(parity.z2).toBe(predicted);
      expect(z2Index(bhz(), { params: { A: 1, B, M } }).z2).toBe(predicted);
    }
    // A matrix that is not a symmetry is refused by name.
    const bad = [[1, 0, 0, 0], [0, 1, 0, 0], [0, 0, 1, 0], [0, 0, 0, 1]];
    expect(() => z2Index(bhz(), { params: { A: 1, B: 1, M: 1 }, method: 'parity', inversion: bad })).toThrow(/inversion: H\(-k\) != P H\(k\) P\^dagger/);
  });

  // A 3D time-reversal- and inversion-symmetric Wilson–Dirac model (common practice, from memory):
  // H = sin kx G1 + sin ky G2 + sin kz G3 + (M - cos kx - cos ky - cos kz) G0, G0 = tau_z, Gi = tau_x s_i.
  // Parities tau_z give delta = sign(M - sum cos) at each TRIM, so nu0 = 1 for 1 < |M| < 3, weak (1,1,1) for |M| < 1.
  function wilsonDirac3D(): ModelSpec {
    return lattice('3D Wilson–Dirac', [[1, 0, 0], [0, 1, 0], [0, 0, 1]])
      .parameter('M', { default: 2, range: [-5, 5] })
      .site('a', [0, 0, 0], { spin: true }).site('b', [0, 0, 0], { spin: true })
      .block('q', ['a', 'b'])
      .onsiteMatrix('q', { z0: 'M' })
      .harmonic('q', [1, 0, 0], { cos: { z0: -1 }, sin: { xx: 1 } })
      .harmonic('q', [0, 1, 0], { cos: { z0: -1 }, sin: { xy: 1 } })
      .harmonic('q', [0, 0, 1], { cos: { z0: -1 }, sin: { xz: 1 } })
      .build();
  }

  it('3D: strong and weak indices from parities and from the six time-reversal-invariant planes agree with the TRIM mass signs', () => {
    for (const [M, strong, weak] of [[2, 1, [0, 0, 0]], [0.5, 0, [1, 1, 1]], [4, 0, [0, 0, 0]]] as const) {
      // Predicted from delta(TRIM) = sign(M - sum cos) (Fu & Kane 2007 product formula).
      let all = 1;
      const w = [1, 1, 1];
      for (let t = 0; t < 8; t++) {
        const bits = [t & 1, (t >> 1) & 1, (t >> 2) & 1];
        const delta = Math.sign(M - bits.reduce((s, b) => s + (b ? -1 : 1), 0));
        all *= delta;
        bits.forEach((b, i) => { if (b) w[i] *= delta; });
      }
      expect(all < 0 ? 1 : 0).toBe(strong);
      expect(w.map((x) => (x < 0 ? 1 : 0))).toEqual([...weak]);
      const parity = z2Index(wilsonDirac3D(), { params: { M }, method: 'parity' });
      expect(parity.z2).toBe(strong);
      expect(parity.weak).toEqual([...weak]);
      const flow = z2Index(wilsonDirac3D(), { params: { M } });
      expect(flow.z2).toBe(strong);
      expect(flow.weak).toEqual([...weak]);
      expect(flow.planes).toHaveLength(6);
    }
  });
});

describe('1D invariants', () => {
  it('SSH: winding 1 and Zak phase pi for |v| < |w|, 0 and 0 for |v| > |w|, null at v = w (Su, Schrieffer, Heeger, PRL 42, 1698 (1979))', () => {
    // Convention: nu = winding of det H_BA (rows B, columns A), lattice Bloch convention: the winding
    // of the d-vector (v + w cos k, w sin k), +1 for |v| < |w| (Asbóth et al. ch. 1).
    const top = windingNumber(ssh(), { params: { v: 0.5, w: 1 } });
    expect(top.winding).toBe(1);
    expect(top.sublattices).toEqual([['A'], ['B']]);
    expect(windingNumber(ssh(), { params: { v: 1, w: 0.5 } }).winding).toBe(0);
    // Swapping the blocks reverses the sign.
    expect(windingNumber(ssh(), { params: { v: 0.5, w: 1 }, sublattice: ['B'] }).winding).toBe(-1);
    const critical = windingNumber(ssh(), { params: { v: 1, w: 1 } });
    expect(critical.winding).toBeNull();
    expect(critical.checks.warnings[0]).toMatch(/gapless: the spectrum reaches zero energy at k = \(-?0\.5\)/);
    expect(Math.abs(Math.abs(berryPhase(ssh(), { params: { v: 0.5, w: 1 } }).phase!) - Math.PI)).toBeLessThan(1e-8);
    expect(Math.abs(berryPhase(ssh(), { params: { v: 1, w: 0.5 } }).phase!)).toBeLessThan(1e-8);
  });

  it('Kitaev chain: Majorana number -1 for |mu| < 2|t|, +1 for |mu| > 2|t|, null at mu = 2t (Kitaev, Physics-Uspekhi 44, 131 (2001))', () => {
    for (const [mu, m] of [[0, -1], [1.5, -1], [-1.5, -1], [2.5, 1], [-3, 1]]) {
      expect(majoranaNumber(kitaevChain(), { params: { mu, t: 1, Delta: 1 } }).majorana).toBe(m);
    }
    expect(majoranaNumber(kitaevChain(), { params: { mu: 0.7, t: 1, Delta: -0.4 } }).majorana).toBe(-1);
    const edge = majoranaNumber(kitaevChain(), { params: { mu: 2, t: 1, Delta: 1 } });
    expect(edge.majorana).toBeNull();
    expect(edge.checks.gapless).toBe(true);
    expect(() => majoranaNumber(ssh())).toThrow(/orbitals\[0\]\.nambu: a Majorana number needs a BdG model/);
  });
});

describe('Weyl points', () => {
  it('the two-band Weyl model has two points of chirality +1 and -1 summing to zero, each = sign det(dd_i/dk_j) (common practice)', () => {
    const k0 = Math.PI / 2;
    const r = weylPoints(twoBandWeyl(), { params: { t: 1, m: 1, k0 } });
    expect(r.points).toHaveLength(2);
    expect(r.total).toBe(0);
    for (const p of r.points) {
      expect(Math.abs(Math.abs(p.k[2]) - k0)).toBeLessThan(1e-5);
      // d(k) = (sin kx, sin ky, cos kz - cos k0 + m(2 - cos kx - cos ky)): Jacobian at the node by central differences.
      const d = (k: number[]) => [Math.sin(k[0]), Math.sin(k[1]), Math.cos(k[2]) - Math.cos(k0) + (2 - Math.cos(k[0]) - Math.cos(k[1]))];
      const eps = 1e-6;
      const J = [0, 1, 2].map((j) => {
        const kp = [...p.k], km = [...p.k];
        kp[j] += eps; km[j] -= eps;
        return d(kp).map((x, i) => (x - d(km)[i]) / (2 * eps));
      });
      const det = J[0][0] * (J[1][1] * J[2][2] - J[1][2] * J[2][1]) - J[0][1] * (J[1][0] * J[2][2] - J[1][2] * J[2][0]) + J[0][2] * (J[1][0] * J[2][1] - J[1][1] * J[2][0]);
      expect(p.chirality).toBe(Math.sign(det));
    }
  });
});

describe('anomalous Hall conductivity', () => {
  it('quantum of Hall conductance e^2/h = G0/2 = 3.874045865e-5 S, h/e^2 = 25812.80745 ohm (CODATA 2018, exact e and h)', () => {
    // CODATA 2018: conductance quantum G0 = 2e^2/h = 7.748091729e-5 S; von Klitzing constant R_K = 25812.80745 ohm.
    // (references.md writes 3.874045846e-5, with two digits swapped; G0/2 and 1/R_K both give 3.8740458649e-5.)
    expect(Math.abs(HALL_CONDUCTANCE_QUANTUM / (7.748091729e-5 / 2) - 1)).toBeLessThan(2e-10); // G0 quoted to 10 digits
    expect(Math.abs(1 / HALL_CONDUCTANCE_QUANTUM - 25812.80745)).toBeLessThan(1e-5);
    const r = hallConductivity(haldane(), { params: { t2: 0.1, phi: Math.PI / 2, M: 0.2 } });
    expect(r.sigma).toBe(-1);
    expect(r.siemens).toBe(-HALL_CONDUCTANCE_QUANTUM);
  });

  it('Fermi-sea integral of the Kubo curvature matches numpy on the same grid, and plateaus at C in the gap', () => {
    const u = -1, mus = [-3.5, -1.2, 0, 0.8, 1.5, 3.5], N = 64;
    const r = hallConductivity(qwz(), { params: { u }, mu: mus, grid: N });
    // Closed form per band (lower: Omega = d·(d1 d x d2 d)/(2|d|^3), upper: the opposite), numpy vectorised.
    const ref = JSON.parse(execFileSync('/usr/bin/python3', ['-c', `
import numpy as np, json
u, N = ${u}, ${N}
k = -np.pi + 2 * np.pi * np.arange(N) / N
kx, ky = np.meshgrid(k, k, indexing='xy')
d = np.stack([np.sin(kx), np.sin(ky), u + np.cos(kx) + np.cos(ky)])
d1 = np.stack([np.cos(kx), 0 * kx, -np.sin(kx)])
d2 = np.stack([0 * ky, np.cos(ky), -np.sin(ky)])
n = np.linalg.norm(d, axis=0)
om = 0.5 * np.einsum('i...,i...->...', d, np.cross(d1, d2, axis=0)) / n**3
area = (2 * np.pi / N) ** 2
out = [float(((om * (-n < mu)).sum() + (-om * (n < mu)).sum()) * area / (2 * np.pi)) for mu in ${JSON.stringify(mus)}]
print(json.dumps(out))`], { encoding: 'utf8', env: { ...process.env, OPENBLAS_NUM_THREADS: '1' } })) as number[];
    mus.forEach((_, i) => expect(r.sigmaOfMu![i]).toBeCloseTo(ref[i], 9));
    expect(r.sigmaOfMu![2]).toBeCloseTo(1, 9); // mu = 0 in the gap: C(lower) = +1 at u = -1 (Qi, Wu, Zhang 2006)
    expect(r.siemensOfMu![2]).toBeCloseTo(HALL_CONDUCTANCE_QUANTUM, 14);
  });
});

describe('compute() runs every topology kind', () => {
  it('z2, winding, majorana through the dispatcher and a phase map of the Chern number', () => {
    const z = compute({ kind: 'z2', model: bhz(), params: { A: 1, B: 1, M: 1 }, method: 'parity' });
    expect(z.kind === 'z2' && z.z2).toBe(1);
    const w = compute({ kind: 'winding', model: ssh(), params: { v: 0.2, w: 1 } });
    expect(w.kind === 'winding' && w.winding).toBe(1);
    const map = compute({ kind: 'phase-map', model: qwz(), axes: [{ param: 'u', from: -2.5, to: 2.5, count: 6 }], quantity: 'chern' });
    expect(map.kind).toBe('phase-map');
    if (map.kind === 'phase-map') expect(Array.from(map.values)).toEqual([0, 1, 1, -1, -1, 0]);
  });
});
