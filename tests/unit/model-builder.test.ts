import { describe, expect, it } from 'vitest';
import { blochHamiltonian, checkBandSelection, lattice, ModelError, qwz, resolveParameters, validateModel, type ModelSpec } from '../../src/index.js';

function hAt(model: ModelSpec, params: Record<string, number>, k: number[]): Float64Array {
  const h = blochHamiltonian(model, params);
  return h.fill(k, new Float64Array(2 * h.size * h.size));
}

const square = () => lattice('two orbitals', [[1, 0], [0, 1]])
  .parameter('u', { default: 0.5, range: [-4, 4] })
  .site('a', [0, 0]).site('b', [0, 0]).block('s', ['a', 'b']);

describe('builder: Pauli-string blocks and harmonics', () => {
  it('writes Qi–Wu–Zhang as cos/sin harmonics and gives the closed-form H(k) (Qi, Wu, Zhang, PRB 74, 085308 (2006))', () => {
    const model = qwz();
    for (const [kx, ky, u] of [[0.3, -1.1, 0.7], [2.9, 0.4, -1.5], [-2.2, -3.0, 3]]) {
      const h = hAt(model, { u }, [kx, ky]);
      const dz = u + Math.cos(kx) + Math.cos(ky);
      // [[dz, sin kx - i sin ky], [sin kx + i sin ky, -dz]]
      expect(Array.from(h).map((x) => +x.toFixed(12))).toEqual(
        [dz, 0, Math.sin(kx), -Math.sin(ky), Math.sin(kx), Math.sin(ky), -dz, 0].map((x) => +x.toFixed(12)),
      );
    }
  });

  it('orders a Kronecker product leftmost-slowest: zx = sz (x) sx (common practice)', () => {
    const m = lattice('kron', [[1]]).site('a', [0], { spin: true }).site('b', [0], { spin: true })
      .block('q', ['a', 'b']).onsiteMatrix('q', { zx: 2 }).build();
    const h = hAt(m, {}, [0]);
    const expected = [[0, 2, 0, 0], [2, 0, 0, 0], [0, 0, 0, -2], [0, 0, -2, 0]];
    for (let i = 0; i < 4; i++) for (let j = 0; j < 4; j++) {
      expect(h[2 * (i * 4 + j)]).toBe(expected[i][j]);
      expect(h[2 * (i * 4 + j) + 1]).toBe(0);
    }
  });

  it('hopMatrix between different blocks places rows on `to`, columns on `from` (term convention of DEVELOPERS.md)', () => {
    const m = lattice('two blocks', [[1]]).site('a', [0]).site('b', [0]).site('c', [0])
      .hopMatrix('a', 'b', [1], [[{ re: 0, im: 2 }]]).build();
    const k = 0.4;
    const h = hAt(m, {}, [k]);
    // H_ba(k) = 2i e^{-ik}
    expect(h[2 * (1 * 3 + 0)]).toBeCloseTo(2 * Math.sin(k), 14);
    expect(h[2 * (1 * 3 + 0) + 1]).toBeCloseTo(2 * Math.cos(k), 14);
  });

  it('sums terms on the same orbitals and folds a Hermitian partner into its term', () => {
    const m = square()
      .onsite('a', 'u').onsiteMatrix('s', { z: 1 })
      .hop('a', 'b', [1, 0], 0.3).hop('b', 'a', [-1, 0], { re: 0, im: 0.2 })
      .build();
    expect(m.terms).toHaveLength(3);
    const k = [0.9, -0.2];
    const h = hAt(m, { u: 0.5 }, k);
    expect(h[0]).toBeCloseTo(1.5, 14);
    expect(h[6]).toBeCloseTo(-1, 14);
    // H_ba = 0.3 e^{-ik1} + conj(0.2i e^{ik1}) = (0.3 - 0.2i) e^{-ik1}
    const re = 0.3 * Math.cos(0.9) - 0.2 * Math.sin(0.9), im = -0.3 * Math.sin(0.9) - 0.2 * Math.cos(0.9);
    expect(h[4]).toBeCloseTo(re, 14);
    expect(h[5]).toBeCloseTo(im, 14);
  });

  it('names the field and value of a malformed matrix or amplitude', () => {
    expect(() => square().onsiteMatrix('s', { x: 'i*u' }).build())
      .toThrow(/onsiteMatrix\("s"\): matrix must be Hermitian \(a non-Hermitian onsite block or harmonic\): \[1\]\[0\] = .*i\*u/);
    expect(() => square().onsiteMatrix('s', [[1, 2], [3, 1]]).build()).toThrow(/onsiteMatrix\("s"\): matrix must be Hermitian.*\[1\]\[0\] = 3, \[0\]\[1\] = 2/);
    expect(() => square().harmonic('s', [1, 0], { cos: { y: { re: 0, im: 1 } } }).build()).toThrow(/harmonic\("s", \[1,0\]\)\.cos: matrix must be Hermitian/);
    expect(() => square().harmonic('s', [1, 0], { sin: { z: 'v' } }).build()).toThrow(/harmonic\("s", \[1,0\]\)\.sin\.z: expression "v" uses undefined parameter "v"/);
    expect(() => square().onsiteMatrix('s', { zz: 1 })).toThrow(/onsiteMatrix\("s"\)\.zz: a Pauli string of 2 letters acts on 4 orbitals, but this block is 2 x 2/);
    expect(() => square().onsiteMatrix('s', { q: 1 })).toThrow(/onsiteMatrix\("s"\)\.q: a Pauli string is made of the letters 0, x, y, z\. Value: "q"/);
    expect(() => square().onsiteMatrix('t', { z: 1 })).toThrow(/onsiteMatrix\("t"\): unknown block, site or orbital "t"/);
    expect(() => square().hop('a', 'c', [1, 0], 1)).toThrow(/hop\("a", "c"\)\.to: unknown site "c"/);
    expect(() => square().hop('a', 'b', [1], 1)).toThrow(/hop\("a", "b"\)\.cell: expected 2 integers .* Value: \[1\]/);
    expect(() => square().hop('a', 'b', [1, 0], Number.NaN).build()).toThrow(/hop\("a", "b"\)\.amplitude: amplitude must be finite\. Value: NaN/);
    expect(() => square().hop('a', 'b', [1, 0], Infinity).build()).toThrow(/amplitude must be finite\. Value: Infinity/);
    expect(() => square().hop('a', 'a', [0, 0], 1)).toThrow(/hop\("a", "a"\)\.cell: a hopping within the cell from "a" to itself is an onsite term/);
    expect(() => square().harmonic('s', [0, 0], { cos: { z: 1 } })).toThrow(/harmonic\("s", \[0,0\]\)\.cell: a harmonic needs a non-zero cell/);
    expect(() => square().hopMatrix('s', 'a', [1, 0], [[1, 2, 3]])).toThrow(/hopMatrix\("s", "a"\): expected a 1 x 2 matrix/);
    expect(() => square().parameter('w', { default: 5, range: [0, 1] }).build()).toThrow(/parameters\.w\.default: outside its declared range \[0, 1\]\. Value: 5/);
  });
});

describe('validation of a model description', () => {
  const good = qwz();

  it('names the offending field and value (issue 2 list)', () => {
    expect(() => validateModel({ ...good, terms: [{ from: 'z', to: 'a', cell: [0, 1], amplitude: 1 }] })).toThrow(/terms\[0\]\.from: unknown orbital "z"/);
    expect(() => validateModel({ ...good, orbitals: [{ label: 'a', position: [0] }, good.orbitals[1]] })).toThrow(/orbitals\[0\]\.position: expected 2 finite reduced coordinates\. Value: \[0\]/);
    expect(() => validateModel({ ...good, vectors: [[1, 0, 0], [0, 1]] })).toThrow(/vectors\[0\]: expected 2 finite numbers\. Value: \[1,0,0\]/);
    expect(() => validateModel({ ...good, terms: [{ from: 'a', to: 'a', cell: [0, 0], amplitude: { re: 1, im: 0.5 } }] }))
      .toThrow(/terms\[0\]\.amplitude: an onsite energy must be real \(a non-Hermitian onsite block\)\. Value: \{"re":1,"im":0\.5\}/);
    expect(() => validateModel({ ...good, terms: [{ from: 'a', to: 'b', cell: [1, 0], amplitude: { re: 1, im: Number.POSITIVE_INFINITY } }] }))
      .toThrow(/terms\[0\]\.amplitude\.im: amplitude must be finite\. Value: Infinity/);
    expect(() => validateModel({ ...good, terms: [{ from: 'a', to: 'b', cell: [1, 0], amplitude: 'u + lambda' }] }))
      .toThrow(/terms\[0\]\.amplitude: expression "u \+ lambda" uses undefined parameter "lambda"/);
    expect(() => validateModel({ ...good, orbitals: good.orbitals.map((o) => ({ ...o, layer: -1 })) })).toThrow(/orbitals\[0\]\.layer: expected a non-negative integer\. Value: -1/);
    expect(() => resolveParameters(good, { u: 4.5 })).toThrow(/params\.u: outside its declared range \[-4, 4\]\. Value: 4\.5/);
  });

  it('an onsite term given by an expression is checked when parameters are known', () => {
    const m = lattice('complex onsite', [[1]]).parameter('g', { default: 0 }).site('a', [0]).onsite('a', 'g*i').build();
    expect(() => blochHamiltonian(m, { g: 0.1 })).toThrow(/terms\[0\]\.amplitude: an onsite energy must be real/);
  });
});

describe('checkBandSelection', () => {
  const model = qwz();
  it('accepts counts and index lists, defaults to the lower half', () => {
    expect(checkBandSelection(model)).toEqual([0]);
    expect(checkBandSelection(model, 2)).toEqual([0, 1]);
    expect(checkBandSelection(model, [1, 0])).toEqual([0, 1]);
  });
  it('names the field and value of a bad selection', () => {
    expect(() => checkBandSelection(model, 3)).toThrow(/bands: expected a band count from 1 to 2 \(model "Qi–Wu–Zhang" has 2 bands\)\. Value: 3/);
    expect(() => checkBandSelection(model, [0, 2])).toThrow(/bands\[1\]: band index out of range: model "Qi–Wu–Zhang" has bands 0 to 1\. Value: 2/);
    expect(() => checkBandSelection(model, [0, 0])).toThrow(/bands\[1\]: band 0 is listed twice/);
    expect(() => checkBandSelection(model, 0.5)).toThrow(ModelError);
    expect(() => checkBandSelection(model, [])).toThrow(/bands: expected a band count or a non-empty list/);
  });
});
