// The edge and surface widgets in the exported page: the surface spectral function of QWZ and the
// constant-energy map of the two-band Weyl model draw from saved state, and dragging a parameter's
// slider recomputes them in the page's engine workers and changes the picture.
//   Qi, Wu & Zhang, PRB 74, 085308 (2006): in-gap edge states exist for -2 < u < 0 and 0 < u < 2
//     (C != 0); for |u| > 2 (C = 0) the gap holds no edge state.
//   Weyl model (catalogue, common practice): nodes at (0, 0, ±k0) of opposite chirality, projected
//     onto the (1 0 0) surface at k̄ = (0, ±k0 / 2pi); Wan, Turner, Vishwanath & Savrasov, PRB 83,
//     205101 (2011): the Fermi arc ends at them.
import type { Locator, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { qwz, twoBandWeyl } from '../../src/index.js';
import { artifactPath, control, drag, exportDemo, openPage, type DemoWidget, type OpenedPage } from './widgets-harness.js';

let opened: OpenedPage;
let page: Page;
const widget = (i: number): Locator => page.locator('.chernel-widget').nth(i);

const surfaceWidgets: DemoWidget[] = [
  { id: 'c0ffee0000000000000000000000c001', kind: 'surface-spectrum', spec: qwz(), values: { u: -1 }, options: { cut: 1, nk: 81, energyRange: [-3, 3], energyCount: 61, eta: 0.05 } },
  { id: 'c0ffee0000000000000000000000c002', kind: 'surface-map', spec: twoBandWeyl(), values: { k0: 1.5 }, options: { cut: 0, grid: 48, energy: 0 } },
];

/** Waits until the widget shows a result for the value its `name` box shows, drawn in full; returns the value. */
async function settled(w: Locator, name: string): Promise<number> {
  const { box } = control(w, name);
  const shown = await box.inputValue();
  await w.locator('.chernel-status', { hasText: `${name} = ${shown}` }).waitFor({ timeout: 60_000 });
  await w.locator('.chernel-plot:not(.chernel-stale)').waitFor();
  await expect.poll(() => w.locator('canvas.chernel-preview').count(), { timeout: 10_000 }).toBe(0);
  return Number(shown);
}

const picture = (w: Locator) => w.locator('.chernel-plot .imagelayer image').first().getAttribute('href');

interface Trace {
  name?: string;
  y?: number[];
}

function traces(w: Locator): Promise<Trace[]> {
  return w.locator('.chernel-plot').evaluate((el) => JSON.parse(JSON.stringify((el as unknown as { data: unknown[] }).data)) as Trace[]);
}

beforeAll(async () => {
  const { page: html } = exportDemo(surfaceWidgets, 'widgets-surface');
  opened = await openPage(html);
  page = opened.page;
});

afterAll(async () => {
  await opened?.close();
});

describe('edge and surface widgets in the exported page', () => {
  it('draw their saved results: three named panels in one picture, the cut and eta in the summary', async () => {
    for (const i of [0, 1]) {
      const w = widget(i);
      await w.locator('.chernel-plot .imagelayer image').first().waitFor({ timeout: 60_000 });
      expect(await w.locator('.chernel-status').textContent()).toContain('saved result');
      expect(await w.locator('.annotation-text').allTextContents()).toEqual(['bottom termination', 'top termination', 'bulk projection']);
      expect(await w.locator('.chernel-summary').textContent()).toMatch(/ · cut \(.*\) · η = /);
    }
    expect(await widget(0).locator('.chernel-title').textContent()).toBe('Surface spectral function · Qi–Wu–Zhang');
  });

  it('surface spectrum: dragging u out of the Chern phase changes the picture (the edge states go)', async () => {
    const w = widget(0);
    const before = await picture(w);
    const summaryBefore = await w.locator('.chernel-summary').textContent();
    const drawn: boolean[] = [];
    await page.exposeFunction('chernelSurfaceDrawn', (previewed: boolean) => drawn.push(previewed));
    await w.evaluate((el) => el.addEventListener('chernel-drawn', (e) => (window as unknown as { chernelSurfaceDrawn(p: boolean): void }).chernelSurfaceDrawn((e as CustomEvent<{ previewed: boolean }>).detail.previewed)));
    await drag(page, control(w, 'u').slider, -2.6);
    const u = await settled(w, 'u');
    expect(u).toBeLessThan(-2);
    expect(await picture(w)).not.toBe(before);
    expect(await w.locator('.chernel-summary').textContent()).not.toBe(summaryBefore);
    // The frame (path, energies) stays: the steps of the drag after the first full draw were previews.
    expect(drawn.length).toBeGreaterThan(1);
    expect(drawn.some((p) => p)).toBe(true);
    // At rest, the hover heatmap holds the weights: in the trivial phase the bottom edge has no
    // in-gap state at E = 0, so the weight there is far below the largest.
    const ratio = await w.locator('.chernel-plot').evaluate((el) => {
      const hover = (el as unknown as { data: { x: number[]; y: number[]; z: number[][] }[] }).data[0];
      const zero = hover.y.reduce((best, e, i) => (Math.abs(e) < Math.abs(hover.y[best]) ? i : best), 0);
      const columns = hover.x.length / 3;
      const bottomAtZero = Math.max(...hover.z[zero].slice(0, columns));
      const peak = Math.max(...hover.z.flatMap((row) => row.slice(0, columns)));
      return bottomAtZero / peak;
    });
    expect(ratio).toBeLessThan(0.05);
    await page.screenshot({ path: artifactPath('widgets-surface-spectrum.png'), fullPage: true });
  });

  it('surface map: dragging k0 moves the projected nodes and changes the picture', async () => {
    const w = widget(1);
    await w.scrollIntoViewIfNeeded();
    const before = await picture(w);
    await w.evaluate((el) => {
      const seen: boolean[] = ((window as unknown as { chernelMapDrawn: boolean[] }).chernelMapDrawn = []);
      el.addEventListener('chernel-drawn', (e) => seen.push((e as CustomEvent<{ previewed: boolean }>).detail.previewed));
    });
    await drag(page, control(w, 'k0').slider, 1.0);
    const k0 = await settled(w, 'k0');
    // The nodes move on every step, and the steps are still previews: the nodes are sketched over the picture.
    expect(await page.evaluate(() => (window as unknown as { chernelMapDrawn: boolean[] }).chernelMapDrawn.some((p) => p))).toBe(true);
    expect(Math.abs(k0 - 1.0)).toBeLessThan(0.1);
    expect(await picture(w)).not.toBe(before);
    const nodes = (await traces(w)).filter((t) => t.name?.startsWith('Weyl node'));
    expect(nodes.map((t) => t.name).sort()).toEqual(['Weyl node, chirality +1', 'Weyl node, chirality −1']);
    for (const t of nodes) expect(Math.abs(t.y![0])).toBeCloseTo(k0 / (2 * Math.PI), 3);
    expect(nodes[0].y![0]).toBeCloseTo(-nodes[1].y![0], 6);
    await page.screenshot({ path: artifactPath('widgets-surface-map.png'), fullPage: true });
  });

  it('ran without page errors', () => {
    expect(opened.errors).toEqual([]);
  });
});
