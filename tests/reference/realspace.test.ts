/**
 * Real-space samples and invariants (src/realspace) against sources outside the project: a Python
 * rewrite of the published generators, Bloch's theorem, published Chern numbers and numpy
 * (Debian's /usr/bin/python3) running the same algorithms on the same seeded samples.
 */
import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { blochHamiltonian } from '../../src/bloch/hamiltonian.js';
import { eigh } from '../../src/linalg/eigh.js';
import { bhz, haldane, kaneMele, qwz, ssh } from '../../src/model/catalogue.js';
import { bottIndex, bottOfSample } from '../../src/realspace/bott.js';
import { markerOfSample, localMarker } from '../../src/realspace/marker.js';
import { SeededRandom } from '../../src/realspace/random.js';
import { buildSample } from '../../src/realspace/sample.js';
import { setComputeBudget } from '../../src/cost.js';
import { compute } from '../../src/compute.js';
import type { PhaseMapResult } from '../../src/scan/sweep.js';
import { ModelError } from '../../src/model/errors.js';
import { disorderEnsemble, joinEnsembles } from '../../src/realspace/ensemble.js';
import { chernMarker } from '../../src/realspace/chern-marker.js';
import { chebyshevMarker } from '../../src/realspace/kpm-marker.js';
import { localDensity } from '../../src/realspace/ldos.js';
import { adjointMultiplyRect, compressDiagonal, multiplyAdjoint, multiplyRect } from '../../src/realspace/products.js';
import { matvec } from '../../src/realspace/sparse.js';
import { spinBottIndex } from '../../src/realspace/spin-bott.js';
import { toDense } from '../../src/realspace/sparse.js';
import { chainWinding } from '../../src/realspace/winding.js';
import { windingNumber } from '../../src/topology/chiral.js';

const PYTHON = '/usr/bin/python3';

function python(script: string, input: unknown = null): unknown {
  const run = spawnSync(PYTHON, ['-c', script], { input: JSON.stringify(input), encoding: 'utf8', env: { ...process.env, OPENBLAS_NUM_THREADS: '1' }, maxBuffer: 1 << 28 });
  if (run.status !== 0) throw new Error(`python failed: ${run.stderr}`);
  return JSON.parse(run.stdout);
}

describe('seeded generator', () => {
  it('matches a Python rewrite of splitmix64 seeding and xoshiro128** (Blackman & Vigna, ACM TOMS 47, 36 (2021))', () => {
    const script = String.raw`
import json, sys
M64 = (1 << 64) - 1
M32 = (1 << 32) - 1
def splitmix64(x):
    x = (x + 0x9e3779b97f4a7c15) & M64
    z = x
    z = ((z ^ (z >> 30)) * 0xbf58476d1ce4e5b9) & M64
    z = ((z ^ (z >> 27)) * 0x94d049bb133111eb) & M64
    return x, z ^ (z >> 31)
def rotl(x, k): return ((x << k) | (x >> (32 - k))) & M32
out = {}
for seed in json.load(sys.stdin):
    x, a = splitmix64(seed)
    x, b = splitmix64(x)
    s = [a & M32, a >> 32, b & M32, b >> 32]
    vals = []
    for _ in range(8):
        r = (rotl((s[1] * 5) & M32, 7) * 9) & M32
        t = (s[1] << 9) & M32
        s[2] ^= s[0]; s[3] ^= s[1]; s[1] ^= s[2]; s[0] ^= s[3]; s[2] ^= t; s[3] = rotl(s[3], 11)
        vals.append(r)
    out[str(seed)] = vals
print(json.dumps(out))
`;
    const seeds = [0, 1, 42, 2 ** 40 + 7, Number.MAX_SAFE_INTEGER];
    const theirs = python(script, seeds) as Record<string, number[]>;
    for (const seed of seeds) {
      const rng = new SeededRandom(seed);
      expect(Array.from({ length: 8 }, () => rng.nextUint32()), `seed ${seed}`).toEqual(theirs[String(seed)]);
    }
    const rng = new SeededRandom(3);
    let sum = 0;
    for (let i = 0; i < 100_000; i++) sum += rng.next();
    // mean of 1e5 uniforms: 0.5 within 5 standard errors (1/sqrt(12e5) = 9e-4) (common practice)
    expect(Math.abs(sum / 1e5 - 0.5)).toBeLessThan(5e-3);
  });
});

describe('samples', () => {
  const h = blochHamiltonian(qwz(), { u: -1 });

  it('a clean periodic L x L sample has the Bloch spectrum at k = 2 pi m / L (Bloch theorem)', () => {
    const L = 5;
    const s = buildSample(h, { sizes: [L, L], boundary: 'periodic' });
    expect(s.size).toBe(2 * L * L);
    const ours = eigh(s.size, toDense(s.hamiltonian)).values;
    const expected: number[] = [];
    const hk = new Float64Array(8);
    for (let m1 = 0; m1 < L; m1++) for (let m2 = 0; m2 < L; m2++) {
      h.fill([(2 * Math.PI * m1) / L, (2 * Math.PI * m2) / L], hk);
      expected.push(...eigh(2, hk).values);
    }
    expected.sort((a, b) => a - b);
    expected.forEach((e, i) => expect(Math.abs(ours[i] - e)).toBeLessThan(1e-12));
  });

  it('is Hermitian, reproducible from the seed, and keeps the stated distributions', () => {
    const opts = { sizes: [6, 7], onsiteDisorder: 2, bondDisorder: 0.4, vacancies: 0.1, displacement: 0.2, seed: 11 };
    const a = buildSample(h, opts), b = buildSample(h, opts);
    expect(a.hamiltonian.values).toEqual(b.hamiltonian.values);
    expect(a.positions).toEqual(b.positions);
    const c = buildSample(h, { ...opts, seed: 12 });
    expect(c.hamiltonian.values).not.toEqual(a.hamiltonian.values);
    const n = a.size;
    const d = toDense(a.hamiltonian);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
      expect(d[2 * (i * n + j)]).toBe(d[2 * (j * n + i)]);
      expect(d[2 * (i * n + j) + 1] + d[2 * (j * n + i) + 1]).toBe(0);
    }
    expect(a.size).toBe(2 * (42 - a.disorder.vacancies.removed));
    // the clean QWZ onsite energy is +-u = -+1; the potential stays within [-W/2, W/2] around it
    const clean = buildSample(h, { ...opts, onsiteDisorder: 0 });
    expect(clean.size).toBe(a.size);
    const dc = toDense(clean.hamiltonian);
    let spread = 0;
    for (let i = 0; i < n; i += 2) {
      const v = d[2 * (i * n + i)] - dc[2 * (i * n + i)];
      expect(Math.abs(v)).toBeLessThanOrEqual(1);
      // both orbitals of a site get the same potential
      expect(d[2 * ((i + 1) * n + i + 1)] - dc[2 * ((i + 1) * n + i + 1)]).toBeCloseTo(v, 14);
      spread = Math.max(spread, Math.abs(v));
    }
    expect(spread).toBeGreaterThan(0.5);
    // displaced positions stay within D/2 of the lattice positions (square lattice: reduced = Cartesian)
    for (let i = 0; i < 2 * n; i++) expect(Math.abs(a.positions[i] - a.cells[i])).toBeLessThanOrEqual(0.1);
  });
});

describe('parameter disorder', () => {
  it('draws each bond its own value of the named parameter, uniform in the stated window, reproducible and scaled with the width', () => {
    const h = blochHamiltonian(ssh(), { v: 1.2, w: 1 });
    const hopping = (W: number, seed = 3) => {
      const s = buildSample(h, { sizes: [50], parameterDisorder: { v: W }, seed });
      const d = toDense(s.hamiltonian);
      const n = s.size;
      const at = (i: number, j: number) => d[2 * (i * n + j)];
      // orbitals in cell order, A then B: H[B_m, A_m] = v_m, H[A_{m+1}, B_m] = w (the model's terms)
      return { intra: Array.from({ length: 50 }, (_, m) => at(2 * m + 1, 2 * m)), inter: Array.from({ length: 49 }, (_, m) => at(2 * m + 2, 2 * m + 1)), s };
    };
    const one = hopping(2), two = hopping(4);
    for (const v of one.intra) expect(Math.abs(v - 1.2)).toBeLessThanOrEqual(1);
    expect(new Set(one.intra).size).toBe(50);
    expect(Math.max(...one.intra) - Math.min(...one.intra)).toBeGreaterThan(1.5);
    for (const w of one.inter) expect(w).toBe(1);
    one.intra.forEach((v, m) => expect(two.intra[m] - 1.2).toBeCloseTo(2 * (v - 1.2), 12));
    expect(hopping(2).intra).toEqual(one.intra);
    expect(hopping(2, 4).intra).not.toEqual(one.intra);
    expect(one.s.disorder.parameters.widths).toEqual({ v: 2 });
    expect(one.s.disorder.parameters.distribution).toMatch(/v uniform in \[v - 1, v \+ 1\]/);
    // the bond draws (stream 0) and the parameter draws (stream 2) do not disturb each other
    const both = buildSample(h, { sizes: [50], parameterDisorder: { v: 2 }, bondDisorder: 0.3, seed: 3 });
    expect(both.disorder.bond.width).toBe(0.3);
    const bondOnly = toDense(buildSample(h, { sizes: [50], bondDisorder: 0.3, seed: 3 }).hamiltonian);
    const dBoth = toDense(both.hamiltonian);
    for (let m = 0; m < 50; m++) {
      const k = 2 * ((2 * m + 1) * 100 + 2 * m);
      expect(dBoth[k]).toBeCloseTo(one.intra[m] * (bondOnly[k] / 1.2), 12);
    }
  });

  it('a parameter of terms within one site is drawn once per site: QWZ mass disorder keeps +u_i and -u_i on the two orbitals', () => {
    const h = blochHamiltonian(qwz(), { u: -1 });
    const s = buildSample(h, { sizes: [6, 6], parameterDisorder: { u: 1.5 }, seed: 2 });
    const clean = toDense(buildSample(h, { sizes: [6, 6] }).hamiltonian);
    const d = toDense(s.hamiltonian);
    const n = s.size;
    const masses = new Set<number>();
    for (let i = 0; i < n; i += 2) {
      const u = d[2 * (i * n + i)];
      expect(d[2 * ((i + 1) * n + i + 1)]).toBeCloseTo(-u, 14);
      expect(Math.abs(u - -1)).toBeLessThanOrEqual(0.75);
      masses.add(u);
    }
    expect(masses.size).toBe(36);
    // hoppings do not depend on u: unchanged
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (Math.floor(i / 2) !== Math.floor(j / 2)) expect(d[2 * (i * n + j)]).toBe(clean[2 * (i * n + j)]);
  });
});

describe('dense products (blocked) against the textbook sums', () => {
  it('A B, A^dagger B, A B^dagger and Psi^dagger D Psi on odd sizes across block edges', () => {
    const rng = new SeededRandom(9);
    const rand = (len: number) => Float64Array.from({ length: 2 * len }, () => rng.centred(2));
    const at = (x: Float64Array, cols: number, i: number, j: number): [number, number] => [x[2 * (i * cols + j)], x[2 * (i * cols + j) + 1]];
    const close = (got: [number, number], want: [number, number]) => expect(Math.hypot(got[0] - want[0], got[1] - want[1])).toBeLessThan(1e-12);
    const [p, q, r] = [19, 35, 17];
    const a = rand(p * q), b = rand(q * r), c = rand(q * p);
    const ab = multiplyRect(p, q, r, a, b, new Float64Array(2 * p * r));
    const cb = adjointMultiplyRect(p, q, r, c, b, new Float64Array(2 * p * r));
    for (let i = 0; i < p; i++) for (let j = 0; j < r; j++) {
      let [x, y, u, v] = [0, 0, 0, 0];
      for (let k = 0; k < q; k++) {
        const [ar, ai] = at(a, q, i, k), [br, bi] = at(b, r, k, j), [cr, ci] = at(c, p, k, i);
        x += ar * br - ai * bi; y += ar * bi + ai * br;
        u += cr * br + ci * bi; v += cr * bi - ci * br;
      }
      close(at(ab, r, i, j), [x, y]);
      close(at(cb, r, i, j), [u, v]);
    }
    const m = 21, s1 = rand(m * m), s2 = rand(m * m);
    const sh = multiplyAdjoint(m, s1, s2, new Float64Array(2 * m * m));
    for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) {
      let [x, y] = [0, 0];
      for (let k = 0; k < m; k++) {
        const [ar, ai] = at(s1, m, i, k), [br, bi] = at(s2, m, j, k);
        x += ar * br + ai * bi; y += ai * br - ar * bi;
      }
      close(at(sh, m, i, j), [x, y]);
    }
    const n = 23, psi = rand(n * m), dr = Float64Array.from({ length: n }, () => rng.centred(2)), di = Float64Array.from({ length: n }, () => rng.centred(2));
    const comp = compressDiagonal(n, m, psi, dr, di, new Float64Array(2 * m * m));
    for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) {
      let [x, y] = [0, 0];
      for (let k = 0; k < n; k++) {
        const [pr, pi] = at(psi, m, k, i), [qr, qi] = at(psi, m, k, j);
        const [tr, ti] = [dr[k] * qr - di[k] * qi, dr[k] * qi + di[k] * qr];
        x += pr * tr + pi * ti; y += pr * ti - pi * tr;
      }
      close(at(comp, m, i, j), [x, y]);
    }
  });
});

describe('dense invariants', () => {
  it('Bott index = Chern number of the Qi–Wu–Zhang model in each phase (Qi, Wu & Zhang, PRB 74, 085308 (2006); values in shared/references.md)', () => {
    const published: [number, number][] = [[-3, 0], [-1.5, 1], [-0.5, 1], [0.5, -1], [1.5, -1], [3, 0]];
    for (const [u, c] of published) {
      const r = bottIndex(blochHamiltonian(qwz(), { u }), { sizes: [10, 10] });
      expect(r.bott, `u = ${u}, open 10x10`).toBe(c);
      expect(Math.abs(r.raw! - c)).toBeLessThan(1e-9);
      expect(r.checks.gapless).toBe(false);
    }
    const p = bottIndex(blochHamiltonian(qwz(), { u: -1 }), { sizes: [8, 8], boundary: 'periodic' });
    expect(p.bott).toBe(1);
    // a clean periodic sample keeps the bulk gap (|2 - |u|| * 2 = 2 at u = -1, reached at k = 0 on an 8x8 grid)
    expect(p.checks.spectralGap).toBeCloseTo(2, 9);
    expect(p.checks.minEigenvalueModulus).toBeGreaterThan(0.5);
  });

  it('Bott index = Chern number of the Haldane model: -sign(sin phi) inside |M| < 3 sqrt3 t2 |sin phi|, 0 outside (Haldane, PRL 61, 2015 (1988))', () => {
    expect(bottIndex(blochHamiltonian(haldane(), { t2: 0.1, phi: Math.PI / 2, M: 0.2 }), { sizes: [10, 10] }).bott).toBe(-1);
    expect(bottIndex(blochHamiltonian(haldane(), { t2: 0.1, phi: -Math.PI / 2, M: 0.2 }), { sizes: [10, 10] }).bott).toBe(1);
    expect(bottIndex(blochHamiltonian(haldane(), { t2: 0.1, phi: Math.PI / 2, M: 1 }), { sizes: [10, 10] }).bott).toBe(0);
  });

  it('spin Bott index: |1| in the quantum spin Hall phase, 0 outside (Kane & Mele, PRL 95, 226801 (2005); BHZ, Science 314, 1757 (2006); method of Huang & Liu, PRL 120, 126401 (2018))', () => {
    const km = (lambda_v: number) => spinBottIndex(blochHamiltonian(kaneMele(), { lambda_SO: 0.06, lambda_R: 0, lambda_v }), { sizes: [8, 8] });
    const topological = km(0.1);
    expect(Math.abs(topological.spinBott!)).toBe(1);
    // time reversal: the two sectors carry opposite Bott indices
    expect(topological.sectorBott![0]).toBe(-topological.sectorBott![1]);
    expect(topological.checks.spinGap).toBeGreaterThan(0.5);
    expect(km(0.5).spinBott).toBe(0); // |lambda_v| > 3 sqrt3 lambda_SO = 0.312
    for (const [M, z2] of [[-1, 0], [1, 1], [3, 1], [9, 0]]) {
      expect(Math.abs(spinBottIndex(blochHamiltonian(bhz(), { M }), { sizes: [8, 8] }).spinBott!), `BHZ M/B = ${M}`).toBe(z2);
    }
    expect(() => spinBottIndex(blochHamiltonian(qwz()), { sizes: [4, 4] })).toThrow(/model: .*spins/);
  });

  it('chain winding of SSH: 1 for |v| < |w|, 0 for |v| > |w| (Su, Schrieffer & Heeger, PRL 42, 1698 (1979)), same sign as the k-space winding', () => {
    for (const v of [0.5, 1.5]) {
      const h = blochHamiltonian(ssh(), { v, w: 1 });
      const k = windingNumber(h).winding!;
      expect(Math.abs(k)).toBe(v < 1 ? 1 : 0);
      for (const boundary of ['open', 'periodic'] as const) {
        const r = chainWinding(h, { sizes: [40], boundary });
        expect(r.nearestInteger, `v = ${v} ${boundary}`).toBe(k);
        expect(Math.abs(r.winding! - k)).toBeLessThan(1e-4);
      }
    }
    // open topological chain: two end modes at zero energy (Su, Schrieffer & Heeger)
    expect(chainWinding(blochHamiltonian(ssh(), { v: 0.5, w: 1 }), { sizes: [40] }).checks.zeroModes).toBe(2);
    // bond disorder keeps chiral symmetry (Mondragon-Shem et al., PRL 113, 046802 (2014)); onsite disorder breaks it
    expect(chainWinding(blochHamiltonian(ssh(), { v: 0.5, w: 1 }), { sizes: [60], bondDisorder: 0.8, seed: 4 }).nearestInteger).toBe(1);
    const broken = chainWinding(blochHamiltonian(ssh(), { v: 0.5, w: 1 }), { sizes: [20], onsiteDisorder: 0.5 });
    expect(broken.winding).toBeNull();
    expect(broken.checks.warnings.join()).toMatch(/chiral symmetry is broken/);
  });

  it('local marker: the bulk of a clean flake gives C, the whole open flake sums to 0 (Bianco & Resta, PRB 84, 241106(R) (2011))', () => {
    for (const [u, c] of [[-1, 1], [1, -1], [-3, 0]]) {
      const r = localMarker(blochHamiltonian(qwz(), { u }), { sizes: [16, 16] });
      expect(Math.abs(r.total!)).toBeLessThan(1e-8);
      // tolerance 1e-3 at 5 or more cells from the edge (correlation length ~ 1 cell at |u| = 1)
      r.marker.forEach((x, i) => { if (r.edgeDistance[i] >= 5) expect(Math.abs(x - c), `u = ${u}, cell ${i}`).toBeLessThan(1e-3); });
    }
  });

  it('Bott index and local marker agree with numpy running the same algorithms on the same seeded disordered sample', () => {
    const h = blochHamiltonian(qwz(), { u: -1 });
    const sample = buildSample(h, { sizes: [8, 9], onsiteDisorder: 3, bondDisorder: 0.3, vacancies: 0.05, displacement: 0.1, seed: 77 });
    const bott = bottOfSample(sample);
    const marker = markerOfSample(sample, {}, null);
    const script = String.raw`
import json, sys
import numpy as np
d = json.load(sys.stdin)
n = d['n']
H = np.zeros((n, n), complex)
v = np.array(d['values']); rs = d['rowStart']; cols = d['columns']
for i in range(n):
    for e in range(rs[i], rs[i + 1]):
        H[i, cols[e]] = v[2 * e] + 1j * v[2 * e + 1]
pos = np.array(d['positions']).reshape(n, 2)
E, W = np.linalg.eigh(H)
m = n // 2
P = W[:, :m] @ W[:, :m].conj().T
Q = np.eye(n) - P
L1, L2 = d['sizes']
U = np.diag(np.exp(2j * np.pi * pos[:, 0] / L1)); V = np.diag(np.exp(2j * np.pi * pos[:, 1] / L2))
u = W[:, :m].conj().T @ U @ W[:, :m]; w = W[:, :m].conj().T @ V @ W[:, :m]
lam = np.linalg.eigvals(w @ u @ w.conj().T @ u.conj().T)
bott = np.sum(np.angle(lam)) / (2 * np.pi)
X = np.diag(pos[:, 0]); Y = np.diag(pos[:, 1])
local = -4 * np.pi * np.imag(np.diag(P @ X @ Q @ Y @ P))
cells = np.array(d['cells']).reshape(n, 2)
marker = np.zeros(L1 * L2)
for r in range(n):
    marker[cells[r, 0] + L1 * cells[r, 1]] += local[r]
print(json.dumps({'bott': bott, 'marker': marker.tolist(), 'fermi': (E[m - 1] + E[m]) / 2}))
`;
    const theirs = python(script, {
      n: sample.size, values: Array.from(sample.hamiltonian.values), rowStart: Array.from(sample.hamiltonian.rowStart),
      columns: Array.from(sample.hamiltonian.columns), positions: Array.from(sample.positions), cells: Array.from(sample.cells), sizes: sample.sizes,
    }) as { bott: number; marker: number[]; fermi: number };
    expect(bott.bott).not.toBeNull();
    expect(Math.abs(bott.raw! - theirs.bott)).toBeLessThan(1e-8);
    expect(bott.checks.fermiEnergy).toBeCloseTo(theirs.fermi, 10);
    theirs.marker.forEach((x, c) => expect(Math.abs(marker.marker[c] - x), `cell ${c}`).toBeLessThan(1e-8));
  });
});

describe('kernel polynomial method (Weisse, Wellein, Alvermann & Fehske, RMP 78, 275 (2006))', () => {
  const h = blochHamiltonian(qwz(), { u: -1 });

  it('the sparse product equals the dense one', () => {
    const sample = buildSample(h, { sizes: [5, 4], onsiteDisorder: 1, bondDisorder: 0.5, boundary: ['periodic', 'open'], seed: 8 });
    const n = sample.size, d = toDense(sample.hamiltonian);
    const rng = new SeededRandom(1);
    const x = Float64Array.from({ length: 2 * n }, () => rng.centred(2));
    const y = matvec(sample.hamiltonian, x, new Float64Array(2 * n), 0.3, 2);
    for (let i = 0; i < n; i++) {
      let re = -0.3 * x[2 * i], im = -0.3 * x[2 * i + 1];
      for (let j = 0; j < n; j++) {
        re += d[2 * (i * n + j)] * x[2 * j] - d[2 * (i * n + j) + 1] * x[2 * j + 1];
        im += d[2 * (i * n + j)] * x[2 * j + 1] + d[2 * (i * n + j) + 1] * x[2 * j];
      }
      expect(Math.abs(y[2 * i] - re / 2) + Math.abs(y[2 * i + 1] - im / 2)).toBeLessThan(1e-13);
    }
  });

  it('LDOS by the Chebyshev recursion equals the same damped series on the exact eigenpairs; the stochastic map lies within its error bars', () => {
    const base = { sizes: [10, 10], onsiteDisorder: 1, seed: 5, energy: 0.1, order: 128 };
    const cells = [[5, 5], [0, 5], [2, 3]];
    const kpm = localDensity(h, { ...base, cells });
    const dense = localDensity(h, { ...base, cells, method: 'dense' });
    kpm.density.forEach((x, c) => expect(Math.abs(x - dense.density[c])).toBeLessThan(1e-10 * Math.max(1, dense.density[c])));
    const exact = localDensity(h, { ...base, method: 'dense' });
    const map = localDensity(h, { ...base, probes: 64 });
    expect(map.method).toBe('chebyshev-stochastic');
    // 100 cells: every deviation within 5 standard errors (common practice for a stochastic trace)
    map.density.forEach((x, c) => expect(Math.abs(x - exact.density[c]) / map.standardError![c], `cell ${c}`).toBeLessThan(5));
  });

  it('LDOS in the bulk gap lives on the edge of a Chern insulator flake (bulk–boundary correspondence, common practice)', () => {
    const r = localDensity(h, { sizes: [16, 16], energy: 0.2, order: 256, cells: [[8, 8], [0, 8], [8, 15]] });
    expect(r.density[1]).toBeGreaterThan(100 * r.density[0]);
    expect(r.density[2]).toBeGreaterThan(100 * r.density[0]);
  });

  it('Chebyshev local marker agrees with the dense marker on a disordered flake, and is C in the bulk of a clean one', () => {
    const opts = { sizes: [16, 16], onsiteDisorder: 2, seed: 5, fermiEnergy: 0 };
    const cells = [[8, 8], [5, 9], [3, 8]];
    const dense = localMarker(h, { ...opts, cells });
    const kpm = chebyshevMarker(h, { ...opts, cells, order: 1000 });
    kpm.marker.forEach((x, c) => expect(Math.abs(x - dense.marker[c]), `cell ${cells[c]}`).toBeLessThan(1e-3));
    expect(kpm.checks.orderChange).toBeLessThan(1e-2);
    // clean 40x40 flake, centre 20 cells from the edge: C = +1 at u = -1 (Qi, Wu & Zhang), tolerance 1e-3
    const clean = chebyshevMarker(h, { sizes: [40, 40], order: 600 });
    expect(clean.checks.fermiRule).toMatch(/clean crystal/);
    expect(clean.fermiEnergy).toBeCloseTo(0, 12);
    expect(Math.abs(clean.marker[0] - 1)).toBeLessThan(1e-3);
    expect(clean.checks.warnings).toEqual([]);
  });

  it('one marker diagnostic: dense for small samples, Chebyshev above 2000 orbitals; a vacant cell has no marker', () => {
    expect(chernMarker(h, { sizes: [6, 6] }).method).toBe('dense');
    const big = chernMarker(h, { sizes: [40, 40], order: 100 });
    expect(big.method).toBe('chebyshev');
    expect(Array.from(big.cells)).toEqual([20, 20]);
    const holes = chernMarker(h, { sizes: [12, 12], vacancies: 0.5, seed: 1, method: 'chebyshev', order: 50, cells: [[0, 0], [1, 0], [2, 0], [3, 0], [4, 0], [5, 0]] });
    const vacant = Array.from(holes.marker).filter(Number.isNaN).length;
    expect(vacant).toBeGreaterThan(0);
    expect(holes.checks.warnings.filter((w) => /is vacant/.test(w))).toHaveLength(vacant);
  });
});

describe('ensembles', () => {
  const h = blochHamiltonian(qwz(), { u: -1 });

  it('strong disorder drives the averaged Bott index to 0, weak disorder keeps C = 1 (common practice: Anderson localisation of every state)', () => {
    const weak = disorderEnsemble(h, { of: 'bott', sizes: [10, 10], onsiteDisorder: 1, samples: 6 });
    expect(weak.mean).toBe(1);
    expect(weak.standardError).toBe(0);
    const strong = disorderEnsemble(h, { of: 'bott', sizes: [10, 10], onsiteDisorder: 20, samples: 6 });
    expect(Math.abs(strong.mean!)).toBeLessThan(0.2);
    expect(weak.checks.warnings.join()).not.toMatch(/disagree/);
    expect(Array.from(strong.seeds)).toEqual([0, 1, 2, 3, 4, 5]);
  });

  it('shards resume by member index and join to the unsplit ensemble', () => {
    const opts = { of: 'local-marker' as const, method: 'chebyshev' as const, sizes: [12, 12], onsiteDisorder: 4, order: 200, seed: 40 };
    const whole = disorderEnsemble(h, { ...opts, samples: 5 });
    const joined = joinEnsembles([disorderEnsemble(h, { ...opts, first: 3, samples: 2 }), disorderEnsemble(h, { ...opts, samples: 3 })]);
    expect(joined.values).toEqual(whole.values);
    expect(joined.seeds).toEqual(whole.seeds);
    expect(joined.mean).toBe(whole.mean);
    expect(joined.standardError).toBe(whole.standardError);
    const mean = Array.from(whole.values).reduce((a, b) => a + b, 0) / 5;
    const sd = Math.sqrt(Array.from(whole.values).reduce((a, b) => a + (b - mean) ** 2, 0) / 4);
    expect(whole.standardError).toBeCloseTo(sd / Math.sqrt(5), 14);
  });
});

describe('a disorder-driven transition: the topological Anderson insulator of a chiral chain', () => {
  // Mondragon-Shem, Hughes, Song & Prodan, PRL 113, 046802 (2014): in a chiral chain with hoppings
  // v_m (intracell) and w_m (intercell) the winding changes where the localisation length of the
  // E = 0 state diverges, <ln|v_m|> = <ln|w_m|>. For v_m uniform in [v - W/2, v + W/2] the average is
  // closed-form, (F(v + W/2) - F(v - W/2)) / W with F(x) = x ln|x| - x (evaluated here; the model's
  // values and widths are our own choice). A clean chain with v = 1.2 > w = 1 is trivial; disorder in
  // v alone opens a window of winding 1 between the two roots W1 ~ 2.12 and W2 ~ 4.76.
  const F = (x: number) => (x === 0 ? 0 : x * Math.log(Math.abs(x)) - x);
  const margin = (W: number) => -(F(1.2 + W / 2) - F(1.2 - W / 2)) / W; // <ln|w|> - <ln|v|>, w = 1
  const root = (a: number, b: number) => {
    for (let i = 0; i < 60; i++) {
      const m = (a + b) / 2;
      if (Math.sign(margin(m)) === Math.sign(margin(a))) a = m;
      else b = m;
    }
    return (a + b) / 2;
  };
  const [W1, W2] = [root(1, 3), root(3, 7)];

  it('the averaged real-space winding is 0 outside the published window and 1 inside, each beyond 3 standard errors', () => {
    expect(W1).toBeGreaterThan(2);
    expect(W2).toBeLessThan(5);
    // Points half a unit outside each edge, the middle, and one unit inside the upper edge (its
    // localisation length 1/|margin| is longer: 1/0.15 there, at most 1/0.09 at the others, vs 200 cells).
    for (const W of [W1 - 0.5, W1 + 0.5, (W1 + W2) / 2, W2 - 1, W2 + 0.75]) {
      const e = compute({ kind: 'ensemble', model: ssh(), params: { v: 1.2, w: 1 }, of: 'chain-winding', sizes: [200], boundary: 'periodic', parameterDisorder: { v: W }, samples: 16 }) as unknown as { mean: number; standardError: number };
      const inside = margin(W) > 0;
      expect(Math.abs(margin(W)), `W = ${W}`).toBeGreaterThanOrEqual(0.09);
      expect(inside ? e.mean - 0.5 : 0.5 - e.mean, `W = ${W}: mean ${e.mean} +- ${e.standardError}`).toBeGreaterThan(3 * e.standardError);
      if (W === (W1 + W2) / 2) expect(Math.abs(e.mean - 1), `middle of the window: ${e.mean} +- ${e.standardError}`).toBeLessThan(Math.max(3 * e.standardError, 0.02));
    }
  });

  it('at the edge of the window the members round to different integers, and the ensemble says its mean is no invariant', () => {
    const e = compute({ kind: 'ensemble', model: ssh(), params: { v: 1.2, w: 1 }, of: 'chain-winding', sizes: [60], boundary: 'periodic', parameterDisorder: { v: W2 }, samples: 8 }) as unknown as { values: Float64Array; checks: { warnings: string[] } };
    const rounded = Array.from(e.values).map(Math.round);
    expect(new Set(rounded).size, `members ${rounded}`).toBeGreaterThan(1);
    expect(e.checks.warnings.join()).toMatch(/the members disagree \(\d+ near 0, \d+ near 1\): the mean is a fraction, not an invariant/);
  });

  it('the same relative disorder on every bond (bondDisorder) moves no boundary: the clean trivial chain stays trivial', () => {
    // <ln|v(1 + d)|> - <ln|w(1 + d)|> = ln(v / w) whatever the width: no window (same criterion).
    const e = compute({ kind: 'ensemble', model: ssh(), params: { v: 1.2, w: 1 }, of: 'chain-winding', sizes: [200], boundary: 'periodic', bondDisorder: 1.5, samples: 8 }) as unknown as { mean: number; standardError: number };
    expect(Math.abs(e.mean)).toBeLessThan(Math.max(3 * e.standardError, 0.02));
  });
});

describe('bad input: a ModelError naming the field, nothing built', () => {
  const h = blochHamiltonian(qwz(), { u: -1 });
  const field = (f: () => unknown): string => {
    try {
      f();
    } catch (err) {
      expect(err).toBeInstanceOf(ModelError);
      expect((err as Error).message.startsWith(`${(err as ModelError).field}: `)).toBe(true);
      return (err as Error).message;
    }
    throw new Error('no error');
  };

  it('refuses negative disorder, non-integer seeds, bad sizes and options', () => {
    expect(field(() => bottIndex(h, { sizes: [6, 6], onsiteDisorder: -1 }))).toMatch(/^onsiteDisorder: .*Value: -1/);
    expect(field(() => bottIndex(h, { sizes: [6, 6], seed: 1.5 }))).toMatch(/^seed: .*Value: 1.5/);
    expect(field(() => bottIndex(h, { sizes: [6, 6], seed: -2 }))).toMatch(/^seed: /);
    expect(field(() => bottIndex(h, { sizes: [6, 0] }))).toMatch(/^sizes\[1\]: .*Value: 0/);
    expect(field(() => bottIndex(h, { sizes: [6] }))).toMatch(/^sizes: /);
    expect(field(() => bottIndex(h, { sizes: [6, 6], vacancies: 1 }))).toMatch(/^vacancies: /);
    expect(field(() => bottIndex(h, { sizes: [6, 6], boundary: 'twisted' as 'open' }))).toMatch(/^boundary: /);
    expect(field(() => chebyshevMarker(h, { sizes: [6, 6], order: 1.5 }))).toMatch(/^order: /);
    expect(field(() => localMarker(h, { sizes: [6, 6], cells: [[6, 0]] }))).toMatch(/^cells\[0\]: /);
    expect(field(() => disorderEnsemble(h, { of: 'chern' as 'bott', sizes: [4, 4], samples: 2 }))).toMatch(/^of: /);
    expect(field(() => chainWinding(blochHamiltonian(ssh()), { sizes: [10], window: 0 }))).toMatch(/^window: /);
    expect(field(() => bottIndex(h, { sizes: [6, 6], parameterDisorder: { m: 1 } }))).toMatch(/^parameterDisorder\.m: model "Qi–Wu–Zhang.*" has no parameter "m" \(it has: u\)/);
    expect(field(() => bottIndex(h, { sizes: [6, 6], parameterDisorder: { u: -1 } }))).toMatch(/^parameterDisorder\.u: expected a nonnegative number\. Value: -1/);
    expect(field(() => bottIndex(h, { sizes: [6, 6], parameterDisorder: [1] as unknown as Record<string, number> }))).toMatch(/^parameterDisorder: expected an object/);
  });

  it('refuses a Fermi energy or an energy outside the spectrum', () => {
    expect(field(() => bottIndex(h, { sizes: [6, 6], fermiEnergy: 10 }))).toMatch(/^fermiEnergy: outside the sample's spectrum .*Value: 10/);
    expect(field(() => chebyshevMarker(h, { sizes: [6, 6], fermiEnergy: -50 }))).toMatch(/^fermiEnergy: outside/);
    expect(field(() => localDensity(h, { sizes: [6, 6], energy: 99 }))).toMatch(/^energy: outside/);
  });

  it('refuses a sample too large for the budget, with the estimate and the largest that fits, before building it', () => {
    const previous = setComputeBudget({ memoryBytes: 64 * 2 ** 20 });
    try {
      const message = field(() => bottIndex(h, { sizes: [40, 40] }));
      expect(message).toMatch(/^sizes: the dense Bott index on 40x40 cells needs about .* more than the budget of 64.0 MiB; the largest sample of this shape that fits is (\d+)x\1 cells/);
      const fits = Number(/fits is (\d+)x/.exec(message)![1]);
      expect(fits).toBeGreaterThan(5);
      expect(fits).toBeLessThan(40);
      expect(() => bottIndex(h, { sizes: [fits, fits], fermiEnergy: 0.01 })).not.toThrow();
      expect(field(() => chebyshevMarker(h, { sizes: [2000, 2000] }))).toMatch(/^sizes: the Chebyshev local marker on 2000x2000 cells/);
    } finally {
      setComputeBudget(previous);
    }
  });

  it('gives no invariant when an eigenvalue sits at the Fermi energy', () => {
    // a clean periodic QWZ sample at u = -1 has eigenvalues +-1 at k = (pi, 0): E_F = 1 lies on one
    const r = bottIndex(h, { sizes: [4, 4], boundary: 'periodic', fermiEnergy: 1 });
    expect(r.bott).toBeNull();
    expect(r.checks.gapless).toBe(true);
    expect(r.checks.warnings.join()).toMatch(/eigenvalue lies at the Fermi energy/);
  });
});

describe('disorder phase maps through the one request (a swept option: the disorder strength)', () => {
  // QWZ C = +1 at u = -1 and 0 at u = -3 (Qi, Wu & Zhang, PRB 74, 085308 (2006); references.md sign
  // convention), so the clean Bott index is 1 and 0 there; strong disorder localises every state and
  // the averaged index goes to 0 (common practice).
  const request = {
    kind: 'phase-map' as const, model: qwz(), quantity: 'ensemble' as const, of: 'bott', samples: 3, sizes: [8, 8], seed: 7,
    axes: [{ param: 'onsiteDisorder', from: 0, to: 30, count: 2 }, { param: 'u', from: -1, to: -3, count: 2 }],
  };

  it('maps the averaged Bott index over (W, u): 1 and 0 when clean, near 0 when W is large; a continuous map', () => {
    const map = compute(request) as PhaseMapResult;
    expect(map.quantised).toBe(false);
    const at = (w: number, u: number) => map.values[u * 2 + w];
    expect(at(0, 0)).toBe(1);
    expect(at(0, 1)).toBe(0);
    expect(Math.abs(at(1, 0)!)).toBeLessThan(0.5);
    expect(() => compute({ ...request, refine: { tolerance: 0.1 } })).toThrow(/^refine: /);
  });

  it('gives each point the numbers a cell computes for the same seeded samples', () => {
    const map = compute(request) as PhaseMapResult;
    const cell = compute({ kind: 'ensemble', model: qwz(), params: { u: -1 }, of: 'bott', samples: 3, sizes: [8, 8], seed: 7, onsiteDisorder: 30 }) as unknown as { mean: number };
    expect(map.values[1]).toBe(cell.mean);
  });

  it('sweeps one width of parameterDisorder ("parameterDisorder.v"), keeping the widths it does not sweep', () => {
    const chain = { kind: 'phase-map' as const, model: ssh(), params: { v: 1.2, w: 1 }, quantity: 'ensemble' as const, of: 'chain-winding', samples: 2, sizes: [40], boundary: 'periodic', parameterDisorder: { w: 0.5 } };
    const map = compute({ ...chain, axes: [{ param: 'parameterDisorder.v', from: 0, to: 3, count: 2 }] }) as PhaseMapResult;
    const cell = compute({ kind: 'ensemble', model: ssh(), params: { v: 1.2, w: 1 }, of: 'chain-winding', samples: 2, sizes: [40], boundary: 'periodic', parameterDisorder: { v: 3, w: 0.5 } }) as unknown as { mean: number };
    expect(map.values[1]).toBe(cell.mean);
    expect(Math.abs(map.values[0]!)).toBeLessThan(0.01); // v = 1.2 > w = 1 with little disorder: trivial
  });

  it('refuses an axis that is neither a model parameter nor an option of the swept kind, naming it', () => {
    expect(() => compute({ ...request, axes: [{ param: 'onsiteDisorderr', from: 0, to: 1, count: 2 }] })).toThrow(/^axes\[0\]\.param: .*no parameter "onsiteDisorderr"/);
    expect(() => compute({ ...request, axes: [{ param: 'parameterDisorder.m', from: 0, to: 1, count: 2 }] })).toThrow(/^axes\[0\]\.param: expected "option\.parameter" .*parameters: u\)\. Value: "parameterDisorder\.m"/);
  });
});
