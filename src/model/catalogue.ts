/**
 * Standard models, each a function returning a ModelSpec with parameters named as in the paper that
 * introduced it, a default and a range for every parameter (what sliders span), and the citation in
 * `spec.doc`. Energies are in units of the model's own energy scale, which each unit names (e.g.
 * 'energy (units of t)'), angles in radians.
 * Signs follow DEVELOPERS.md: a term {from a, to b, cell R, amplitude t} is <R,b|H|0,a> = t.
 */
import { lattice } from './builder.js';
import { bogoliubov } from './builders/bdg.js';
import { magneticFlux } from './builders/flux.js';
import { coupledWireArray } from './builders/wires.js';
import { ModelError, valueText } from './errors.js';
import type { ModelSpec } from './spec.js';
import { checkFields, closestName } from './field-names.js';

/** The unit of a model's energies: its own energy scale, named (e.g. 'energy (units of t)'). */
const energyIn = (scale: string): string => `energy (units of ${scale})`;

/**
 * Catalogue models take no options: their parameters are set per request (`params`) or per widget
 * (`values`). Without this check `qwz({u: 3})` would return the default model in silence.
 */
function refuseOptions(name: string, given: IArguments, make: () => ModelSpec): void {
  if (given.length === 0) return;
  const known = Object.keys(make().parameters);
  const first = given[0] as unknown;
  const keys = first !== null && typeof first === 'object' ? Object.keys(first) : [];
  const hint = keys.length ? ` (did you mean params: {${keys.map((k) => `${closestName(k, known) ?? k}: ...`).join(', ')}} in the request?)` : '';
  throw new ModelError(name, `${name}() takes no options. Value: ${valueText(first)}; set its parameters (${known.join(', ') || 'none'}) with params in a request or values in valueText()${hint}`);
}
const SQRT3 = Math.sqrt(3);

/**
 * Su–Schrieffer–Heeger chain: H = sum_m [v |m,B><m,A| + w |m+1,A><m,B| + h.c.], A at x = 0, B at
 * x = 1/2. Two zero-energy end modes on an open chain for |v| < |w|.
 * Su, Schrieffer, Heeger, PRL 42, 1698 (1979).
 */
export function ssh(): ModelSpec {
  refuseOptions('ssh', arguments, ssh);
  return lattice('SSH chain', [[1]])
    .doc('Su–Schrieffer–Heeger chain; Su, Schrieffer, Heeger, PRL 42, 1698 (1979). v intracell, w intercell hopping.')
    .parameter('v', { default: 0.5, range: [-2, 2], unit: energyIn('w'), doc: 'intracell hopping (A to B in the same cell)' })
    .parameter('w', { default: 1, range: [-2, 2], unit: energyIn('w'), doc: 'intercell hopping (B to A of the next cell)' })
    .site('A', [0]).site('B', [0.5])
    .hop('A', 'B', [0], 'v')
    .hop('B', 'A', [1], 'w')
    .build();
}

/**
 * Rice–Mele chain: the SSH chain with a staggered onsite energy +u on A, -u on B.
 * Rice & Mele, PRL 49, 1455 (1982).
 */
export function riceMele(): ModelSpec {
  refuseOptions('riceMele', arguments, riceMele);
  return lattice('Rice–Mele chain', [[1]])
    .doc('Rice–Mele chain; Rice & Mele, PRL 49, 1455 (1982). SSH hoppings v, w plus staggered potential +u (A), -u (B).')
    .parameter('v', { default: 0.5, range: [-2, 2], unit: energyIn('w'), doc: 'intracell hopping' })
    .parameter('w', { default: 1, range: [-2, 2], unit: energyIn('w'), doc: 'intercell hopping' })
    .parameter('u', { default: 0.2, range: [-2, 2], unit: energyIn('w'), doc: 'staggered onsite energy, +u on A and -u on B' })
    .site('A', [0]).site('B', [0.5])
    .onsite('A', 'u').onsite('B', '-u')
    .hop('A', 'B', [0], 'v')
    .hop('B', 'A', [1], 'w')
    .build();
}

/**
 * Kitaev chain, spinless p-wave superconductor in BdG form (bdg builder conventions):
 *   H = sum_j [-t (c+_{j+1} c_j + h.c.) - mu c+_j c_j + (Delta c+_{j+1} c+_j + h.c.)],
 *   E(k) = ±sqrt((2t cos k + mu)^2 + 4 Delta^2 sin^2 k).
 * Topological (Majorana end modes) for |mu| < 2|t|, Delta != 0.
 * Kitaev, Physics-Uspekhi 44, 131 (2001) (there the hopping is called w).
 */
export function kitaevChain(): ModelSpec {
  refuseOptions('kitaevChain', arguments, kitaevChain);
  const normal = lattice('Kitaev chain', [[1]])
    .parameter('mu', { default: 0.5, range: [-4, 4], unit: energyIn('t'), doc: 'chemical potential' })
    .parameter('t', { default: 1, range: [-2, 2], unit: energyIn('t'), doc: 'nearest-neighbour hopping (H has -t)' })
    .site('c', [0])
    .hop('c', 'c', [1], '-t')
    .build();
  const bdg = bogoliubov(normal, {
    name: 'Kitaev chain',
    chemicalPotential: 'mu',
    parameters: { Delta: { default: 1, range: [-2, 2], unit: energyIn('t'), doc: 'p-wave pairing amplitude' } },
    pairing: [{ from: 'c', to: 'c', cell: [1], amplitude: 'Delta' }],
  });
  return withDoc(bdg, 'Kitaev chain (BdG, Nambu basis (c_k, c+_-k), H = 1/2 Psi+ H_BdG Psi); Kitaev, Physics-Uspekhi 44, 131 (2001). Topological for |mu| < 2|t|.');
}

function withDoc(spec: ModelSpec, doc: string): ModelSpec {
  return { ...spec, doc };
}

/**
 * Qi–Wu–Zhang model, H = sin kx sx + sin ky sy + (u + cos kx + cos ky) sz.
 * C(lower band) = +1 for -2 < u < 0, -1 for 0 < u < 2, 0 for |u| > 2 (references.md convention).
 * Qi, Wu, Zhang, PRB 74, 085308 (2006).
 */
export function qwz(): ModelSpec {
  refuseOptions('qwz', arguments, qwz);
  return lattice('Qi–Wu–Zhang', [[1, 0], [0, 1]])
    .doc('Qi–Wu–Zhang model H = sin kx sx + sin ky sy + (u + cos kx + cos ky) sz; Qi, Wu, Zhang, PRB 74, 085308 (2006).')
    .parameter('u', { default: -1, range: [-4, 4], unit: energyIn('the hopping'), doc: 'mass (staggered onsite energy)' })
    .site('a', [0, 0]).site('b', [0, 0]).block('s', ['a', 'b'])
    .onsiteMatrix('s', { z: 'u' })
    .harmonic('s', [1, 0], { cos: { z: 1 }, sin: { x: 1 } })
    .harmonic('s', [0, 1], { cos: { z: 1 }, sin: { y: 1 } })
    .build();
}

/**
 * Honeycomb lattice with C–C distance 1: a1 = (sqrt3, 0), a2 = (sqrt3/2, 3/2), A at (0, 0), B at
 * reduced (1/3, 1/3), Cartesian (sqrt3/2, 1/2). The three nearest neighbours of A are B in cells
 * (0,0), (-1,0), (0,-1). A hop from A to the second neighbour at a1 (or a2 - a1, or -a2) passes
 * the B above the bond and turns right: clockwise, Haldane's nu = -1; for B the same three
 * displacements are counter-clockwise, nu = +1.
 */
const HONEYCOMB = [[SQRT3, 0], [SQRT3 / 2, 1.5]];
const NN_CELLS = [[0, 0], [-1, 0], [0, -1]];
const NNN_CELLS = [[1, 0], [-1, 1], [0, -1]];

/**
 * Haldane model: H = t1 sum_<ij> c+_i c_j + t2 sum_<<ij>> e^{i nu_ij phi} c+_i c_j + M sum_i xi_i c+_i c_i,
 * nu_ij = +1 counter-clockwise, xi = +1 on A, -1 on B. C(lower) = -sign(sin phi) for
 * |M| < 3 sqrt3 |t2 sin phi| (references.md convention), 0 outside.
 * Haldane, PRL 61, 2015 (1988).
 */
export function haldane(): ModelSpec {
  refuseOptions('haldane', arguments, haldane);
  const b = lattice('Haldane model', HONEYCOMB)
    .doc('Haldane model on the honeycomb lattice (C–C distance 1); Haldane, PRL 61, 2015 (1988).')
    .parameter('t1', { default: 1, range: [-2, 2], unit: energyIn('t1'), doc: 'nearest-neighbour hopping' })
    .parameter('t2', { default: 0.1, range: [-0.5, 0.5], unit: energyIn('t1'), doc: 'second-neighbour hopping magnitude' })
    .parameter('phi', { default: Math.PI / 2, range: [-Math.PI, Math.PI], unit: 'rad', doc: 'second-neighbour phase (counter-clockwise)' })
    .parameter('M', { default: 0.2, range: [-2, 2], unit: energyIn('t1'), doc: 'sublattice mass, +M on A, -M on B' })
    .site('A', [0, 0]).site('B', [1 / 3, 1 / 3])
    .onsite('A', 'M').onsite('B', '-M');
  for (const c of NN_CELLS) b.hop('A', 'B', c, 't1');
  for (const c of NNN_CELLS) b.hop('A', 'A', c, 't2*exp(-i*phi)').hop('B', 'B', c, 't2*exp(i*phi)');
  return b.build();
}

/**
 * Kane–Mele model: H = t sum_<ij> c+_i c_j + i lambda_SO sum_<<ij>> nu_ij c+_i s_z c_j
 *   + i lambda_R sum_<ij> c+_i (s x d_ij)_z c_j + lambda_v sum_i xi_i c+_i c_i,
 * d_ij the unit vector from j to i. Orbitals A.up, A.dn, B.up, B.dn. Z2 = 1 for
 * |lambda_v| < 3 sqrt3 lambda_SO at lambda_R = 0. Kane & Mele, PRL 95, 226801 (2005).
 */
export function kaneMele(): ModelSpec {
  refuseOptions('kaneMele', arguments, kaneMele);
  const b = lattice('Kane–Mele model', HONEYCOMB)
    .doc('Kane–Mele model on the honeycomb lattice (C–C distance 1); Kane & Mele, PRL 95, 226801 (2005).')
    .parameter('t', { default: 1, range: [-2, 2], unit: energyIn('t'), doc: 'nearest-neighbour hopping' })
    .parameter('lambda_SO', { default: 0.06, range: [-0.5, 0.5], unit: energyIn('t'), doc: 'intrinsic spin–orbit coupling' })
    .parameter('lambda_R', { default: 0.05, range: [-0.5, 0.5], unit: energyIn('t'), doc: 'Rashba coupling' })
    .parameter('lambda_v', { default: 0.1, range: [-1, 1], unit: energyIn('t'), doc: 'staggered sublattice potential, +A, -B' })
    .site('A', [0, 0], { spin: true }).site('B', [1 / 3, 1 / 3], { spin: true })
    .onsite('A', 'lambda_v').onsite('B', '-lambda_v');
  // Cartesian bond vectors A -> B for the three neighbour cells (unit length).
  const bonds = [[SQRT3 / 2, 0.5], [-SQRT3 / 2, 0.5], [0, -1]];
  NN_CELLS.forEach((c, n) => {
    const [dx, dy] = bonds[n];
    // t + i lambda_R (s_x d_y - s_y d_x), d from A (j) to B (i).
    b.hopMatrix('A', 'B', c, { '0': 't', x: `i*lambda_R*(${dy})`, y: `-i*lambda_R*(${dx})` });
  });
  for (const c of NNN_CELLS) {
    b.hopMatrix('A', 'A', c, { z: '-i*lambda_SO' }).hopMatrix('B', 'B', c, { z: 'i*lambda_SO' });
  }
  return b.build();
}

/**
 * Four-band BHZ-type quantum spin Hall model on the square lattice, orbitals ordered
 * (s.up, p.up, s.dn, p.dn): H = diag(h(k), h*(-k)), h = d·tau with
 *   d = (A sin kx, -A sin ky, M - 2B(2 - cos kx - cos ky)).
 * Z2 = 1 for 0 < M/B < 4 and 4 < M/B < 8, 0 for M/B < 0 or > 8 (references.md).
 * Bernevig, Hughes, Zhang, Science 314, 1757 (2006).
 */
export function bhz(): ModelSpec {
  refuseOptions('bhz', arguments, bhz);
  return lattice('BHZ-type square-lattice model', [[1, 0], [0, 1]])
    .doc('Four-band BHZ-type quantum spin Hall model on the square lattice; Bernevig, Hughes, Zhang, Science 314, 1757 (2006).')
    .parameter('A', { default: 1, range: [-2, 2], unit: energyIn('B'), doc: 'spin–orbit (linear) term' })
    .parameter('B', { default: 1, range: [-2, 2], unit: energyIn('B'), doc: 'band curvature' })
    .parameter('M', { default: 1, range: [-10, 10], unit: energyIn('B'), doc: 'mass' })
    .site('s', [0, 0], { spin: true }).site('p', [0, 0], { spin: true })
    // spin (x) orbital: the Pauli string 'ab' is s_a (x) tau_b.
    .block('q', ['s.up', 'p.up', 's.dn', 'p.dn'])
    .onsiteMatrix('q', { '0z': 'M - 4*B' })
    .harmonic('q', [1, 0], { cos: { '0z': '2*B' }, sin: { zx: 'A' } })
    .harmonic('q', [0, 1], { cos: { '0z': '2*B' }, sin: { '0y': '-A' } })
    .build();
}

/**
 * Harper–Hofstadter model: square lattice, H = -t sum_<ij> e^{i theta_ij} c+_i c_j with flux p/q
 * per plaquette (counter-clockwise phase e^{+2 pi i p/q}, Landau gauge along a1, magnetic supercell
 * q x 1; see builders/flux.ts). q bands. Hofstadter, PRB 14, 2239 (1976); Thouless, Kohmoto,
 * Nightingale, den Nijs, PRL 49, 405 (1982).
 */
export function hofstadter(p = 1, q = 3): ModelSpec {
  for (const [field, value] of [['p', p], ['q', q]] as const) {
    if (typeof value !== 'number') throw new ModelError(`hofstadter.${field}`, `expected a whole number (hofstadter(p, q): flux p/q per plaquette). Value: ${valueText(value)}`);
  }
  const square = lattice('square lattice', [[1, 0], [0, 1]])
    .parameter('t', { default: 1, range: [-2, 2], unit: energyIn('t'), doc: 'nearest-neighbour hopping (H has -t)' })
    .site('a', [0, 0])
    .hop('a', 'a', [1, 0], '-t').hop('a', 'a', [0, 1], '-t')
    .build();
  return withDoc(
    magneticFlux(square, { p, q, name: `Harper–Hofstadter, flux ${p}/${q}` }),
    `Harper–Hofstadter model, flux ${p}/${q} per plaquette (counter-clockwise phase e^{+2 pi i p/q}); Hofstadter, PRB 14, 2239 (1976); Thouless et al., PRL 49, 405 (1982).`,
  );
}

export interface CoupledWireOptions {
  /** Wires in the result: its unit cell when periodic, the sample when open. Default 1. */
  wires?: number;
  boundary?: 'periodic' | 'open';
}

/**
 * A coupled-wire Chern insulator (a design of ours in the spirit of the wire construction of quantum
 * Hall states; common practice). Each wire is a two-site chain (a, b) with hoppings v = t + delta
 * (intracell) and w = t - delta (intercell), H_ab(k) = v + w e^{-ik}: at delta = 0 it is critical,
 * with a right mover (a + i b)/sqrt2 and a left mover (a - i b)/sqrt2 at k = pi; delta dimerizes it
 * (mass 2 delta sx at k = pi). Neighbouring wires are coupled by T = <n+1|H|n> = g (sx - i sz),
 * which is rank one: it takes the left mover of wire n to the right mover of wire n + 1 and
 * annihilates the right mover (so R_{n+1} pairs with L_n). Bulk:
 *   H(k, ky) = (v + w cos k + 2g cos ky) sx - w sin k sy + 2g sin ky sz.
 * The sz part breaks the chain's chiral symmetry, so a Chern number is allowed. The gap closes with
 * one Dirac cone at |delta| = |g| (k = pi; ky = pi for delta = g, ky = 0 for delta = -g) and, outside
 * the parameter ranges, at |g| = |t| (k = 0). C(lower) = +1 for |delta| < |g| < |t| (references.md
 * convention, either sign of g), 0 for |delta| > |g|.
 */
export function coupledWires(options: CoupledWireOptions = {}): ModelSpec {
  if (options === null || typeof options !== 'object' || Array.isArray(options)) throw new ModelError('coupledWires', `expected an options object {wires, boundary}. Value: ${valueText(options)}`);
  checkFields(options, ['wires', 'boundary'], 'coupledWires.', 'coupledWires() options');
  const chain = lattice('dimerized wire', [[1]])
    .parameter('t', { default: 1, range: [0.6, 2], unit: energyIn('t'), doc: 'mean hopping along a wire' })
    .parameter('delta', { default: 0.1, range: [-0.5, 0.5], unit: energyIn('t'), doc: 'dimerization: v = t + delta, w = t - delta' })
    .site('a', [0]).site('b', [0.5])
    .hop('a', 'b', [0], 't + delta')
    .hop('b', 'a', [1], 't - delta')
    .build();
  const stack = coupledWireArray(chain, {
    wires: options.wires,
    boundary: options.boundary,
    name: 'coupled-wire Chern insulator',
    parameters: { g: { default: 0.3, range: [-0.5, 0.5], unit: energyIn('t'), doc: 'inter-wire coupling, left mover of wire n to right mover of wire n+1' } },
    // T = g (sx - i sz): <n+1, a|H|n, a> = -i g, <n+1, b|H|n, b> = i g, <n+1, b|H|n, a> = <n+1, a|H|n, b> = g.
    couplings: [
      { from: 'a', to: 'a', cell: [0, 1], amplitude: { re: 0, im: '-g' } },
      { from: 'b', to: 'b', cell: [0, 1], amplitude: { re: 0, im: 'g' } },
      { from: 'a', to: 'b', cell: [0, 1], amplitude: 'g' },
      { from: 'b', to: 'a', cell: [0, 1], amplitude: 'g' },
    ],
  });
  return withDoc(stack, 'Coupled-wire Chern insulator (our design; the wire construction of quantum Hall states is common practice): dimerized wires (t, delta) left mover of wire n coupled to right mover of wire n+1 by g. C = 1 for |delta| < |g|, 0 for |delta| > |g|.');
}

/**
 * Two-band Weyl semimetal on the cubic lattice (common practice, from memory of the standard lattice
 * regularisation): H = t [sin kx sx + sin ky sy + (cos kz - cos k0 + m (2 - cos kx - cos ky)) sz].
 * For m > (1 + cos k0)/2 the gap closes only at kx = ky = 0, in two Weyl points (0, 0, ±k0) of
 * opposite chirality; smaller m adds Weyl points at kx or ky = pi. Inversion symmetric (P = sz),
 * time reversal broken.
 */
export function twoBandWeyl(): ModelSpec {
  refuseOptions('twoBandWeyl', arguments, twoBandWeyl);
  return lattice('two-band Weyl semimetal', [[1, 0, 0], [0, 1, 0], [0, 0, 1]])
    .doc('Two-band Weyl semimetal on the cubic lattice (common practice): Weyl points at (0, 0, ±k0).')
    .parameter('t', { default: 1, range: [-2, 2], unit: energyIn('t'), doc: 'overall energy scale' })
    .parameter('m', { default: 1, range: [0, 3], unit: '', doc: 'in-plane mass ratio that gaps kx, ky != 0' })
    .parameter('k0', { default: Math.PI / 2, range: [0, Math.PI], unit: 'rad', doc: 'Weyl points at kz = ±k0' })
    .site('a', [0, 0, 0]).site('b', [0, 0, 0]).block('s', ['a', 'b'])
    .onsiteMatrix('s', { z: 't*(2*m - cos(k0))' })
    .harmonic('s', [1, 0, 0], { cos: { z: '-t*m' }, sin: { x: 't' } })
    .harmonic('s', [0, 1, 0], { cos: { z: '-t*m' }, sin: { y: 't' } })
    .harmonic('s', [0, 0, 1], { cos: { z: 't' } })
    .build();
}

/**
 * Four-band topological insulator on the cubic lattice: the 3D lattice Dirac model (common practice;
 * the form of Qi, Hughes & Zhang, PRB 78, 195424 (2008), from memory), BHZ's parameters in 3D,
 * orbitals (s.up, p.up, s.dn, p.dn):
 *   H = A sum_i sin k_i s_i tau_x + (M - 2B sum_i (1 - cos k_i)) tau_z.
 * Inversion tau_z, time reversal i s_y K. The mass at a time-reversal-invariant momentum with n
 * components at pi is M - 4Bn, so by the Fu–Kane parity criterion (Fu & Kane, PRB 76, 045302 (2007))
 * it is a strong topological insulator for 0 < M/B < 4 and 8 < M/B < 12, weak (indices (1,1,1))
 * for 4 < M/B < 8, trivial outside; a strong one has an odd number of surface Dirac cones on every
 * surface (Fu, Kane & Mele, PRL 98, 106803 (2007)).
 */
export function cubicTI(): ModelSpec {
  refuseOptions('cubicTI', arguments, cubicTI);
  return lattice('cubic topological insulator', [[1, 0, 0], [0, 1, 0], [0, 0, 1]])
    .doc('Four-band 3D lattice Dirac model on the cubic lattice (common practice; Qi, Hughes & Zhang, PRB 78, 195424 (2008)): strong TI for 0 < M/B < 4, weak for 4 < M/B < 8.')
    .parameter('A', { default: 1, range: [-2, 2], unit: energyIn('B'), doc: 'spin–orbit (linear) term' })
    .parameter('B', { default: 1, range: [-2, 2], unit: energyIn('B'), doc: 'band curvature' })
    .parameter('M', { default: 2, range: [-4, 16], unit: energyIn('B'), doc: 'mass at Γ' })
    .site('s', [0, 0, 0], { spin: true }).site('p', [0, 0, 0], { spin: true })
    // spin (x) orbital: the Pauli string 'ab' is s_a (x) tau_b.
    .block('q', ['s.up', 'p.up', 's.dn', 'p.dn'])
    .onsiteMatrix('q', { '0z': 'M - 6*B' })
    .harmonic('q', [1, 0, 0], { cos: { '0z': '2*B' }, sin: { xx: 'A' } })
    .harmonic('q', [0, 1, 0], { cos: { '0z': '2*B' }, sin: { yx: 'A' } })
    .harmonic('q', [0, 0, 1], { cos: { '0z': '2*B' }, sin: { zx: 'A' } })
    .build();
}

/** Catalogue entries by name, for menus and the kernel's completion. */
export const CATALOGUE: Readonly<Record<string, () => ModelSpec>> = {
  ssh,
  riceMele,
  kitaevChain,
  qwz,
  haldane,
  kaneMele,
  bhz,
  hofstadter: () => hofstadter(),
  coupledWires: () => coupledWires(),
  twoBandWeyl,
  cubicTI,
};

/** A catalogue model by name; the error lists what exists. */
export function catalogueModel(name: string): ModelSpec {
  const make = Object.hasOwn(CATALOGUE, name) ? CATALOGUE[name] : undefined;
  if (make === undefined) throw new ModelError('catalogue', `no model ${valueText(name)} (known: ${Object.keys(CATALOGUE).join(', ')})`);
  return make();
}
