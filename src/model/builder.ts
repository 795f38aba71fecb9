/**
 * A fluent builder that reads naturally in a notebook cell and produces a ModelSpec.
 *
 * Orbital by orbital:
 *
 *   lattice('chain', [[1]]).parameter('t', { default: 1 })
 *     .site('a', [0]).onsite('a', 0).hop('a', 'a', [1], '-t').build();
 *
 * Or as matrices in the orbital space of a block, written as Pauli strings, with Fourier harmonics
 * so that a d·sigma model is typed as it is printed (Qi–Wu–Zhang):
 *
 *   lattice('QWZ', [[1, 0], [0, 1]]).parameter('u', { default: -1, range: [-4, 4] })
 *     .site('a', [0, 0]).site('b', [0, 0]).block('s', ['a', 'b'])
 *     .onsiteMatrix('s', { z: 'u' })
 *     .harmonic('s', [1, 0], { cos: { z: 1 }, sin: { x: 1 } })   // cos kx sz + sin kx sx
 *     .harmonic('s', [0, 1], { cos: { z: 1 }, sin: { y: 1 } })   // cos ky sz + sin ky sy
 *     .build();
 *
 * A Pauli string has one letter per factor ('0' identity, 'x', 'y', 'z'), leftmost = slowest index:
 * on a block of 4 orbitals (s.up, s.dn, p.up, p.dn) the key 'zx' is tau_z (x) sigma_x. Spinful
 * sites expand into two orbitals `A.up` and `A.dn`; a block, a site or an orbital label may be used
 * wherever a block is expected. Terms on the same orbitals and cell are summed (the Hermitian
 * partner of an existing term is folded into it), so harmonics, hoppings and onsite terms combine.
 */
import { addAmplitudes, fromComplex, isZero, multiplyAmplitudes, numericValue } from './amplitude.js';
import { ModelError, valueText } from './errors.js';
import { compileAmplitude } from './expressions.js';
import { MODEL_FORMAT, MODEL_VERSION, type Amplitude, type ModelSpec, type OrbitalSpec, type ParameterSpec, type TermSpec } from './spec.js';
import { TermSet } from './terms.js';
import { validateModel } from './validate.js';

/** A 2x2 spin matrix: '0' (identity) or a Pauli matrix, or explicit rows. */
export type SpinMatrix = '0' | 'x' | 'y' | 'z' | [[Amplitude, Amplitude], [Amplitude, Amplitude]];

/**
 * A matrix on a block's orbitals: a sum of Pauli strings with amplitudes (`{ z: 'u', x: 1 }`,
 * `{ zx: 'A', '0z': 'M' }`), or explicit rows (`[[a, b], [c, d]]`, row = `to`, column = `from`).
 */
export type OrbitalMatrix = { readonly [pauli: string]: Amplitude } | readonly (readonly Amplitude[])[];

/** The cos and sin parts of one Fourier harmonic: M_cos cos(k·R) + M_sin sin(k·R). */
export interface Harmonic {
  cos?: OrbitalMatrix;
  sin?: OrbitalMatrix;
}

type Dense = (Amplitude | null)[][];

const PAULI: Record<string, [number, number][][]> = {
  '0': [[[1, 0], [0, 0]], [[0, 0], [1, 0]]],
  x: [[[0, 0], [1, 0]], [[1, 0], [0, 0]]],
  y: [[[0, 0], [0, -1]], [[0, 1], [0, 0]]],
  z: [[[1, 0], [0, 0]], [[0, 0], [-1, 0]]],
};

const SPIN_SUFFIX = ['.up', '.dn'] as const;

/** Entry (row, col) of a Kronecker product of Pauli matrices named by `key`. */
function pauliEntry(key: string, row: number, col: number): [number, number] {
  let re = 1, im = 0;
  for (let f = 0; f < key.length; f++) {
    const shift = key.length - 1 - f;
    const [er, ei] = PAULI[key[f]][(row >> shift) & 1][(col >> shift) & 1];
    [re, im] = [re * er - im * ei, re * ei + im * er];
    if (re === 0 && im === 0) break;
  }
  return [re, im];
}

function isRows(m: OrbitalMatrix): m is readonly (readonly Amplitude[])[] {
  return Array.isArray(m);
}

/** Expand an OrbitalMatrix to dense rows x cols (null = zero), naming `field` in errors. */
function denseMatrix(m: OrbitalMatrix, rows: number, cols: number, field: string): Dense {
  const out: Dense = Array.from({ length: rows }, () => new Array<Amplitude | null>(cols).fill(null));
  if (isRows(m)) {
    if (m.length !== rows || !m.every((r) => Array.isArray(r) && r.length === cols)) {
      throw new ModelError(field, `expected a ${rows} x ${cols} matrix (rows = "to" orbitals, columns = "from"). Value: ${valueText(m)}`);
    }
    m.forEach((r, i) => r.forEach((e, j) => (out[i][j] = isZero(e) ? null : e)));
    return out;
  }
  if (m === null || typeof m !== 'object') throw new ModelError(field, `expected Pauli strings with amplitudes or matrix rows. Value: ${valueText(m)}`);
  for (const [key, coefficient] of Object.entries(m as Record<string, Amplitude>)) {
    if (!/^[0xyz]+$/.test(key)) throw new ModelError(`${field}.${key}`, `a Pauli string is made of the letters 0, x, y, z. Value: ${valueText(key)}`);
    if (rows !== cols || 2 ** key.length !== rows) {
      throw new ModelError(`${field}.${key}`, `a Pauli string of ${key.length} letters acts on ${2 ** key.length} orbitals, but this block is ${rows} x ${cols}`);
    }
    for (let i = 0; i < rows; i++) {
      for (let j = 0; j < cols; j++) {
        const [re, im] = pauliEntry(key, i, j);
        if (re === 0 && im === 0) continue;
        const term = multiplyAmplitudes(coefficient, fromComplex(re, im));
        out[i][j] = out[i][j] === null ? term : addAmplitudes(out[i][j]!, term);
      }
    }
  }
  return out;
}

function spinDense(spin: SpinMatrix, field: string): Dense {
  return typeof spin === 'string' ? denseMatrix({ [spin]: 1 }, 2, 2, field) : denseMatrix(spin, 2, 2, field);
}

export class LatticeBuilder {
  private readonly name: string;
  private readonly vectors: number[][];
  private readonly periodic: number;
  private readonly orbitals: OrbitalSpec[] = [];
  private readonly sites = new Map<string, string[]>();
  private readonly blocks = new Map<string, string[]>();
  private readonly parameters: Record<string, ParameterSpec> = {};
  private readonly terms = new TermSet();
  /** Amplitudes and matrices to check once all parameters are declared (at build). */
  private readonly pending: { field: string; amplitude?: Amplitude; hermitian?: Dense }[] = [];
  private docText: string | undefined;

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
    if (this.sites.has(label)) throw new ModelError(`site(${valueText(label)})`, 'a site with this label exists already');
    const spin = options.spin ?? false;
    const labels = spin ? SPIN_SUFFIX.map((s) => label + s) : [label];
    this.sites.set(label, labels);
    labels.forEach((l, i) => this.orbitals.push({ label: l, position: [...position], ...(spin ? { spin: i === 0 ? 'up' : 'down' } : {}) }));
    return this;
  }

  /**
   * Name an ordered group of orbitals (sites expand to their orbitals) for matrix-valued terms.
   * `block('s', ['a', 'b'])` on spinful a, b orders the orbitals a.up, a.dn, b.up, b.dn.
   */
  block(name: string, members: string[]): this {
    const where = `block(${valueText(name)})`;
    if (this.blocks.has(name) || this.sites.has(name)) throw new ModelError(where, `the name ${valueText(name)} is taken by a block or site`);
    if (!Array.isArray(members) || members.length === 0) throw new ModelError(`${where}.members`, `expected a non-empty list of sites or orbitals. Value: ${valueText(members)}`);
    const orbitals = members.flatMap((m, i) => this.resolve(m, `${where}.members[${i}]`));
    if (new Set(orbitals).size !== orbitals.length) throw new ModelError(`${where}.members`, `an orbital appears twice. Value: ${valueText(orbitals)}`);
    this.blocks.set(name, orbitals);
    return this;
  }

  /** An onsite energy; on a spinful site, times a Hermitian spin matrix (default identity). */
  onsite(site: string, amplitude: Amplitude, spin: SpinMatrix = '0'): this {
    const where = `onsite(${valueText(site)})`;
    const orbs = this.siteOrbitals(site, where);
    this.pending.push({ field: `${where}.amplitude`, amplitude });
    if (orbs.length === 1) return this.addTerm(site, site, this.zeroCell(), amplitude);
    const m = spinDense(spin, `${where}.spin`);
    if (typeof spin !== 'string') this.pending.push({ field: `${where}.spin`, hermitian: m });
    return this.addOnsiteBlock(orbs, m.map((row) => row.map((e) => (e === null ? null : multiplyAmplitudes(amplitude, e)))));
  }

  /**
   * A hopping <cell, to| H |0, from> = amplitude (times a spin matrix between spinful sites; the
   * Hermitian partner is implied).
   */
  hop(from: string, to: string, cell: number[], amplitude: Amplitude, spin: SpinMatrix = '0'): this {
    const where = `hop(${valueText(from)}, ${valueText(to)})`;
    const a = this.siteOrbitals(from, `${where}.from`);
    const b = this.siteOrbitals(to, `${where}.to`);
    if (a.length !== b.length) throw new ModelError(where, 'cannot hop between a spinful and a spinless site');
    this.checkCell(cell, `${where}.cell`);
    this.checkNotOnsite(a, b, cell, where, 'onsite');
    this.pending.push({ field: `${where}.amplitude`, amplitude });
    if (a.length === 1) return this.addTerm(from, to, cell, amplitude);
    const m = spinDense(spin, `${where}.spin`);
    return this.addMatrix(a, b, cell, m.map((row) => row.map((e) => (e === null ? null : multiplyAmplitudes(amplitude, e)))));
  }

  /** A Hermitian matrix of onsite terms on a block: `onsiteMatrix('s', { z: 'm', x: 'Delta' })`. */
  onsiteMatrix(block: string, matrix: OrbitalMatrix): this {
    const where = `onsiteMatrix(${valueText(block)})`;
    const orbs = this.resolve(block, where);
    const m = denseMatrix(matrix, orbs.length, orbs.length, where);
    this.checkEntries(matrix, where);
    this.pending.push({ field: where, hermitian: m });
    return this.addOnsiteBlock(orbs, m);
  }

  /**
   * A matrix-valued hopping between blocks: <cell, to_i| H |0, from_j> = matrix[i][j] (Hermitian
   * partner implied).
   */
  hopMatrix(from: string, to: string, cell: number[], matrix: OrbitalMatrix): this {
    const where = `hopMatrix(${valueText(from)}, ${valueText(to)})`;
    const a = this.resolve(from, `${where}.from`);
    const b = this.resolve(to, `${where}.to`);
    this.checkCell(cell, `${where}.cell`);
    this.checkNotOnsite(a, b, cell, where, 'onsiteMatrix');
    const m = denseMatrix(matrix, b.length, a.length, where);
    this.checkEntries(matrix, where);
    return this.addMatrix(a, b, cell, m);
  }

  /**
   * Adds M_cos cos(k·R) + M_sin sin(k·R) to the block of H(k), k·R = sum_i k_i R_i (reduced
   * momentum, the 'lattice' Bloch convention); both matrices must be Hermitian. The signs of the
   * e^{±ik·R} terms are derived here: H_ba(k) gets t e^{-ik·R} from a term on cell R, so the
   * amplitude on cell R is (M_cos + i M_sin)/2 and its partner on -R supplies the conjugate.
   */
  harmonic(block: string, cell: number[], parts: Harmonic): this {
    const where = `harmonic(${valueText(block)}, ${valueText(cell)})`;
    const orbs = this.resolve(block, where);
    this.checkCell(cell, `${where}.cell`);
    if (cell.every((c) => c === 0)) throw new ModelError(`${where}.cell`, `a harmonic needs a non-zero cell (use onsiteMatrix for R = 0). Value: ${valueText(cell)}`);
    if (parts === null || typeof parts !== 'object' || (parts.cos === undefined && parts.sin === undefined)) {
      throw new ModelError(where, `expected { cos?, sin? } matrices. Value: ${valueText(parts)}`);
    }
    const n = orbs.length;
    const c = parts.cos === undefined ? null : denseMatrix(parts.cos, n, n, `${where}.cos`);
    const s = parts.sin === undefined ? null : denseMatrix(parts.sin, n, n, `${where}.sin`);
    if (parts.cos !== undefined) this.checkEntries(parts.cos, `${where}.cos`);
    if (parts.sin !== undefined) this.checkEntries(parts.sin, `${where}.sin`);
    if (c !== null) this.pending.push({ field: `${where}.cos`, hermitian: c });
    if (s !== null) this.pending.push({ field: `${where}.sin`, hermitian: s });
    const m: Dense = Array.from({ length: n }, (_, i) =>
      Array.from({ length: n }, (_, j) => {
        const fromCos = c?.[i][j] ? multiplyAmplitudes(c[i][j]!, 0.5) : null;
        const fromSin = s?.[i][j] ? multiplyAmplitudes(s[i][j]!, { re: 0, im: 0.5 }) : null;
        return fromCos === null ? fromSin : fromSin === null ? fromCos : addAmplitudes(fromCos, fromSin);
      }),
    );
    return this.addMatrix(orbs, orbs, cell, m);
  }

  /** A raw term between orbitals (not sites), for what the helpers above do not cover. */
  term(term: TermSpec): this {
    const where = `term(${valueText(term?.from)}, ${valueText(term?.to)})`;
    this.resolve(term.from, `${where}.from`);
    this.resolve(term.to, `${where}.to`);
    this.checkCell(term.cell, `${where}.cell`);
    this.pending.push({ field: `${where}.amplitude`, amplitude: term.amplitude });
    return this.addTerm(term.from, term.to, term.cell, term.amplitude);
  }

  /** The model's `doc`: what it is and where it comes from (a citation), shown with the model. */
  doc(text: string): this {
    this.docText = text;
    return this;
  }

  /** The validated model description. */
  build(): ModelSpec {
    const names = new Set(Object.keys(this.parameters));
    const defaults: Record<string, number> = {};
    for (const [k, p] of Object.entries(this.parameters)) defaults[k] = p?.default;
    for (const check of this.pending) {
      if (check.amplitude !== undefined) compileAmplitude(check.amplitude, check.field, names);
      if (check.hermitian !== undefined) checkHermitian(check.hermitian, check.field, names, defaults);
    }
    const spec: ModelSpec = {
      format: MODEL_FORMAT,
      version: MODEL_VERSION,
      name: this.name,
      periodic: this.periodic,
      vectors: this.vectors.map((v) => [...v]),
      orbitals: this.orbitals.map((o) => ({ ...o, position: [...o.position] })),
      parameters: JSON.parse(JSON.stringify(this.parameters)) as Record<string, ParameterSpec>,
      terms: this.terms.list(),
      ...(this.docText !== undefined ? { doc: this.docText } : {}),
    };
    return validateModel(spec);
  }

  private resolve(name: string, where: string): string[] {
    const found = this.blocks.get(name) ?? this.sites.get(name) ?? (this.orbitals.some((o) => o.label === name) ? [name] : undefined);
    if (found === undefined) throw new ModelError(where, `unknown block, site or orbital ${valueText(name)}`);
    return found;
  }

  /** Each coefficient or entry as the user wrote it is compiled at build, naming its own field. */
  private checkEntries(m: OrbitalMatrix, field: string): void {
    if (isRows(m)) m.forEach((r, i) => r.forEach((e, j) => this.pending.push({ field: `${field}[${i}][${j}]`, amplitude: e })));
    else for (const [key, e] of Object.entries(m)) this.pending.push({ field: `${field}.${key}`, amplitude: e });
  }

  private siteOrbitals(label: string, where: string): string[] {
    const orbs = this.sites.get(label);
    if (orbs === undefined) throw new ModelError(where, `unknown site ${valueText(label)} (declare it with .site() first)`);
    return orbs;
  }

  private checkCell(cell: unknown, field: string): void {
    if (!Array.isArray(cell) || cell.length !== this.periodic || !cell.every((c) => Number.isInteger(c))) {
      throw new ModelError(field, `expected ${this.periodic} integers (one per periodic direction). Value: ${valueText(cell)}`);
    }
  }

  /** Within one cell an orbital cannot hop to itself: that is an onsite term, added once. */
  private checkNotOnsite(from: string[], to: string[], cell: number[], where: string, instead: string): void {
    if (cell.some((c) => c !== 0)) return;
    const shared = from.filter((o) => to.includes(o));
    if (shared.length > 0) throw new ModelError(`${where}.cell`, `a hopping within the cell from ${valueText(shared[0])} to itself is an onsite term; use .${instead}(). Value: ${valueText(cell)}`);
  }

  /** Lower triangle and diagonal of a Hermitian onsite block (the upper triangle is the implied partner). */
  private addOnsiteBlock(orbs: string[], m: Dense): this {
    for (let r = 0; r < orbs.length; r++) {
      for (let c = 0; c <= r; c++) {
        const e = m[r][c];
        if (e !== null) this.addTerm(orbs[c], orbs[r], this.zeroCell(), e);
      }
    }
    return this;
  }

  private addMatrix(from: string[], to: string[], cell: number[], m: Dense): this {
    to.forEach((b, r) => from.forEach((a, c) => {
      const e = m[r][c];
      if (e !== null) this.addTerm(a, b, cell, e);
    }));
    return this;
  }

  private addTerm(from: string, to: string, cell: readonly number[], amplitude: Amplitude): this {
    this.terms.add(from, to, cell, amplitude);
    return this;
  }

  private zeroCell(): number[] {
    return new Array<number>(this.periodic).fill(0);
  }
}

/** Hermiticity of a matrix of amplitudes, evaluated at the parameter defaults. */
function checkHermitian(m: Dense, field: string, names: ReadonlySet<string>, defaults: Record<string, number>): void {
  const value = (e: Amplitude | null, where: string): [number, number] => {
    if (e === null) return [0, 0];
    const fixed = numericValue(e);
    if (fixed !== null) return fixed;
    const out = new Float64Array(2);
    compileAmplitude(e, where, names)(defaults, out, 0);
    return [out[0], out[1]];
  };
  for (let i = 0; i < m.length; i++) {
    for (let j = 0; j <= i; j++) {
      const a = value(m[i][j], `${field}[${i}][${j}]`);
      const b = value(m[j][i], `${field}[${j}][${i}]`);
      const scale = Math.max(1, Math.hypot(...a), Math.hypot(...b));
      if (Math.abs(a[0] - b[0]) > 1e-12 * scale || Math.abs(a[1] + b[1]) > 1e-12 * scale) {
        const entry = (e: Amplitude | null): string => (e === null ? '0' : valueText(e));
        throw new ModelError(
          field,
          `matrix must be Hermitian (a non-Hermitian onsite block or harmonic): [${i}][${j}] = ${entry(m[i][j])}, [${j}][${i}] = ${entry(m[j][i])}` +
            (numericValue(m[i][j] ?? 0) === null || numericValue(m[j][i] ?? 0) === null ? ' (at the parameter defaults)' : ''),
        );
      }
    }
  }
}

/**
 * Start a model on a lattice with the given Cartesian vectors. By default every vector is periodic;
 * pass `periodic` to keep the last ones open (a ribbon's width direction, a flake).
 */
export function lattice(name: string, vectors: number[][], periodic?: number): LatticeBuilder {
  return new LatticeBuilder(name, vectors, periodic);
}
