// The hostile-input suite of the engine: seeded malformed requests and models through compute(),
// catalogue calls and widget options. Each must be refused with a ModelError naming the field, or
// give a correct result (the oracle: the result of the same request without the damage, when the
// damage is one a request may legitimately carry); no case may take 10 s. Counts are printed and
// reported in the README's "Reliability" section. (A fact of the trade: every input a notebook,
// a saved widget or a sweep file carries is untrusted data; common practice.)
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { checkWidgetOptions, WidgetOptionError } from '../../kernel/widget-state.js';
import {
  compute, haldane, setComputeBudget, type ComputeBudget, kaneMele, kitaevChain, ModelError, qwz, requestFields, ssh, twoBandWeyl, type DiagnosticRequest, type ModelSpec,
} from '../../src/index.js';
import * as catalogueFunctions from '../../src/model/catalogue.js';

/** mulberry32: a small seeded generator, so the suite is the same on every run. */
function generator(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}
const random = generator(20261205);
const pick = <T,>(xs: readonly T[]): T => xs[Math.floor(random() * xs.length)];

type Json = Record<string, unknown>;
const clone = <T,>(x: T): T => JSON.parse(JSON.stringify(x)) as T;

/** Small valid requests of every kind. */
const BASE: DiagnosticRequest[] = [
  { kind: 'bands', model: qwz(), pointsPerSegment: 6 },
  { kind: 'gap', model: qwz(), grid: 8 },
  { kind: 'gap-closings', model: qwz(), grid: 8, params: { u: 2 } },
  { kind: 'ribbon', model: qwz(), direction: 0, width: 4, nk: 9 },
  { kind: 'chern', model: haldane(), grid: 12 },
  { kind: 'curvature', model: qwz(), grid: 8, params: { u: -1 } },
  { kind: 'wannier-flow', model: qwz(), grid: 8 },
  { kind: 'berry-phase', model: ssh(), points: 24 },
  { kind: 'z2', model: kaneMele(), grid: [12, 12] },
  { kind: 'spin-chern', model: kaneMele(), grid: 8, params: { lambda_R: 0 } },
  { kind: 'winding', model: ssh(), points: 32 },
  { kind: 'majorana', model: kitaevChain() },
  { kind: 'weyl', model: twoBandWeyl(), grid: 6 },
  { kind: 'hall', model: qwz(), grid: 8 },
  { kind: 'phase-map', model: qwz(), quantity: 'chern', grid: 8, axes: [{ param: 'u', from: -3, to: 3, count: 4 }] },
  { kind: 'bott', model: qwz(), sizes: [4, 4], onsiteDisorder: 1, seed: 2 },
  { kind: 'local-marker', model: qwz(), sizes: [4, 4] },
  { kind: 'surface-spectrum', model: qwz(), cut: 1, nk: 8, energyCount: 8 },
  { kind: 'bulk-boundary', model: ssh(), cut: 0 },
];

/** What a case expects: a refusal naming a field that matches, or the result of an equivalent request. */
type Expect = { refuse: RegExp } | { sameAs: DiagnosticRequest } | { refuseOrSameAs: DiagnosticRequest };
interface Case {
  name: string;
  run: () => unknown;
  expect: Expect;
}

const escape = (s: string) => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');

function typo(name: string): string {
  const i = Math.floor(random() * name.length);
  switch (Math.floor(random() * 4)) {
    case 0: return name.slice(0, i) + name.slice(i + 1) || name + 'x'; // drop a letter
    case 1: return name.slice(0, i) + name[i] + name.slice(i); // double one
    case 2: return i < name.length - 1 ? name.slice(0, i) + name[i + 1] + name[i] + name.slice(i + 2) : name + 's'; // swap two
    default: return name.slice(0, i) + (name[i] === 'e' ? 'a' : 'e') + name.slice(i + 1); // change one
  }
}

function fieldsOf(request: DiagnosticRequest): string[] {
  return [...requestFields(request.kind, request.kind === 'phase-map' ? 'chern' : undefined)];
}

const cases: Case[] = [];
const add = (name: string, run: () => unknown, expected: Expect) => cases.push({ name, run, expect: expected });

// 1. Misspelt and unknown fields on every kind.
for (const base of BASE) {
  const valid = fieldsOf(base);
  for (let n = 0; n < 6; n++) {
    const field = pick(valid.filter((f) => f !== 'kind'));
    const wrong = typo(field);
    if (valid.includes(wrong)) continue;
    add(`${base.kind}: misspelt ${field} as ${wrong}`, () => compute({ ...base, [wrong]: (base as unknown as Json)[field] ?? 1 } as DiagnosticRequest), { refuse: new RegExp(`^${escape(wrong)}$`) });
  }
  add(`${base.kind}: "param" for "params"`, () => compute({ ...base, param: { u: 3 } } as DiagnosticRequest), { refuse: /^param$/ });
  add(`${base.kind}: an unknown field`, () => compute({ ...base, [`x${Math.floor(random() * 1e6)}`]: true } as DiagnosticRequest), { refuse: /^x\d+$/ });
}

// 2. Parameter values: unknown names (inherited ones included), out of range, not numbers.
for (const base of BASE) {
  const names = Object.keys(base.model.parameters);
  for (const bad of ['__proto__', 'toString', 'constructor', 'valueOf', 'hasOwnProperty', 'nope']) {
    add(`${base.kind}: params.${bad}`, () => compute({ ...base, params: JSON.parse(`{"${bad}": 1}`) } as DiagnosticRequest), { refuse: new RegExp(`^params\\.${escape(bad)}$`) });
  }
  const name = names.find((n) => base.model.parameters[n].range && !(base.kind === 'phase-map' && n === 'u'));
  if (name) {
    const [lo, hi] = base.model.parameters[name].range!;
    add(`${base.kind}: params.${name} above its range`, () => compute({ ...base, params: { [name]: hi + (hi - lo) } }), { refuse: new RegExp(`^params\\.${name}$`) });
    for (const v of [Number.NaN, Infinity, '1', null, [1], { v: 1 }]) {
      add(`${base.kind}: params.${name} = ${JSON.stringify(v)}`, () => compute({ ...base, params: { [name]: v as number } }), { refuse: new RegExp(`^params(\\.${name})?$`) });
    }
  }
  for (const v of [null, 3, 'u=1', [1, 2]]) add(`${base.kind}: params = ${JSON.stringify(v)}`, () => compute({ ...base, params: v as never }), { refuse: /^params$/ });
}

// 3. Sizes: garbage of every type, and sizes that cannot fit.
const SIZE_FIELD: Partial<Record<DiagnosticRequest['kind'], string>> = {
  bands: 'pointsPerSegment', gap: 'grid', 'gap-closings': 'grid', ribbon: 'width', chern: 'grid', curvature: 'grid',
  'wannier-flow': 'grid', 'berry-phase': 'points', z2: 'grid', 'spin-chern': 'grid', winding: 'points', weyl: 'grid', hall: 'grid',
  'surface-spectrum': 'nk', 'bulk-boundary': 'width',
};
for (const base of BASE) {
  const field = SIZE_FIELD[base.kind];
  if (!field) continue;
  const without = { ...base } as Json;
  delete without[field];
  for (const v of [-1, 0, 1.5, 'big', Number.NaN, Infinity, [], {}, true]) {
    // Refused, or (for a value read as "not given") the result with the field left out.
    add(`${base.kind}: ${field} = ${JSON.stringify(v)}`, () => compute({ ...base, [field]: v } as DiagnosticRequest), field === 'width' ? { refuse: /width/ } : { refuseOrSameAs: without as unknown as DiagnosticRequest });
  }
  for (const v of [1e7, 1e9, 2 ** 31, 1e15]) {
    add(`${base.kind}: ${field} = ${v}`, () => compute({ ...base, [field]: v } as DiagnosticRequest), { refuse: new RegExp(`${escape(field)}|model\\.orbitals`) });
  }
}
// A finite sample's cells, disorder and seed (the real-space kinds): garbage is refused naming the field.
for (const base of BASE.filter((b) => b.kind === 'bott' || b.kind === 'local-marker')) {
  for (const v of [[-1, 4], [0, 4], [1.5, 4], ['big', 4], [4], [4, 4, 4], [], 'big', 4, null, [1e5, 1e5]]) {
    add(`${base.kind}: sizes = ${JSON.stringify(v)}`, () => compute({ ...base, sizes: v } as DiagnosticRequest), { refuse: /^sizes/ });
  }
  for (const [field, v] of [['onsiteDisorder', -1], ['onsiteDisorder', 'big'], ['seed', 1.5], ['seed', -3], ['vacancies', 1], ['boundary', 'twisted']] as const) {
    add(`${base.kind}: ${field} = ${JSON.stringify(v)}`, () => compute({ ...base, [field]: v } as DiagnosticRequest), { refuse: new RegExp(`^${field}`) });
  }
}
for (const count of [1e6, 1e9, 1e12]) {
  add(`phase-map: an axis of ${count} points`, () => compute({ ...BASE[14], axes: [{ param: 'u', from: -3, to: 3, count }] } as DiagnosticRequest), { refuse: /^axes\[0\]\.count$/ });
}

// 4. Requests that are not requests, kinds that do not exist.
for (const r of [null, undefined, 3, 'chern', [], [BASE[0]]]) add(`request = ${JSON.stringify(r)}`, () => compute(r as never), { refuse: /^(request|kind)$/ });
for (const k of ['chrn', 'Chern', 'band', 'phase_map', '', 'constructor', '__proto__']) add(`kind = ${JSON.stringify(k)}`, () => compute({ ...BASE[4], kind: k } as never), { refuse: /^kind$/ });

// 5. Hostile models: structure, references, lattices, and expressions that are code, not data.
const model = (edit: (m: Json) => void): ModelSpec => {
  const m = clone(qwz()) as unknown as Json;
  edit(m);
  return m as unknown as ModelSpec;
};
const terms = (m: Json) => m.terms as Json[];
const MODEL_DAMAGE: [string, (m: Json) => void, RegExp][] = [
  ['format changed', (m) => (m.format = 'other'), /format/],
  ['version 2', (m) => (m.version = 2), /version/],
  ['orbitals dropped', (m) => delete m.orbitals, /orbitals/],
  ['orbitals empty', (m) => (m.orbitals = []), /orbitals/],
  ['terms misspelt', (m) => ((m.term = m.terms), delete m.terms), /^term$/],
  ['extra model field', (m) => (m.hoppings = []), /^hoppings$/],
  ['orbital field misspelt', (m) => ((m.orbitals as Json[])[0].positon = [0, 0]), /^orbitals\[0\]\.positon$/],
  ['term field misspelt', (m) => (terms(m)[0].amplitud = 1), /^terms\[0\]\.amplitud$/],
  ['parameter field misspelt', (m) => ((m.parameters as Json).u = { ...(m.parameters as Json).u as Json, rnage: [0, 1] }), /^parameters\.u\.rnage$/],
  ['term to an unknown orbital', (m) => (terms(m)[0].to = 'C'), /^terms\[0\]\.to$/],
  ['term cell too short', (m) => (terms(m)[1].cell = [1]), /^terms\[1\]\.cell$/],
  ['term cell fractional', (m) => (terms(m)[1].cell = [0.5, 0]), /^terms\[1\]\.cell$/],
  ['collinear vectors', (m) => (m.vectors = [[1, 0], [1, 1e-13]]), /^vectors$/],
  ['zero vector', (m) => (m.vectors = [[0, 0], [0, 1]]), /^vectors/],
  ['periodic 4', (m) => (m.periodic = 4), /^periodic$/],
  ['duplicate label', (m) => ((m.orbitals as Json[])[1].label = (m.orbitals as Json[])[0].label), /^orbitals\[1\]\.label$/],
  ['parameter named __proto__', (m) => (m.parameters = JSON.parse('{"__proto__": {"default": 1}}')), /^parameters\.__proto__$/],
  ['parameter named constructor', (m) => (m.parameters = { constructor: { default: 1 } }), /^parameters\.constructor$/],
  ['parameter default outside range', (m) => ((m.parameters as Json).u = { default: 9, range: [0, 1] }), /^parameters\.u\.default$/],
];
for (const [name, edit, field] of MODEL_DAMAGE) add(`model: ${name}`, () => compute({ kind: 'bands', model: model(edit), pointsPerSegment: 4 }), { refuse: field });
const HOSTILE_EXPRESSIONS = [
  'config({predictable: true})', 'import({sin: 1}, {override: true})', 'createUnit("t")', 'evaluate("1")', 'parse("1")', 'compile("1")',
  'simplify("u")', 'derivative("u^2", "u")', 'random()', 'randomInt(9)', 'size(range(1, 1e9))[1]', 'zeros(1e5, 1e5)', 'ones(9)', '1:1e9',
  '[1, 2]', '{a: 1}', 'u = 3', 'f(x) = x', 'sin.name', 'u > 1 ? 1 : 0', '"text"', '5!', 'help(sin)', 'chain(1)', 'reviver()', 'resolve(u)',
  'Array', 'globalThis', 'process', 'this', '__proto__', 'constructor', 'u; 1', 'eval("1")', 'Function("return 1")()',
  Array.from({ length: 100000 }, () => 'u').join('+'), '('.repeat(500) + 'u' + ')'.repeat(500), Array.from({ length: 400 }, () => 'u').join('*'),
  '1/0', 'log(0)', 'sqrt(-1) + 1/(u - u)',
];
for (const expr of HOSTILE_EXPRESSIONS) {
  add(`amplitude ${expr.slice(0, 40)}`, () => compute({ kind: 'bands', model: model((m) => (terms(m)[1].amplitude = expr)), pointsPerSegment: 4 }), { refuse: /^terms\[1\]\.amplitude$/ });
}
// After every hostile expression, an innocent model still gives its own result (nothing is shared).
add('innocent model after the hostile ones', () => compute({ kind: 'chern', model: haldane(), grid: 12 }), { sameAs: { kind: 'chern', model: haldane(), grid: 12 } });

// 6. Legitimate variations that must give the same result: key order, explicit defaults.
for (const base of BASE) {
  const reordered = Object.fromEntries(Object.entries(base).reverse()) as unknown as DiagnosticRequest;
  add(`${base.kind}: fields in another order`, () => compute(reordered), { sameAs: base });
  const defaults = Object.fromEntries(Object.entries(base.model.parameters).map(([n, p]) => [n, p.default]));
  if (base.kind !== 'phase-map') add(`${base.kind}: every default given explicitly`, () => compute({ ...base, params: { ...defaults, ...base.params } }), { sameAs: base });
}

// 7. Catalogue calls and widget options.
for (const [name, make] of Object.entries(catalogueFunctions.CATALOGUE)) {
  const direct = (catalogueFunctions as Record<string, (...a: unknown[]) => unknown>)[name];
  if (direct && make.length === 0 && direct.length === 0) add(`${name}({uu: 3})`, () => direct({ uu: 3 }), { refuse: new RegExp(`^${name}(\\.|$)`) });
}
for (const [kind, option] of [['curvature', 'gird'], ['wannier-flow', 'invarient'], ['bands', 'pointsPerSegmnt'], ['ribbon', 'widht'], ['phase-map', 'axis'], ['curvature', 'params'], ['bands', 'value']] as const) {
  add(`show(model, {kind: ${kind}, ${option}})`, () => checkWidgetOptions(kind, { [option]: 1 }), { refuse: new RegExp(`^${option}$`) });
}

const LIMIT_MS = 10_000;

function fieldOf(error: unknown): string | null {
  if (error instanceof ModelError) return error.field;
  if (error instanceof WidgetOptionError) return error.message.slice(0, error.message.indexOf(':'));
  return null;
}

describe('hostile requests and models (seeded)', () => {
  // A time budget of 5 s: what the estimate lets through must finish well inside the 10 s limit.
  let previous: ComputeBudget;
  beforeAll(() => (previous = setComputeBudget({ seconds: 5 })));
  afterAll(() => setComputeBudget(previous));

  it(`refuses each naming the field, or gives the correct result; none takes ${LIMIT_MS / 1000} s`, { timeout: 600_000 }, () => {
    let refused = 0;
    let correct = 0;
    const failures: string[] = [];
    let slowest = 0;
    for (const c of cases) {
      const started = performance.now();
      let outcome: { value: unknown } | { error: unknown };
      try {
        outcome = { value: c.run() };
      } catch (error) {
        outcome = { error };
      }
      const ms = performance.now() - started;
      slowest = Math.max(slowest, ms);
      if (ms > LIMIT_MS) failures.push(`${c.name}: took ${ms.toFixed(0)} ms`);
      if ('error' in outcome) {
        const field = fieldOf(outcome.error);
        const pattern = 'refuse' in c.expect ? c.expect.refuse : null;
        if (field === null) failures.push(`${c.name}: not a ModelError naming a field: ${String(outcome.error)}`);
        else if (!(outcome.error as Error).message.startsWith(field)) failures.push(`${c.name}: the message does not start with its field`);
        else if ('sameAs' in c.expect) failures.push(`${c.name}: refused a legitimate request: ${(outcome.error as Error).message}`);
        else if (pattern && !pattern.test(field)) failures.push(`${c.name}: refused naming ${field}, expected ${pattern}`);
        else refused++;
        continue;
      }
      const reference = 'sameAs' in c.expect ? c.expect.sameAs : 'refuseOrSameAs' in c.expect ? c.expect.refuseOrSameAs : null;
      if (reference === null) {
        failures.push(`${c.name}: a silent result where a refusal was due`);
        continue;
      }
      try {
        expect(c.run()).toEqual(compute(reference));
        correct++;
      } catch (error) {
        failures.push(`${c.name}: a result that differs from the correct one (${(error as Error).message.slice(0, 120)})`);
      }
    }
    console.log(`hostile-input suite: ${cases.length} cases, ${refused} refused naming the field, ${correct} correct results, ${failures.length} failures, slowest ${slowest.toFixed(0)} ms`);
    expect(failures).toEqual([]);
    expect(cases.length).toBeGreaterThanOrEqual(300);
    expect(refused + correct).toBe(cases.length);
  });
});
