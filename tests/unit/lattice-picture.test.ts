// A model's lattice as drawn (kernel/display/lattice.ts -> figures/lattice.ts), and the
// density-of-states figure. Geometry of the honeycomb lattice (second neighbours sqrt(3) times as
// far as first neighbours) is common practice; the Haldane model's hoppings (t1 real, t2 e^{±i phi}
// on the two sublattices) are from Haldane, PRL 61, 2015 (1988); the SSH chain's (v inside the
// cell, w between cells) from Su, Schrieffer, Heeger, PRL 42, 1698 (1979).
import { describe, expect, it } from 'vitest';
import { displayOutputs } from '../../kernel/display/index.js';
import { latticePicture } from '../../kernel/display/lattice.js';
import { show } from '../../kernel/widgets.js';
import { BlochHamiltonian, densityOfStates, haldane, ssh } from '../../src/index.js';
import { figureFor } from '../../figures/index.js';
import { phaseColour } from '../../figures/lattice.js';
import type { ViewResult } from '../../contract/protocol.js';

const length = (b: { x0: number; y0: number; x1: number; y1: number }) => Math.hypot(b.x1 - b.x0, b.y1 - b.y0);

describe('lattice picture', () => {
  it('SSH chain: three cells, the two hoppings of the home cell with their amplitudes at the given values', () => {
    const picture = latticePicture(ssh(), { v: 0.3, w: 1 });
    expect(picture.sites).toHaveLength(3 * 2);
    const home = picture.bonds.filter((b) => b.home);
    expect(home.map((b) => b.re).sort()).toEqual([0.3, 1]);
    expect(home.every((b) => b.im === 0)).toBe(true);
    // A at 0, B at 1/2 of a unit cell: both bonds half a cell long.
    for (const b of home) expect(length(b)).toBeCloseTo(0.5, 12);
    expect(picture.unitCell).toEqual([[0, 0], [1, 0]]);
  });

  it('Haldane: first neighbours real, second neighbours t2 e^{±i phi}, sqrt(3) times as far', () => {
    const phi = 0.7;
    const picture = latticePicture(haldane(), { t1: 1, t2: 0.15, phi });
    const home = picture.bonds.filter((b) => b.home);
    const first = home.filter((b) => Math.abs(b.im) < 1e-12 && Math.abs(b.re - 1) < 1e-12);
    const second = home.filter((b) => Math.abs(Math.hypot(b.re, b.im) - 0.15) < 1e-12);
    expect(first).toHaveLength(3);
    expect(second).toHaveLength(6);
    const nn = length(first[0]);
    for (const b of first) expect(length(b)).toBeCloseTo(nn, 12);
    for (const b of second) expect(length(b)).toBeCloseTo(Math.sqrt(3) * nn, 12);
    const phases = second.map((b) => Math.abs(Math.atan2(b.im, b.re)));
    for (const p of phases) expect(p).toBeCloseTo(phi, 12);
    // The sublattice mass M: +M on A, -M on B (catalogue default 0.2).
    expect(picture.onsite).toEqual([0.2, -0.2]);
  });

  it('draws bonds coloured by phase (opposite phases, different colours), sites per orbital, the unit cell', () => {
    expect(phaseColour(0.7)).not.toBe(phaseColour(-0.7));
    expect(phaseColour(0)).toBe(phaseColour(2 * Math.PI));
    const figure = figureFor(latticePicture(haldane()) as unknown as ViewResult, { spec: haldane() as never, values: {}, options: {} });
    const names = figure.data.map((t) => (t as { name?: string }).name);
    expect(names).toContain('unit cell');
    expect(names).toEqual(expect.arrayContaining(['A (onsite 0.2)', 'B (onsite -0.2)']));
    expect(figure.summary).toMatch(/^2 orbitals, 9 hoppings from the home cell/);
  });

  it("a model's display is its summary and its lattice; show(model, {kind: 'lattice'}) draws it at given values", () => {
    const outputs = displayOutputs(haldane());
    expect(outputs).toHaveLength(2);
    expect(outputs[0].data['text/html']).toContain('<table');
    expect(Object.keys(outputs[1].data).sort()).toEqual(['application/vnd.plotly.v1+json', 'image/png', 'text/plain']);
    const drawing = show(ssh(), { kind: 'lattice', values: { v: 0.2 } });
    expect(drawing.picture.bonds.filter((b) => b.home).map((b) => b.re).sort()).toEqual([0.2, 1]);
    expect(() => show(ssh(), { kind: 'lattice', values: { v: 9 } })).toThrow('values.v: outside its declared range [-2, 2]. Value: 9');
  });
});

describe('density-of-states figure', () => {
  it('draws the density against energy and says how it was computed', () => {
    const dos = densityOfStates(new BlochHamiltonian(haldane(), {}), { grid: 60 });
    const [summary, figure] = displayOutputs(dos);
    expect(summary.data['text/plain']).toMatch(/^dos result/);
    expect(figure.data['text/plain']).toBe('dos figure: 2 bands · linear on simplices, no broadening');
    const trace = (figure.data['application/vnd.plotly.v1+json'] as { data: { x: number[]; y: number[] }[] }).data[0];
    expect(trace.x).toHaveLength(dos.energy.length);
    expect(trace.y[10]).toBeCloseTo(dos.density[10], 4);
  });
});
