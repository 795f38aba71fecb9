// A phase-map widget of a disorder average in the exported page (headless Chromium): plotly draws
// the mean inside its band of ±2 standard errors, the band recomputes in the page's engine worker
// when a parameter moves, and a widget saved before the errors were kept still opens and draws its
// curve. Physics: QWZ at u = -1 has C = +1 (Qi, Wu & Zhang, PRB 74, 085308 (2006)), so the clean
// Bott index is 1; strong disorder takes the average to 0 (common practice).
import { readFileSync, writeFileSync } from 'node:fs';
import type { Locator, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { exportHtmlCommand } from '../../cli/export-html.js';
import { qwz } from '../../src/index.js';
import { artifactPath, exportDemo, openPage, typeValue, type DemoWidget, type OpenedPage } from './widgets-harness.js';

const STATE_MIME = 'application/vnd.jupyter.widget-state+json';
const options = { quantity: 'ensemble', of: 'bott', samples: 4, sizes: [6, 6], seed: 3, axes: [{ param: 'onsiteDisorder', from: 0, to: 8, count: 9 }] };
const WIDGETS: DemoWidget[] = [
  { id: 'c0ffee0000000000000000000000e001', kind: 'phase-map', spec: qwz(), values: { u: -1 }, options },
  // Saved before the errors were kept (its result is stripped of them below).
  { id: 'c0ffee0000000000000000000000e002', kind: 'phase-map', spec: qwz(), values: { u: -1 }, options },
  // Damaged: an error list that lost an entry.
  { id: 'c0ffee0000000000000000000000e003', kind: 'phase-map', spec: qwz(), values: { u: -1 }, options },
];

let opened: OpenedPage;
let page: Page;
const widget = (i: number): Locator => page.locator('.chernel-widget').nth(i);

interface PlotTrace { name?: string; fill?: string; y: number[] }
/** The traces plotly holds for a widget's plot. */
const FILL = '.chernel-plot .scatterlayer path.js-fill, .chernel-plot .scatterlayer path.js-tonext';
/** The lengths of the outlines plotly drew for filled areas (an empty fill has a short or no path). */
const fills = (w: Locator) => w.locator(FILL).evaluateAll((els) => els.map((el) => (el.getAttribute('d') ?? '').length).filter((n) => n > 20));
const traces = (w: Locator) => w.locator('.chernel-plot').evaluate((el) => (el as unknown as { data: PlotTrace[] }).data.map((t) => ({ name: t.name, fill: t.fill, y: Array.from(t.y ?? []) })));

beforeAll(async () => {
  const { notebook } = exportDemo(WIDGETS, 'widgets-ensemble');
  const nb = JSON.parse(readFileSync(notebook, 'utf8'));
  const old = nb.metadata.widgets[STATE_MIME].state[WIDGETS[1].id].state;
  expect(old.result.standardErrors).toHaveLength(9);
  delete old.result.standardErrors;
  delete old.result.crossings;
  delete old.result.averaged;
  old.result.checks.warnings = old.result.checks.warnings.filter((text: string) => !text.includes('crossings of a half-integer'));
  nb.metadata.widgets[STATE_MIME].state[WIDGETS[2].id].state.result.standardErrors.pop();
  writeFileSync(notebook, JSON.stringify(nb));
  const html = notebook.replace(/\.ipynb$/, '.html');
  expect(exportHtmlCommand([notebook, '-o', html], () => {})).toBe(0);
  opened = await openPage(html);
  page = opened.page;
});

afterAll(async () => {
  await opened?.close();
});

describe('the phase-map widget of a disorder average', () => {
  it('draws the mean in a filled band of ±2 standard errors, from the saved state', async () => {
    const w = widget(0);
    await w.locator('.chernel-plot .scatterlayer .trace').first().waitFor({ state: 'attached' });
    await expect.poll(async () => (await fills(w)).length).toBe(1);
    const t = await traces(w);
    const mean = t.find((x) => x.name === 'mean bott')!;
    const upper = t.find((x) => x.name === 'mean ± 2 SE')!;
    const lower = t.find((x) => x.name === 'mean − 2 SE')!;
    expect(upper.fill).toBe('tonexty');
    // Halfway between its edges is the mean; it has width where the samples disagree.
    mean.y.forEach((m, i) => expect((upper.y[i] + lower.y[i]) / 2).toBeCloseTo(m, 12));
    expect(Math.max(...upper.y.map((u, i) => u - lower.y[i]))).toBeGreaterThan(0);
    expect(mean.y[0]).toBe(1);
    expect(await w.locator('.chernel-summary').textContent()).toMatch(/crossings of a half-integer: \d+ resolved, \d+ within 2 SE/);
    expect(await w.locator('.chernel-plot .legendtext').allTextContents()).toContain('mean ± 2 SE');
    await w.screenshot({ path: artifactPath('widgets-ensemble-band.png') });
  });

  it('recomputes the map and its band in the page when u moves', async () => {
    const w = widget(0);
    const before = (await traces(w)).find((x) => x.name === 'mean ± 2 SE')!.y;
    await typeValue(w, 'u', -1.6);
    await expect.poll(async () => JSON.stringify((await traces(w)).find((x) => x.name === 'mean ± 2 SE')?.y), { timeout: 30_000 }).not.toBe(JSON.stringify(before));
    expect(await fills(w)).toHaveLength(1);
  });

  it('a widget saved before the errors were kept opens and draws its curve, without a band', async () => {
    const w = widget(1);
    await w.locator('.chernel-plot .scatterlayer .trace').first().waitFor({ state: 'attached' });
    expect((await traces(w)).map((x) => x.name)).toEqual(['mean']);
    expect(await fills(w)).toEqual([]);
    expect(await w.locator('.chernel-message[data-level="error"]').count()).toBe(0);
    expect(await w.locator('.chernel-status').textContent()).toContain('saved result');
    expect(opened.errors).toEqual([]);
  });

  it('a damaged error list is named in an error message, not drawn wrong', async () => {
    const message = widget(2).locator('.chernel-message[data-level="error"]');
    await expect.poll(async () => (await message.textContent()) ?? '').toContain('8 standard errors for 9 values');
  });
});
