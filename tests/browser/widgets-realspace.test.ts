// Real-space widgets in the exported page (headless Chromium): a local Chern marker map whose
// disorder strength and seed are request options with sliders (optionSliders), and a local density
// map. Dragging either slider recomputes the map in the page's engine worker; the same seed gives
// the same picture. Physics: Qi, Wu, Zhang, PRB 74, 085308 (2006): QWZ C(lower) = +1 at u = -1
// (convention of /work/shared/references.md), the bulk value the clean marker approaches.
import type { Locator, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { qwz, ssh } from '../../src/index.js';
import { artifactPath, control, drag, exportDemo, openPage, type DemoWidget, type OpenedPage } from './widgets-harness.js';

let opened: OpenedPage;
let page: Page;
const widget = (i: number): Locator => page.locator('.chernel-widget').nth(i);

const WIDGETS: DemoWidget[] = [
  {
    id: 'c0ffee0000000000000000000000c001',
    kind: 'local-marker',
    spec: qwz(),
    values: { u: -1 },
    options: { sizes: [12, 12], optionSliders: { onsiteDisorder: [0, 8], seed: [0, 40, 1] } },
  },
  { id: 'c0ffee0000000000000000000000c002', kind: 'local-density', spec: qwz(), values: { u: -1 }, options: { sizes: [10, 10], energy: 0, method: 'dense' } },
  // A trivial chain (v = 1.2 > w = 1, Su, Schrieffer & Heeger) whose intracell disorder width is a slider.
  {
    id: 'c0ffee0000000000000000000000c003',
    kind: 'local-density',
    spec: ssh(),
    values: { v: 1.2, w: 1 },
    options: { sizes: [40], energy: 0, method: 'dense', seed: 2, optionSliders: { 'parameterDisorder.v': [0, 6] } },
  },
];

/** Waits for the result of the value the box shows, drawn in full by plotly; returns the value and the picture. */
async function settled(w: Locator, name: string): Promise<{ value: number; picture: string; summary: string }> {
  const shown = await control(w, name).box.inputValue();
  await w.locator('.chernel-status', { hasText: new RegExp(`${name} = ${shown}(,| ·)`) }).waitFor();
  await w.locator('.chernel-plot:not(.chernel-stale)').waitFor();
  // A drag step previews the picture on a canvas; at rest plotly draws it as a layout image.
  await expect.poll(() => w.getAttribute('data-last-previewed')).toBe('false');
  const picture = await w.locator('.chernel-plot').evaluate((el) => (el as unknown as { layout: { images: { source: string }[] } }).layout.images[0].source);
  return { value: Number(shown), picture, summary: (await w.locator('.chernel-summary').textContent()) ?? '' };
}

beforeAll(async () => {
  const { page: html } = exportDemo(WIDGETS, 'widgets-realspace');
  opened = await openPage(html);
  page = opened.page;
  // Whether each widget's last draw was a drag preview (the picture on a canvas) or plotly's full one.
  await page.locator('.chernel-widget').evaluateAll((els) =>
    els.forEach((el) => el.addEventListener('chernel-drawn', (e) => ((el as HTMLElement).dataset.lastPreviewed = String((e as CustomEvent<{ previewed: boolean }>).detail.previewed)))),
  );
});

afterAll(async () => {
  await opened?.close();
});

describe('real-space widgets', () => {
  it('the marker map draws from saved state: sliders for u, the disorder strength and the seed; the clean C in the summary', async () => {
    const w = widget(0);
    await w.locator('.chernel-plot .imagelayer image').first().waitFor();
    expect(await w.locator('.chernel-control').evaluateAll((rows) => rows.map((r) => (r as HTMLElement).dataset.parameter))).toEqual(['u', 'onsiteDisorder', 'seed']);
    expect(await control(w, 'seed').slider.getAttribute('step')).toBe('1');
    const summary = (await w.locator('.chernel-summary').textContent()) ?? '';
    expect(summary).toContain('clean C = 1');
    expect(summary).toContain('clean sample');
    // QWZ at u = -1: the bulk marker is near C = +1 (Bianco & Resta's bulk value).
    const centre = Number(/centre (\S+)/.exec(summary)![1]);
    expect(Math.abs(centre - 1)).toBeLessThan(0.1);
    expect(await w.locator('.chernel-status').textContent()).toContain('saved result');
  });

  it('dragging the disorder slider recomputes the map in the page; the seed slider gives another sample, the same seed the same picture', async () => {
    const w = widget(0);
    const clean = await w.locator('.chernel-plot').evaluate((el) => (el as unknown as { layout: { images: { source: string }[] } }).layout.images[0].source);
    await drag(page, control(w, 'onsiteDisorder').slider, 3);
    const disordered = await settled(w, 'onsiteDisorder');
    expect(disordered.value).toBeGreaterThan(1);
    expect(disordered.summary).toContain(`W = ${disordered.value}, seed 0`);
    expect(disordered.picture).not.toBe(clean);

    await drag(page, control(w, 'seed').slider, 10);
    const first = await settled(w, 'seed');
    expect(Number.isInteger(first.value)).toBe(true);
    expect(first.value).toBeGreaterThan(0);
    expect(first.summary).toContain(`seed ${first.value}`);
    expect(first.picture).not.toBe(disordered.picture);

    await drag(page, control(w, 'seed').slider, 30);
    const second = await settled(w, 'seed');
    expect(second.value).not.toBe(first.value);
    expect(second.picture).not.toBe(first.picture);

    // Back to the first seed: the same sample, the same picture.
    const { box } = control(w, 'seed');
    await box.fill(String(first.value));
    await box.press('Enter');
    const again = await settled(w, 'seed');
    expect(again.value).toBe(first.value);
    expect(again.picture).toBe(first.picture);
    // The status line lists every control's value: parameters and option sliders.
    expect(await w.locator('.chernel-status').textContent()).toMatch(new RegExp(`^u = -1, onsiteDisorder = ${disordered.value}, seed = ${first.value} · engine`));
    await page.screenshot({ path: artifactPath('widgets-realspace.png'), fullPage: true });
  });

  it('a typed seed off the integer steps is refused, naming the field', async () => {
    const w = widget(0);
    const { box } = control(w, 'seed');
    await box.fill('2.5');
    await box.press('Enter');
    await expect.poll(() => w.locator('.chernel-message').textContent()).toMatch(/^seed: expected 0 plus a whole number of steps of 1\. Value: 2\.5; kept \d+/);
  });

  it('a slider for one entry of an object option: dragging the disorder width of v recomputes the chain in the page', async () => {
    const w = widget(2);
    await w.locator('.chernel-plot .scatterlayer .trace').first().waitFor();
    expect(await w.locator('.chernel-control').evaluateAll((rows) => rows.map((r) => (r as HTMLElement).dataset.parameter))).toEqual(['v', 'w', 'parameterDisorder.v']);
    // A 1D sample is a line over its cells (figures/realspace.ts): its densities are the first trace's y.
    const line = () => w.locator('.chernel-plot').evaluate((el) => JSON.stringify((el as unknown as { data: { y: number[] }[] }).data[0].y));
    const clean = await line();
    await drag(page, control(w, 'parameterDisorder.v').slider, 3);
    const shown = await control(w, 'parameterDisorder.v').box.inputValue();
    expect(Number(shown)).toBeGreaterThan(1);
    await w.locator('.chernel-status', { hasText: new RegExp(`^v = 1.2, w = 1, parameterDisorder.v = ${shown} · engine`) }).waitFor();
    await w.locator('.chernel-plot:not(.chernel-stale)').waitFor();
    expect(await line()).not.toBe(clean);
  });

  it('the local density map: a sequential picture of the sample at E = 0', async () => {
    const w = widget(1);
    await w.locator('.chernel-plot .imagelayer image').first().waitFor();
    expect(await w.locator('.chernel-summary').textContent()).toMatch(/^E = 0 · centre \S+ \(4 cells from the edge\)/);
    expect(opened.errors).toEqual([]);
  });
});
