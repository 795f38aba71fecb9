import { describe, expect, it } from 'vitest';
import { CATALOGUE, catalogueModel, hofstadter, kaneMele, resolveParameters, validateModel } from '../../src/index.js';

describe('catalogue', () => {
  it('every model validates, cites its source, and gives each parameter a default, a range and a unit', () => {
    for (const [name, make] of Object.entries(CATALOGUE)) {
      const spec = validateModel(make());
      expect(spec.doc, name).toMatch(/\(\d{4}\)|common practice/);
      for (const [p, def] of Object.entries(spec.parameters)) {
        expect(def.range, `${name}.${p}`).toBeDefined();
        expect(def.unit, `${name}.${p}`).toBeDefined();
        expect(def.default).toBeGreaterThanOrEqual(def.range![0]);
        expect(def.default).toBeLessThanOrEqual(def.range![1]);
      }
      // Plain JSON: survives a round trip unchanged.
      expect(JSON.parse(JSON.stringify(spec))).toEqual(spec);
      expect(() => resolveParameters(spec)).not.toThrow();
    }
  });

  it('names parameters as in the papers', () => {
    expect(Object.keys(kaneMele().parameters)).toEqual(['t', 'lambda_SO', 'lambda_R', 'lambda_v']);
    expect(Object.keys(catalogueModel('haldane').parameters)).toEqual(['t1', 't2', 'phi', 'M']);
    expect(Object.keys(catalogueModel('kitaevChain').parameters).sort()).toEqual(['Delta', 'mu', 't']);
    expect(hofstadter(2, 7).orbitals).toHaveLength(7);
    expect(() => catalogueModel('graphite')).toThrow(/catalogue: no model "graphite" \(known: ssh, riceMele/);
  });
});
