import { create, all } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { compileAmplitude, MAX_EXPRESSION_DEPTH, MAX_EXPRESSION_LENGTH } from '../../src/model/expressions.js';
import { ModelError } from '../../src/index.js';

/** An independent, complete mathjs instance: the reference for what an allowed expression means. */
const reference = create(all);

function evaluate(expr: string, values: Record<string, number>, parameters = Object.keys(values)): [number, number] {
  const out = new Float64Array(2);
  compileAmplitude(expr, 'terms[0].amplitude', new Set(parameters))(values, out, 0);
  return [out[0], out[1]];
}

function refusal(expr: string, parameters: string[] = []): ModelError {
  try {
    evaluate(expr, {}, parameters);
  } catch (error) {
    expect(error).toBeInstanceOf(ModelError);
    expect((error as ModelError).field).toBe('terms[0].amplitude');
    return error as ModelError;
  }
  throw new Error(`expected ${expr} to be refused`);
}

describe('model expressions: an allow-list, evaluated in an instance of their own', () => {
  it('evaluates arithmetic, elementary functions and complex parts as mathjs does (mathjs 15 reference instance)', () => {
    const cases: [string, Record<string, number>][] = [
      ['t2*exp(i*phi)', { t2: 0.3, phi: 1.1 }],
      ['-t*(cos(k) + i sin(k))^2 / sqrt3', { t: 1.5, k: 0.7 }],
      ['abs(1 + 2i) * arg(conj(3 - 4i)) + re(exp(i*pi/3)) - im(sqrt(-u))', { u: 2 }],
      ['atan2(y, 2) + log(x, 2) + cosh(x) - min(x, y) + max(x, y)^2 mod 3', { x: 1.2, y: -0.4 }],
      ['2 pi e + sign(-x) + floor(x) + ceil(x) + round(x) + hypot(x, y) + cbrt(8)', { x: 2.6, y: 1.1 }],
    ];
    for (const [expr, values] of cases) {
      const expected = reference.complex(reference.evaluate(expr, { ...values, sqrt3: Math.sqrt(3) }) as number);
      const [re, im] = evaluate(expr, values);
      expect(re).toBeCloseTo(expected.re, 12);
      expect(im).toBeCloseTo(expected.im, 12);
    }
  });

  it.each([
    ['config({predictable: true})', 'config'],
    ['evaluate("1")', 'evaluate'],
    ['parse("1")', 'parse'],
    ['import({})', 'import'],
    ['createUnit("quux")', 'createUnit'],
    ['random()', 'random'],
    ['simplify("x")', 'simplify'],
    ['derivative("x^2", "x")', 'derivative'],
    ['size(range(1, 1e9))', 'size'],
    ['zeros(1e5, 1e5)', 'zeros'],
    ['compile("1")', 'compile'],
    ['factorial(1e6)', 'factorial'],
  ])('refuses %s naming the field and the function', (expr, name) => {
    expect(refusal(expr).message).toContain(`calls "${name}"`);
  });

  it.each([
    ['size(range(1, 1e9))[1]', 'indexing'],
    ['[1, 2, 3]', 'matrix'],
    ['1:1e9', 'range'],
    ['a = 3', 'assignment'],
    ['f(x) = x', 'assignment'],
    ['sin.name', 'property'],
    ['{a: 1}', 'object'],
    ['1; 2', 'several statements'],
    ['"text"', 'only numbers'],
    ['x > 1 ? 1 : 0', 'conditional'],
    ['x == 1', 'operator'],
    ['5!', 'operator "!"'],
  ])('refuses %s (%s)', (expr, what) => {
    expect(refusal(expr, ['x']).message).toContain(what);
  });

  it('a refused model cannot change how the next one is evaluated', () => {
    const before = evaluate('0.1 + 0.2 * exp(i*phi)', { phi: 0.4 });
    for (const expr of ['config({predictable: true, number: "BigNumber"})', 'import({exp: 1}, {override: true})', 'createUnit("t")']) refusal(expr, ['phi']);
    expect(evaluate('0.1 + 0.2 * exp(i*phi)', { phi: 0.4 })).toEqual(before);
  });

  it(`bounds length (${MAX_EXPRESSION_LENGTH} characters) and nesting (${MAX_EXPRESSION_DEPTH}) without overflowing the stack`, () => {
    const long = Array.from({ length: 100_000 }, () => 't').join('+');
    expect(refusal(long, ['t']).message).toContain(`the limit is ${MAX_EXPRESSION_LENGTH}`);
    const deep = '('.repeat(200) + 't' + ')'.repeat(200);
    expect(refusal(deep, ['t']).message).toContain(`deeper than ${MAX_EXPRESSION_DEPTH}`);
    const chain = Array.from({ length: 300 }, () => 't').join('+');
    expect(refusal(chain, ['t']).message).toContain('deeper than');
    // A realistic long amplitude still works: 30 harmonics.
    const harmonics = Array.from({ length: 30 }, (_, n) => `cos(${n}*t)`).join(' + ');
    expect(evaluate(harmonics, { t: 0.3 })[0]).toBeCloseTo(Array.from({ length: 30 }, (_, n) => Math.cos(n * 0.3)).reduce((a, b) => a + b), 12);
  });
});
