// Sliders for request options (contract/option-sliders.ts): checks in the kernel (names, ranges,
// steps), the request they make, and the saved-state check that accepts their values.
import { describe, expect, it } from 'vitest';
import { qwz } from '../../src/index.js';
import { computeView } from '../../src/views.js';
import { optionSlidersProblem, requestValues, widgetRequest } from '../../contract/option-sliders.js';
import { diagnosticStateProblem } from '../../contract/state-check.js';
import { checkControlValues, checkOptionSliders, checkWidgetOptions, WidgetOptionError } from '../../kernel/widget-state.js';
import type { ModelSpecView } from '../../contract/protocol.js';

const spec = qwz();
const view = spec as unknown as ModelSpecView;
const options = { sizes: [8, 8], optionSliders: { onsiteDisorder: [0, 8], seed: [0, 99, 1] } };

describe('option sliders', () => {
  it('are a widget option of every kind; their names must be options of the request, not model parameters', () => {
    expect(() => checkWidgetOptions('local-marker', options)).not.toThrow();
    expect(() => checkOptionSliders('local-marker', spec, options)).not.toThrow();
    const refuse = (sliders: unknown, field: RegExp, why: RegExp) => {
      let caught: unknown;
      try {
        checkOptionSliders('local-marker', spec, { optionSliders: sliders });
      } catch (err) {
        caught = err;
      }
      expect(caught).toBeInstanceOf(WidgetOptionError);
      expect((caught as Error).message).toMatch(field);
      expect((caught as Error).message).toMatch(why);
    };
    refuse({ u: [0, 1] }, /^optionSliders\.u: /, /model parameter/);
    refuse({ onsiteDisorde: [0, 1] }, /^optionSliders\.onsiteDisorde: /, /not an option of this widget's request/);
    refuse({ seed: [5, 1] }, /^optionSliders\.seed: /, /from < to/);
    refuse({ seed: [0, 9, 0] }, /^optionSliders\.seed: /, /positive step/);
    refuse({ seed: '0..9' }, /^optionSliders\.seed: /, /\[from, to\]/);
    refuse([1, 2], /^optionSliders: /, /expected an object/);
  });

  it('start at the given value, else the request option, else the low end; refuse values off range or off step', () => {
    const start = checkControlValues(spec, { ...options, onsiteDisorder: 2 }, { u: -1 }, 'values', true);
    expect(start).toEqual({ u: -1, onsiteDisorder: 2, seed: 0 });
    expect(checkControlValues(spec, options, { seed: 7 }, 'values', true)).toEqual({ seed: 7, onsiteDisorder: 0 });
    expect(() => checkControlValues(spec, options, { seed: 2.5 }, 'setValues')).toThrow(/^setValues\.seed: expected 0 plus a whole number of steps of 1/);
    expect(() => checkControlValues(spec, options, { onsiteDisorder: 9 }, 'setValues')).toThrow(/^setValues\.onsiteDisorder: outside its slider's range \[0, 8\]/);
    // A parameter keeps the model's own check and message.
    expect(() => checkControlValues(spec, options, { v: 1 }, 'setValues')).toThrow(/setValues\.v: model ".*" has no parameter "v"/);
    expect(() => checkControlValues(spec, { ...options, onsiteDisorder: 10 }, {}, 'values', true)).toThrow(/^onsiteDisorder: the request's value does not fit its slider/);
  });

  it("make the request: parameters as params, option values as options, the widget's own option left out", () => {
    const request = widgetRequest('local-marker', view, options, { u: -1, onsiteDisorder: 3, seed: 4 });
    expect(request).toEqual({ sizes: [8, 8], onsiteDisorder: 3, seed: 4, kind: 'local-marker', model: view, params: { u: -1 } });
    // The engine takes it as is (its own field check refuses unknown options).
    const result = computeView(request) as unknown as { disorder: { seed: number; onsite: { width: number } } };
    expect(result.disorder.seed).toBe(4);
    expect(result.disorder.onsite.width).toBe(3);
  });

  it('"option.key" drags one entry of an object option (a parameter\'s disorder width), keeping the entries it does not drag', () => {
    const chain = { sizes: [30], parameterDisorder: { u: 0.5 }, optionSliders: { 'parameterDisorder.u': [0, 4], seed: [0, 9, 1] } };
    expect(() => checkOptionSliders('local-marker', spec, chain)).not.toThrow();
    expect(() => checkOptionSliders('local-marker', spec, { optionSliders: { 'parameterDisorderr.u': [0, 1] } })).toThrow(/^optionSliders\.parameterDisorderr\.u: not an option/);
    const start = checkControlValues(spec, chain, { u: -1 }, 'values', true);
    expect(start).toEqual({ u: -1, 'parameterDisorder.u': 0.5, seed: 0 });
    const request = widgetRequest('local-marker', view, { ...chain, sizes: [6, 6] }, { ...start, 'parameterDisorder.u': 2 });
    expect(request.parameterDisorder).toEqual({ u: 2 });
    const result = computeView(request) as unknown as { disorder: { parameters: { widths: Record<string, number> } } };
    expect(result.disorder.parameters.widths).toEqual({ u: 2 });
    expect(requestValues(chain, request as unknown as Record<string, unknown> & { params: Record<string, number> })).toEqual({ u: -1, 'parameterDisorder.u': 2, seed: 0 });
    expect(diagnosticStateProblem({ kind: 'local-marker', spec, options: chain, values: start, result: null })).toBeNull();
  });

  it('saved state: slider values are accepted beside parameter values; an old state without sliders still opens', () => {
    const state = { kind: 'local-marker', spec, options, values: { u: -1, onsiteDisorder: 3, seed: 4 }, result: null };
    expect(diagnosticStateProblem(state)).toBeNull();
    expect(diagnosticStateProblem({ ...state, options: { sizes: [8, 8] } })).toBe('values.onsiteDisorder: not a parameter of the saved model');
    expect(diagnosticStateProblem({ ...state, options: { sizes: [8, 8] }, values: { u: -1 } })).toBeNull();
    expect(diagnosticStateProblem({ ...state, options: { optionSliders: { seed: [3, 1] } } })).toMatch(/^options\.optionSliders\.seed: expected from < to/);
    expect(optionSlidersProblem(undefined, {})).toBeNull();
  });

  it("a phase map swept over a request option (disorder): a click's value there places the point, never the request", () => {
    const map = { axes: [{ param: 'onsiteDisorder', from: 0, to: 4, count: 2 }, { param: 'u', from: -3, to: -1, count: 2 }], quantity: 'ensemble', of: 'bott', samples: 2, sizes: [6, 6] };
    const values = checkControlValues(spec, map, { u: -1, onsiteDisorder: 2 }, 'values (from the front end)');
    expect(values).toEqual({ u: -1, onsiteDisorder: 2 });
    expect(() => checkControlValues(spec, map, { onsiteDisorder: 'x' }, 'setValues')).toThrow(/^setValues\.onsiteDisorder: must be a finite number/);
    const request = widgetRequest('phase-map', view, map, values);
    expect(request.params).toEqual({ u: -1 });
    expect(request.onsiteDisorder).toBeUndefined();
    const result = computeView(request) as unknown as { values: number[] };
    expect(result.values).toHaveLength(4);
    expect(diagnosticStateProblem({ kind: 'phase-map', spec, options: map, values, result: null })).toBeNull();
  });
});
