/**
 * Catalogue models and model builders against published facts. Every check names its source;
 * signs are in the convention of ../../shared/references.md (the FHS helper in models-helpers.ts).
 */
import { describe, expect, it } from 'vitest';
import {
  bhz, blochHamiltonian, coupledWires, eigh, flake, haldane, hofstadter, kaneMele, kitaevChain, magneticFlux, qwz, ribbon, riceMele, ssh, twoBandWeyl,
  type ModelSpec,
} from '../../src/index.js';
import { chern, solver, spectrum } from './models-helpers.js';

const TAU = 2 * Math.PI;

describe('graphene from the Haldane model with t2 = M = 0 (Castro Neto et al., RMP 81, 109 (2009))', () => {
  it('has Dirac points at K with hbar v = 3 t a / 2 (a = C–C distance = 1)', () => {
    const model = haldane();
    const [a1, a2] = model.vectors;
    // K in reduced coordinates: 1 + e^{-i k1} + e^{-i k2} = 0.
    const K = [TAU / 3, -TAU / 3];
    for (const t of [1, 0.7]) {
      const params = { t1: t, t2: 0, M: 0 };
      const atK = spectrum(model, params, K);
      expect(atK[1] - atK[0]).toBeLessThan(1e-12);
      for (const angle of [0, 0.9, 2.3, 4]) {
        const q = 1e-5;
        const dq = [q * Math.cos(angle), q * Math.sin(angle)];
        const k = [K[0] + dq[0] * a1[0] + dq[1] * a1[1], K[1] + dq[0] * a2[0] + dq[1] * a2[1]];
        const e = spectrum(model, params, k);
        expect((e[1] - e[0]) / 2 / q).toBeCloseTo((3 * t * 1) / 2, 5);
      }
    }
  });
});

describe('closed-form dispersions', () => {
  it('Qi–Wu–Zhang: E = ±sqrt(sin^2 kx + sin^2 ky + (u + cos kx + cos ky)^2) (Qi, Wu, Zhang, PRB 74, 085308 (2006))', () => {
    for (const [kx, ky, u] of [[0.2, 1.7, -1.2], [-2.9, 0.6, 2.5], [1.1, -0.4, 0]]) {
      const e = spectrum(qwz(), { u }, [kx, ky]);
      const d = Math.hypot(Math.sin(kx), Math.sin(ky), u + Math.cos(kx) + Math.cos(ky));
      expect(e[0]).toBeCloseTo(-d, 12);
      expect(e[1]).toBeCloseTo(d, 12);
    }
  });

  it('BHZ-type model: H = diag(d·tau, its time-reversed partner), d = (A sin kx, -A sin ky, M - 2B(2 - cos kx - cos ky)) (Bernevig, Hughes, Zhang, Science 314, 1757 (2006))', () => {
    const model = bhz();
    const h = blochHamiltonian(model, { A: 0.8, B: 0.6, M: 1.3 });
    const m = new Float64Array(32);
    for (const [kx, ky] of [[0.3, -1.2], [2.4, 2.9]]) {
      h.fill([kx, ky], m);
      const dx = 0.8 * Math.sin(kx), dy = -0.8 * Math.sin(ky), dz = 1.3 - 1.2 * (2 - Math.cos(kx) - Math.cos(ky));
      // Orbitals (s.up, s.dn, p.up, p.dn); upper spin block h = [[dz, dx - i dy], [dx + i dy, -dz]],
      // lower block h*(-k) = [[dz, -dx - i dy], [-dx + i dy, -dz]].
      const idx = { su: 0, sd: 1, pu: 2, pd: 3 };
      const at = (i: number, j: number) => [m[2 * (i * 4 + j)], m[2 * (i * 4 + j) + 1]];
      expect(at(idx.su, idx.su)[0]).toBeCloseTo(dz, 12);
      expect(at(idx.pu, idx.pu)[0]).toBeCloseTo(-dz, 12);
      expect(at(idx.su, idx.pu)[0]).toBeCloseTo(dx, 12);
      expect(at(idx.su, idx.pu)[1]).toBeCloseTo(-dy, 12);
      expect(at(idx.sd, idx.pd)[0]).toBeCloseTo(-dx, 12);
      expect(at(idx.sd, idx.pd)[1]).toBeCloseTo(-dy, 12);
      expect(Math.hypot(...at(idx.su, idx.sd), ...at(idx.su, idx.pd), ...at(idx.pu, idx.sd))).toBe(0);
      const e = eigh(4, m).values;
      const d = Math.hypot(dx, dy, dz);
      [-d, -d, d, d].forEach((x, i) => expect(e[i]).toBeCloseTo(x, 12));
    }
  });

  it('SSH: E = ±|v + w e^{ik}| (Su, Schrieffer, Heeger 1979); Rice–Mele: E = ±sqrt(u^2 + v^2 + w^2 + 2vw cos k) (Rice & Mele, PRL 49, 1455 (1982))', () => {
    for (const k of [0.4, 2.8]) {
      const e = spectrum(ssh(), { v: 0.6, w: 1.1 }, [k]);
      expect(e[1]).toBeCloseTo(Math.hypot(0.6 + 1.1 * Math.cos(k), 1.1 * Math.sin(k)), 12);
      const r = spectrum(riceMele(), { v: 0.6, w: 1.1, u: 0.3 }, [k]);
      expect(r[1]).toBeCloseTo(Math.sqrt(0.09 + 0.36 + 1.21 + 2 * 0.66 * Math.cos(k)), 12);
      expect(r[0]).toBeCloseTo(-r[1], 12);
    }
  });

  it('Kitaev chain: E = ±sqrt((2t cos k + mu)^2 + 4 Delta^2 sin^2 k) (Kitaev, Physics-Uspekhi 44, 131 (2001))', () => {
    for (const [k, mu, t, D] of [[0.5, 0.3, 1, 0.7], [2.2, -1.5, 0.8, 1.2]]) {
      const e = spectrum(kitaevChain(), { mu, t, Delta: D }, [k]);
      const x = Math.sqrt((2 * t * Math.cos(k) + mu) ** 2 + 4 * D * D * Math.sin(k) ** 2);
      expect(e[0]).toBeCloseTo(-x, 12);
      expect(e[1]).toBeCloseTo(x, 12);
    }
  });
});

describe('Chern numbers of the catalogue in the references.md convention', () => {
  it('Haldane: C(lower) = -sign(sin phi) inside |M| < 3 sqrt3 t2 |sin phi|, 0 outside (Haldane, PRL 61, 2015 (1988))', () => {
    for (const [phi, M, expected] of [[Math.PI / 2, 0.2, -1], [-Math.PI / 2, 0.2, 1], [1, -0.3, -1], [Math.PI / 2, 0.6, 0]]) {
      const { c, gap } = chern(haldane(), { t1: 1, t2: 0.1, phi, M }, 1, 18);
      expect(gap).toBeGreaterThan(0.05);
      expect(c).toBeCloseTo(expected, 9);
    }
  });

  it('Kane–Mele at lambda_R = 0: the spin-up block is Haldane with t2 = lambda_SO, phi = pi/2, M = lambda_v; spin-up C = -1 for lambda_v < 3 sqrt3 lambda_SO (Kane & Mele, PRL 95, 226801 (2005))', () => {
    const km = kaneMele();
    const up: ModelSpec = { ...km, orbitals: km.orbitals.filter((o) => o.spin === 'up'), terms: km.terms.filter((t) => t.from.endsWith('.up') && t.to.endsWith('.up')) };
    const hk = blochHamiltonian(up, { lambda_R: 0, lambda_v: 0.1 });
    const hh = blochHamiltonian(haldane(), { t1: 1, t2: 0.06, phi: Math.PI / 2, M: 0.1 });
    const a = new Float64Array(8), b = new Float64Array(8);
    hk.fill([0.3, 2.1], a);
    hh.fill([0.3, 2.1], b);
    a.forEach((x, i) => expect(x).toBeCloseTo(b[i], 12));
    expect(chern(up, { lambda_R: 0, lambda_v: 0.1 }, 1, 18).c).toBeCloseTo(-1, 9);
    expect(chern(up, { lambda_R: 0, lambda_v: 0.4 }, 1, 18).c).toBeCloseTo(0, 9);
    // Rashba mixes the spins: the model stays gapped at the paper's QSH point (lambda_R = 0.05 t).
    expect(chern(km, { lambda_R: 0.05, lambda_v: 0.1 }, 2, 12).gap).toBeGreaterThan(0.05);
  });

  it('BHZ-type model: Fu–Kane parities give (-1)^nu = sign(M) sign(M - 8B) (Fu & Kane, PRB 76, 045302 (2007))', () => {
    // Inversion is tau_z: +1 on s, -1 on p. Occupied parity per Kramers pair = tr(P_occ tau_z)/2.
    const parityProduct = (M: number) => {
      const s = solver(bhz(), { A: 1, B: 1, M });
      let product = 1;
      for (const k of [[0, 0], [Math.PI, 0], [0, Math.PI], [Math.PI, Math.PI]]) {
        const { vectors } = s.at(k);
        let trace = 0;
        for (let band = 0; band < 2; band++) for (let r = 0; r < 4; r++) {
          const w = vectors[2 * (r * 4 + band)] ** 2 + vectors[2 * (r * 4 + band) + 1] ** 2;
          trace += (bhz().orbitals[r].label.startsWith('s') ? 1 : -1) * w;
        }
        product *= Math.sign(trace / 2);
      }
      return product;
    };
    expect(parityProduct(-1)).toBe(1);
    expect(parityProduct(1)).toBe(-1);
    expect(parityProduct(3)).toBe(-1);
    expect(parityProduct(9)).toBe(1);
  });
});

describe('Harper–Hofstadter model (Thouless, Kohmoto, Nightingale, den Nijs, PRL 49, 405 (1982))', () => {
  it('has q bands separated by gaps for odd q, inside [-4t, 4t]', () => {
    for (const [p, q] of [[1, 3], [2, 5], [1, 5]]) {
      const s = solver(hofstadter(p, q), { t: 1 });
      const lo = new Array<number>(q).fill(Infinity), hi = new Array<number>(q).fill(-Infinity);
      const n = 12;
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
        const e = s.at([(TAU * i) / n - Math.PI, (TAU * j) / n - Math.PI]).values;
        e.forEach((x, b) => { lo[b] = Math.min(lo[b], x); hi[b] = Math.max(hi[b], x); });
      }
      expect(s.size).toBe(q);
      for (let b = 0; b + 1 < q; b++) expect(lo[b + 1] - hi[b]).toBeGreaterThan(0.05);
      expect(lo[0]).toBeGreaterThan(-4);
      expect(hi[q - 1]).toBeLessThan(4);
    }
  });

  it('band Chern numbers solve the TKNN Diophantine equation with the references.md sign: 1/3 -> (-1, 2, -1), 1/5 -> (-1, -1, 4, -1, -1)', () => {
    for (const [q, expected] of [[3, [-1, 2, -1]], [5, [-1, -1, 4, -1, -1]]] as const) {
      const model = hofstadter(1, q);
      let below = 0;
      for (let b = 0; b + 1 < q; b++) {
        const { c, gap } = chern(model, {}, b + 1, 15);
        expect(gap).toBeGreaterThan(0.05);
        expect(c - below).toBeCloseTo(expected[b], 9);
        below = c;
      }
    }
  });

  it('the magnetic supercell is gauge-consistent: E(k1, k2 + 2 pi/q) = E(k1, k2) (magnetic translation), square and honeycomb', () => {
    const cases: [ModelSpec, Record<string, number>, number][] = [
      [hofstadter(2, 5), {}, 5],
      [magneticFlux(haldane(), { p: 1, q: 3 }), { t2: 0.1, phi: 0.8, M: 0.1 }, 3],
    ];
    for (const [model, params, q] of cases) {
      const s = solver(model, params);
      for (const [k1, k2] of [[0.37, -0.81], [2.1, 1.3]]) {
        const base = Array.from(s.at([k1, k2]).values);
        for (let shift = 1; shift < q; shift++) {
          const moved = s.at([k1, k2 + (TAU * shift) / q]).values;
          base.forEach((e, i) => expect(moved[i]).toBeCloseTo(e, 10));
        }
      }
    }
  });
});

describe('open chains', () => {
  const absSorted = (model: ModelSpec, params: Record<string, number>) => Array.from(spectrum(model, params, [])).map(Math.abs).sort((a, b) => a - b);

  it('SSH open chain of 40 cells has two zero modes iff w > v (Su, Schrieffer, Heeger, PRL 42, 1698 (1979))', () => {
    const chain = ribbon(ssh(), 0, 40);
    expect(chain.periodic).toBe(0);
    const topo = absSorted(chain, { v: 0.5, w: 1 });
    expect(topo[1]).toBeLessThan(1e-9);
    expect(topo[2]).toBeGreaterThan(0.4);
    const trivial = absSorted(chain, { v: 1, w: 0.5 });
    expect(trivial[0]).toBeGreaterThan(0.4);
  });

  it('Kitaev open chain of 60 sites has a pair of near-zero modes for |mu| < 2|t| and none outside (Kitaev 2001)', () => {
    const chain = flake(kitaevChain(), [60]);
    for (const mu of [0.5, -1.5]) {
      const e = absSorted(chain, { mu, t: 1, Delta: 1 });
      expect(e[1]).toBeLessThan(1e-6);
      expect(e[2]).toBeGreaterThan(0.3);
    }
    for (const mu of [2.5, -3]) expect(absSorted(chain, { mu, t: 1, Delta: 1 })[0]).toBeGreaterThan(0.3);
  });
});

describe('coupled-wire Chern insulator (wire construction: common practice)', () => {
  it('C = 1 when the inter-wire coupling dominates, 0 when the dimerization dominates (either sign of each)', () => {
    for (const [delta, g, expected] of [[0.1, 0.3, 1], [-0.2, 0.3, 1], [0, -0.4, 1], [0.4, 0.2, 0], [-0.4, 0.2, 0], [0.45, -0.3, 0]]) {
      const { c, gap } = chern(coupledWires(), { delta, g }, 1, 18);
      expect(gap).toBeGreaterThan(0.1);
      expect(c).toBeCloseTo(expected, 9);
    }
  });

  it('the gap closes where |delta| = |g|, in a single Dirac cone (at k = pi, ky = pi for delta = g)', () => {
    const s = solver(coupledWires(), { delta: 0.25, g: 0.25 });
    const gapAt = (k: number[]) => { const e = s.at(k).values; return e[1] - e[0]; };
    expect(gapAt([Math.PI, Math.PI])).toBeLessThan(1e-12);
    // Linear (cone) in every direction: doubling the distance doubles the gap.
    for (const a of [0, 1, 2.5, 4]) {
      const at = (r: number) => gapAt([Math.PI + r * Math.cos(a), Math.PI + r * Math.sin(a)]);
      expect(at(2e-4) / at(1e-4)).toBeCloseTo(2, 3);
    }
    // The only closing on a 60 x 60 grid around the zone.
    const n = 60;
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
      const k = [(TAU * i) / n - Math.PI, (TAU * j) / n - Math.PI];
      const far = Math.hypot(Math.abs(k[0]) - Math.PI, Math.abs(k[1]) - Math.PI) > 0.3;
      if (far) expect(gapAt(k)).toBeGreaterThan(0.05);
    }
    // Just off the line the gap reopens.
    for (const delta of [0.2, 0.3]) expect(chern(coupledWires(), { delta, g: 0.25 }, 1, 12).gap).toBeGreaterThan(0.05);
  });

  it('the inter-wire term takes the left mover of wire n to the right mover of wire n + 1 only (and annihilates the right mover)', () => {
    const g = 0.3;
    const h = blochHamiltonian(coupledWires(), { delta: 0, g });
    const at = (ky: number) => h.fill([1.3, ky], new Float64Array(8));
    // H(ky) = H0 + T e^{i ky} + T^dagger e^{-i ky}, T = <n+1|H|n>: T = (X - iY)/2 with
    // X = (H(0) - H(pi))/2 and Y = H(pi/2) - (H(0) + H(pi))/2.
    const [h0, hp, hh] = [at(0), at(Math.PI), at(Math.PI / 2)];
    const T = new Float64Array(8);
    for (let e = 0; e < 8; e += 2) {
      const xr = (h0[e] - hp[e]) / 2, xi = (h0[e + 1] - hp[e + 1]) / 2;
      const yr = hh[e] - (h0[e] + hp[e]) / 2, yi = hh[e + 1] - (h0[e + 1] + hp[e + 1]) / 2;
      T[e] = (xr + yi) / 2;
      T[e + 1] = (xi - yr) / 2;
    }
    // Movers of a critical wire (g = 0) just right of its Dirac point k = pi: the upper band rises
    // (right mover), the lower band falls (left mover).
    const { vectors } = solver(coupledWires(), { delta: 0, g: 0 }).at([Math.PI + 1e-6, 0]);
    const column = (c: number) => [[vectors[2 * c], vectors[2 * c + 1]], [vectors[2 * (2 + c)], vectors[2 * (2 + c) + 1]]];
    const [left, right] = [column(0), column(1)];
    const apply = (v: number[][]) => [0, 1].map((r) => [0, 1].reduce((acc, c) => {
      const [tr, ti] = [T[2 * (r * 2 + c)], T[2 * (r * 2 + c) + 1]];
      return [acc[0] + tr * v[c][0] - ti * v[c][1], acc[1] + tr * v[c][1] + ti * v[c][0]];
    }, [0, 0]));
    const tr = apply(right);
    expect(Math.hypot(...tr[0], ...tr[1])).toBeLessThan(1e-5);
    const tl = apply(left);
    const overlap = [0, 1].reduce((acc, r) => [acc[0] + right[r][0] * tl[r][0] + right[r][1] * tl[r][1], acc[1] + right[r][0] * tl[r][1] - right[r][1] * tl[r][0]], [0, 0]);
    expect(Math.hypot(...overlap)).toBeCloseTo(2 * g, 5);
    expect(Math.hypot(...tl[0], ...tl[1])).toBeCloseTo(2 * g, 5);
  });
});

describe('ribbons approach the bulk', () => {
  it('a trivial QWZ ribbon stays inside the projected bulk bands and its band edges converge to them (common practice)', () => {
    const u = 2.6;
    const W = 30;
    const strip = solver(ribbon(qwz(), 1, W), { u });
    const bulk = solver(qwz(), { u });
    for (const k1 of [0, 0.8, 2.5]) {
      let lowMin = Infinity, lowMax = -Infinity, highMin = Infinity, highMax = -Infinity;
      for (let j = 0; j <= 200; j++) {
        const e = bulk.at([k1, (TAU * j) / 200 - Math.PI]).values;
        lowMin = Math.min(lowMin, e[0]); lowMax = Math.max(lowMax, e[0]);
        highMin = Math.min(highMin, e[1]); highMax = Math.max(highMax, e[1]);
      }
      const e = Array.from(strip.at([k1]).values);
      for (const x of e) expect((x >= lowMin - 1e-9 && x <= lowMax + 1e-9) || (x >= highMin - 1e-9 && x <= highMax + 1e-9)).toBe(true);
      const tol = 0.05;
      expect(e[0] - lowMin).toBeLessThan(tol);
      expect(lowMax - e[W - 1]).toBeLessThan(tol);
      expect(e[W] - highMin).toBeLessThan(tol);
      expect(highMax - e[2 * W - 1]).toBeLessThan(tol);
    }
  });

  it('a Chern QWZ ribbon has in-gap states on its edge layers (layer annotation)', () => {
    const W = 24;
    const model = ribbon(qwz(), 1, W);
    const strip = solver(model, { u: -1 });
    const { values, vectors } = strip.at([0.2]);
    const n = 2 * W;
    const mid = [W - 1, W]; // the two states nearest zero
    for (const b of mid) {
      expect(Math.abs(values[b])).toBeLessThan(0.5);
      let edge = 0;
      for (let r = 0; r < n; r++) {
        const layer = model.orbitals[r].layer!;
        if (layer < 4 || layer >= W - 4) edge += vectors[2 * (r * n + b)] ** 2 + vectors[2 * (r * n + b) + 1] ** 2;
      }
      expect(edge).toBeGreaterThan(0.9);
    }
  });
});

describe('two-band Weyl semimetal (common practice)', () => {
  it('closes its gap at (0, 0, ±k0) only, linearly', () => {
    const k0 = 1.1;
    const s = solver(twoBandWeyl(), { t: 1, m: 1, k0 });
    const gap = (k: number[]) => { const e = s.at(k).values; return e[1] - e[0]; };
    expect(gap([0, 0, k0])).toBeLessThan(1e-12);
    expect(gap([0, 0, -k0])).toBeLessThan(1e-12);
    expect(gap([1e-4, 0, k0]) / gap([5e-5, 0, k0])).toBeCloseTo(2, 3);
    const n = 10;
    let smallest = Infinity;
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) for (let l = 0; l < n; l++) {
      const k = [(TAU * i) / n - Math.PI + 0.1, (TAU * j) / n - Math.PI + 0.1, (TAU * l) / n - Math.PI + 0.1];
      smallest = Math.min(smallest, gap(k));
    }
    expect(smallest).toBeGreaterThan(0.05);
  });
});
