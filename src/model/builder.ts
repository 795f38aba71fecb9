/**
 * A fluent builder that reads naturally in a notebook cell and produces a ModelSpec:
 *
 *   const m = lattice('square Chern insulator', [[1, 0], [0, 1]])
 *     .parameter('u', { default: -1, range: [-4, 4] })
 *     .site('a', [0, 0]).site('b', [0, 0])
 *     .onsite('a', 'u').onsite('b', '-u')
 *     .hop('a', 'b', [1, 0], { re: 0, im: -0.5 })
 *     .build();
 *
 * Spinful sites expand into two orbitals, `A.up` and `A.dn`; a spin matrix ('0', 'x', 'y', 'z' for
 * the identity and the Pauli matrices, or any 2x2 matrix of amplitudes) multiplies the amplitude.
 */
import { ModelError, show } from './errors.js';
import { MODEL_FORMAT, MODEL_VERSION, type Amplitude, type ModelSpec, type OrbitalSpec, type ParameterSpec, type TermSpec } from './spec.js';
import { validateModel } from './validate.js';

export type SpinMatrix = '0' | 'x' | 'y' | 'z' | [[Amplitude, Amplitude], [Amplitude, Amplitude]];

type Entry = [number, number] | null; // (re, im) of a fixed matrix entry, null for zero

const PAULI: Record<'0' | 'x' | 'y' | 'z', [[Entry, Entry], [Entry, Entry]]> = {
  '0': [[[1, 0], null], [null, [1, 0]]],
  x: [[null, [1, 0]], [[1, 0], null]],
  y: [[null, [0, -1]], [[0, 1], null]],
  z: [[[1, 0], null], [null, [-1, 0]]],
};

const SPIN_SUFFIX = ['.up', '.dn'] as const;

/** Multiply an amplitude by a fixed complex number, keeping it an amplitude. */
function scaleAmplitude(a: Amplitude, [re, im]: [number, number]): Amplitude {
  if (im === 0 && re === 1) return a;
  if (typeof a === 'number') return im === 0 ? a * re : { re: a * re, im: a * im };
  const factor = im === 0 ? `${re}` : `(${re} + ${im}i)`;
  if (typeof a === 'string') return `(${a}) * ${factor}`;
  return `((${a.re}) + i*(${a.im})) * ${factor}`;
}

function entryOf(m: SpinMatrix, row: number, col: number): Amplitude | null {
  if (typeof m === 'string') {
    const e = PAULI[m][row][col];
    return e === null ? null : e[1] === 0 ? e[0] : { re: e[0], im: e[1] };
  }
  return m[row][col];
}

function multiplyAmplitudes(a: Amplitude, b: Amplitude): Amplitude {
  if (typeof b === 'number') return scaleAmplitude(a, [b, 0]);
  if (typeof b === 'object' && typeof b.re === 'number' && typeof b.im === 'number') return scaleAmplitude(a, [b.re, b.im]);
  const left = typeof a === 'number' ? `${a}` : typeof a === 'string' ? `(${a})` : `((${a.re}) + i*(${a.im}))`;
  const right = typeof b === 'string' ? `(${b})` : `((${b.re}) + i*(${b.im}))`;
  return `${left} * ${right}`;
}

export class LatticeBuilder {
  private readonly name: string;
  private readonly vectors: number[][];
  private periodic: number;
  private readonly orbitals: OrbitalSpec[] = [];
  private readonly spinful = new Map<string, boolean>();
  private readonly parameters: Record<string, ParameterSpec> = {};
  private readonly terms: TermSpec[] = [];
  private doc: string | undefined;

  constructor(name: string, vectors: number[][], periodic = vectors.length) {
    this.name = name;
    this.vectors = vectors.map((v) => [...v]);
    this.periodic = periodic;
  }

  /** Declare a named parameter usable in amplitude expressions. */
  parameter(name: string, spec: ParameterSpec): this {
    this.parameters[name] = { ...spec };
    return this;
  }

  /** Add a site at a reduced position; with `{ spin: true }` it holds two orbitals, `label.up` and `label.dn`. */
  site(label: string, position: number[], options: { spin?: boolean } = {}): this {
    if (this.spinful.has(label)) throw new ModelError(`site(${show(label)})`, 'a site with this label exists already');
    const spin = options.spin ?? false;
    this.spinful.set(label, spin);
    if (spin) {
      this.orbitals.push({ label: label + SPIN_SUFFIX[0], position: [...position], spin: 'up' });
      this.orbitals.push({ label: label + SPIN_SUFFIX[1], position: [...position], spin: 'down' });
    } else {
      this.orbitals.push({ label, position: [...position] });
    }
    return this;
  }

  private siteOrbitals(label: string, where: string): string[] {
    const spin = this.spinful.get(label);
    if (spin === undefined) throw new ModelError(where, `unknown site ${show(label)} (declare it with .site() first)`);
    return spin ? SPIN_SUFFIX.map((s) => label + s) : [label];
  }

  /** An onsite energy; on a spinful site, times a Hermitian spin matrix (default identity). */
  onsite(site: string, amplitude: Amplitude, spin: SpinMatrix = '0'): this {
    const orbs = this.siteOrbitals(site, `onsite(${show(site)})`);
    if (orbs.length === 1) {
      this.terms.push({ from: site, to: site, cell: this.zeroCell(), amplitude });
      return this;
    }
    if (typeof spin !== 'string') {
      const [[, upper], [lower]] = spin;
      if (!isConjugatePair(upper, lower)) {
        throw new ModelError(`onsite(${show(site)}).spin`, `spin matrix must be Hermitian (a non-Hermitian onsite block): [0][1] = ${show(upper)}, [1][0] = ${show(lower)}`);
      }
    }
    for (let r = 0; r < 2; r++) {
      for (let c = 0; c <= r; c++) {
        const e = entryOf(spin, r, c);
        if (e !== null) this.terms.push({ from: orbs[c], to: orbs[r], cell: this.zeroCell(), amplitude: multiplyAmplitudes(amplitude, e) });
      }
    }
    return this;
  }

  /**
   * A hopping <cell, to| H |0, from> = amplitude (times a spin matrix between spinful sites; the
   * Hermitian partner is implied).
   */
  hop(from: string, to: string, cell: number[], amplitude: Amplitude, spin: SpinMatrix = '0'): this {
    const a = this.siteOrbitals(from, `hop(${show(from)}, ${show(to)}).from`);
    const b = this.siteOrbitals(to, `hop(${show(from)}, ${show(to)}).to`);
    if (a.length !== b.length) throw new ModelError(`hop(${show(from)}, ${show(to)})`, 'cannot hop between a spinful and a spinless site');
    if (a.length === 1) {
      this.terms.push({ from, to, cell: [...cell], amplitude });
      return this;
    }
    for (let r = 0; r < 2; r++) {
      for (let c = 0; c < 2; c++) {
        const e = entryOf(spin, r, c);
        if (e !== null) this.terms.push({ from: a[c], to: b[r], cell: [...cell], amplitude: multiplyAmplitudes(amplitude, e) });
      }
    }
    return this;
  }

  /** A raw term between orbitals (not sites), for what the helpers above do not cover. */
  term(term: TermSpec): this {
    this.terms.push({ ...term, cell: [...term.cell] });
    return this;
  }

  /** Provenance shown with the model (e.g. a citation). */
  describe(doc: string): this {
    this.doc = doc;
    return this;
  }

  /** The validated model description. */
  build(): ModelSpec {
    const spec: ModelSpec = {
      format: MODEL_FORMAT,
      version: MODEL_VERSION,
      name: this.name,
      periodic: this.periodic,
      vectors: this.vectors.map((v) => [...v]),
      orbitals: this.orbitals.map((o) => ({ ...o, position: [...o.position] })),
      parameters: JSON.parse(JSON.stringify(this.parameters)) as Record<string, ParameterSpec>,
      terms: this.terms.map((t) => ({ ...t, cell: [...t.cell] })),
      ...(this.doc !== undefined ? { doc: this.doc } : {}),
    };
    return validateModel(spec);
  }

  private zeroCell(): number[] {
    return new Array<number>(this.periodic).fill(0);
  }
}

/** Whether b = conj(a); amplitudes given as expressions are compared as written (a == b, real). */
function isConjugatePair(a: Amplitude, b: Amplitude): boolean {
  const numeric = (x: Amplitude): [number, number] | null =>
    typeof x === 'number' ? [x, 0] : typeof x === 'object' && typeof x.re === 'number' && typeof x.im === 'number' ? [x.re, x.im] : null;
  const na = numeric(a);
  const nb = numeric(b);
  if (na !== null && nb !== null) return Math.abs(na[0] - nb[0]) <= 1e-14 && Math.abs(na[1] + nb[1]) <= 1e-14;
  return JSON.stringify(a) === JSON.stringify(b);
}

/**
 * Start a model on a lattice with the given Cartesian vectors. By default every vector is periodic;
 * pass `periodic` to keep the last ones open (a ribbon's width direction, a flake).
 */
export function lattice(name: string, vectors: number[][], periodic?: number): LatticeBuilder {
  return new LatticeBuilder(name, vectors, periodic);
}
