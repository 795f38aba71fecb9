import { describe, expect, it } from 'vitest';
import { blochHamiltonian, eigh, lattice, ModelError } from '../../src/index.js';

// Qi–Wu–Zhang, H = sin kx sx + sin ky sy + (u + cos kx + cos ky) sz (Qi, Wu, Zhang, PRB 74, 085308 (2006)).
function qwz() {
  return lattice('QWZ', [[1, 0], [0, 1]])
    .parameter('u', { default: -1, range: [-4, 4] })
    .site('a', [0, 0]).site('b', [0, 0])
    .onsite('a', 'u').onsite('b', '-u')
    .hop('a', 'a', [1, 0], 0.5).hop('b', 'b', [1, 0], -0.5)
    .hop('a', 'a', [0, 1], 0.5).hop('b', 'b', [0, 1], -0.5)
    // H_ab = sin kx - i sin ky = i/2 e^{-ikx} - i/2 e^{ikx} + 1/2 e^{-iky} - 1/2 e^{iky}. A term on
    // cell R adds t e^{-ik·R} to H_{to,from} and its partner t* e^{+ik·R} to H_{from,to}.
    .hop('b', 'a', [1, 0], { re: 0, im: 0.5 }).hop('a', 'b', [1, 0], { re: 0, im: 0.5 })
    .hop('b', 'a', [0, 1], 0.5).hop('a', 'b', [0, 1], -0.5)
    .build();
}

describe('Bloch Hamiltonian of the Qi–Wu–Zhang model', () => {
  it('matches the closed form at random k (Qi, Wu, Zhang 2006)', () => {
    const h = blochHamiltonian(qwz(), { u: 0.7 });
    const out = new Float64Array(8);
    for (let trial = 0; trial < 20; trial++) {
      const kx = (Math.random() * 2 - 1) * Math.PI, ky = (Math.random() * 2 - 1) * Math.PI;
      h.fill([kx, ky], out);
      const dz = 0.7 + Math.cos(kx) + Math.cos(ky);
      // H = [[dz, sin kx - i sin ky], [sin kx + i sin ky, -dz]]
      expect(out[0]).toBeCloseTo(dz, 12);
      expect(out[6]).toBeCloseTo(-dz, 12);
      expect(out[2]).toBeCloseTo(Math.sin(kx), 12);
      expect(out[3]).toBeCloseTo(-Math.sin(ky), 12);
      expect(out[4]).toBeCloseTo(Math.sin(kx), 12);
      expect(out[5]).toBeCloseTo(Math.sin(ky), 12);
      const { values } = eigh(2, out);
      const d = Math.hypot(Math.sin(kx), Math.sin(ky), dz);
      expect(values[0]).toBeCloseTo(-d, 12);
      expect(values[1]).toBeCloseTo(d, 12);
    }
  });

  it('its resolved terms rebuild the closed form at random k (Qi, Wu, Zhang 2006)', () => {
    const t = blochHamiltonian(qwz(), { u: 0.7 }).hoppings();
    for (let trial = 0; trial < 10; trial++) {
      const k = [(Math.random() * 2 - 1) * Math.PI, (Math.random() * 2 - 1) * Math.PI];
      // H_{to,from} += t e^{-ik·R}, plus the Hermitian partner for every non-onsite term.
      const hr = [[0, 0], [0, 0]], hi = [[0, 0], [0, 0]];
      for (let i = 0; i < t.count; i++) {
        const phi = -(k[0] * t.cells[2 * i] + k[1] * t.cells[2 * i + 1]);
        const re = t.re[i] * Math.cos(phi) - t.im[i] * Math.sin(phi), im = t.re[i] * Math.sin(phi) + t.im[i] * Math.cos(phi);
        const [a, b] = [t.from[i], t.to[i]];
        hr[b][a] += re; hi[b][a] += im;
        if (!(a === b && t.cells[2 * i] === 0 && t.cells[2 * i + 1] === 0)) { hr[a][b] += re; hi[a][b] -= im; }
      }
      const dz = 0.7 + Math.cos(k[0]) + Math.cos(k[1]);
      expect(hr[0][0]).toBeCloseTo(dz, 12);
      expect(hr[1][1]).toBeCloseTo(-dz, 12);
      expect(hr[1][0]).toBeCloseTo(Math.sin(k[0]), 12);
      expect(hi[1][0]).toBeCloseTo(Math.sin(k[1]), 12);
    }
  });

  it('derivative equals a central finite difference', () => {
    const h = blochHamiltonian(qwz(), { u: -1.3 });
    const d = new Float64Array(8), plus = new Float64Array(8), minus = new Float64Array(8);
    const k = [0.3, -1.1], eps = 1e-6;
    for (let dir = 0; dir < 2; dir++) {
      h.fillDerivative(k, dir, d);
      const kp = [...k], km = [...k];
      kp[dir] += eps; km[dir] -= eps;
      h.fill(kp, plus); h.fill(km, minus);
      for (let i = 0; i < 8; i++) expect(d[i]).toBeCloseTo((plus[i] - minus[i]) / (2 * eps), 7);
    }
  });

  it('re-resolving parameters changes amplitudes, not structure', () => {
    const h = blochHamiltonian(qwz());
    const out = new Float64Array(8);
    h.setParameters({ u: 2 }).fill([0, 0], out);
    expect(out[0]).toBeCloseTo(4, 14);
    expect(() => h.setParameters({ u: 9 })).toThrow(/params\.u: outside its declared range \[-4, 4\]\. Value: 9/);
    expect(() => h.setParameters({ w: 1 })).toThrow(ModelError);
  });

  it('names the offending field of a malformed model', () => {
    const good = qwz();
    expect(() => blochHamiltonian({ ...good, terms: [...good.terms, { from: 'a', to: 'c', cell: [0, 0], amplitude: 1 }] }))
      .toThrow(/terms\[\d+\]\.to: unknown orbital "c"/);
    expect(() => blochHamiltonian({ ...good, terms: [{ from: 'a', to: 'b', cell: [0], amplitude: 1 }] }))
      .toThrow(/terms\[0\]\.cell: expected 2 integers/);
    expect(() => blochHamiltonian({ ...good, terms: [{ from: 'a', to: 'b', cell: [0, 0], amplitude: 'v*2' }] }))
      .toThrow(/terms\[0\]\.amplitude: expression "v\*2" uses undefined parameter "v"/);
    expect(() => blochHamiltonian({ ...good, terms: [{ from: 'a', to: 'b', cell: [0, 0], amplitude: Number.NaN }] }))
      .toThrow(/terms\[0\]\.amplitude: amplitude must be finite/);
    expect(() => blochHamiltonian({ ...good, terms: [{ from: 'a', to: 'a', cell: [0, 0], amplitude: { re: 1, im: 1 } }] }))
      .toThrow(/terms\[0\]\.amplitude: an onsite energy must be real/);
    expect(() => blochHamiltonian({ ...good, vectors: [[1, 0], [0]] })).toThrow(/vectors\[1\]: expected 2 finite numbers/);
  });
});
