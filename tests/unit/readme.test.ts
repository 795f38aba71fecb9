/**
 * README.md's API tour runs as written: each ```ts block of the tour runs with the engine's public
 * API in scope (as in a chernel cell), and every `console.log(...); // → expected` prints that.
 */
import { readFileSync } from 'node:fs';
import { transformSync } from 'esbuild';
import { describe, expect, it } from 'vitest';
import * as engine from '../../src/index.js';

const readme = readFileSync(new URL('../../README.md', import.meta.url), 'utf8');
const tour = readme.slice(readme.indexOf('## A tour of the API'), readme.indexOf('## Conventions'));
const blocks = [...tour.matchAll(/```ts\n([\s\S]*?)```/g)].map((m) => m[1]);

function format(value: unknown): string {
  return typeof value === 'string' ? value : String(value);
}

describe('README API tour', () => {
  it('has blocks to run', () => expect(blocks.length).toBeGreaterThan(4));

  blocks.forEach((source, index) => {
    it(`block ${index + 1} runs and prints what it says`, async () => {
      const expected = source.split('\n').filter((l) => l.includes('console.log(')).map((l) => l.split('// → ')[1]?.trim());
      const printed: string[] = [];
      const { code } = transformSync(`(async () => {\n${source}\n})()`, { loader: 'ts' });
      const names = Object.keys(engine);
      const console = { log: (...args: unknown[]) => printed.push(args.map(format).join(' ')) };
      const run = new Function(...names, 'console', `return ${code}`) as (...args: unknown[]) => Promise<void>;
      await run(...names.map((n) => (engine as Record<string, unknown>)[n]), console);
      expect(printed).toHaveLength(expected.length);
      expected.forEach((want, i) => {
        if (want === undefined) return;
        const got = printed[i];
        const numbers = want.split(' ').every((w) => !Number.isNaN(Number(w)));
        if (numbers) {
          const g = got.split(' ').map(Number);
          // Relative to the value: the Hall conductance in siemens is 3.9e-5.
          want.split(' ').map(Number).forEach((w, j) => expect(Math.abs(g[j] - w)).toBeLessThanOrEqual(1e-9 * Math.abs(w) + 1e-12));
        } else if (want.length < got.length) expect(got.startsWith(want)).toBe(true);
        else expect(got).toBe(want);
      });
    });
  });
});
