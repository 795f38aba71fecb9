// Every other widget kind in the exported page: bands, ribbon, phase map (with its draggable
// current point), and the flow widget showing Z2. Physics checked against published values:
//   Haldane, PRL 61, 2015 (1988): C(lower) = -sign(sin phi) for |M| < 3 sqrt3 t2 |sin phi|, else 0.
//   Kane & Mele, PRL 95, 226801 (2005), lambda_R = 0: Z2 = 1 for |lambda_v| < 3 sqrt3 lambda_SO.
//   Qi, Wu, Zhang, PRB 74, 085308 (2006): a ribbon in the C != 0 phase has in-gap edge states,
//     one branch on each edge (bulk-boundary correspondence).
import type { Locator, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { artifactPath, exportDemo, moreWidgets, openPage, typeValue, type OpenedPage } from './widgets-harness.js';

const haldaneChern = (M: number, t2: number, phi: number) => (Math.abs(M) < 3 * Math.sqrt(3) * t2 * Math.abs(Math.sin(phi)) ? -Math.sign(Math.sin(phi)) : 0);
const kaneMeleZ2 = (lambdaV: number, lambdaSO: number) => (Math.abs(lambdaV) < 3 * Math.sqrt(3) * Math.abs(lambdaSO) ? 1 : 0);

let opened: OpenedPage;
let page: Page;
const widget = (i: number): Locator => page.locator('.chernel-widget').nth(i);

interface Trace {
  name?: string;
  type?: string;
  x?: unknown[];
  y?: unknown[];
  marker?: { color?: unknown };
}

function traces(w: Locator): Promise<Trace[]> {
  return w.locator('.chernel-plot').evaluate((el) => JSON.parse(JSON.stringify((el as unknown as { data: unknown[] }).data)) as Trace[]);
}

beforeAll(async () => {
  const { page: html } = exportDemo(moreWidgets(), 'widgets-kinds');
  opened = await openPage(html);
  page = opened.page;
});

afterAll(async () => {
  await opened?.close();
});

describe('widget kinds in the exported page', () => {
  it('bands: one line per band, high-symmetry ticks, the gap annotated', async () => {
    const w = widget(0);
    await w.locator('.chernel-plot .main-svg').first().waitFor();
    const lines = (await traces(w)).filter((t) => t.name?.startsWith('band '));
    expect(lines).toHaveLength(2);
    const ticks = await w.locator('.xtick text').allTextContents();
    expect(ticks).toEqual(expect.arrayContaining(['Γ', 'K']));
    expect(await w.locator('.annotation-text').allTextContents()).toEqual([expect.stringMatching(/^gap \d/)]);
  });

  it('ribbon: edge states in the bulk gap are coloured by the edge they live on', async () => {
    const w = widget(1);
    await w.locator('.chernel-plot .scatterlayer .point').first().waitFor();
    const [states] = await traces(w);
    const colour = states.marker!.color as number[];
    const energy = states.y as number[];
    // Bulk gap of QWZ at u = -1 is 2 (|u| - ... ; gap min over k of 2|d|); states well inside it
    // must sit on an edge: |first - last| near 1, with both edges present.
    const inGap = colour.filter((_, i) => Math.abs(energy[i]) < 0.5);
    expect(inGap.length).toBeGreaterThan(4);
    expect(inGap.every((c) => Math.abs(c) > 0.5)).toBe(true);
    expect(inGap.some((c) => c > 0) && inGap.some((c) => c < 0)).toBe(true);
  });

  it('phase map: discrete colours with a legend, gap contours, and the current point', async () => {
    const w = widget(2);
    await w.locator('.chernel-plot .main-svg').first().waitFor();
    const names = (await traces(w)).map((t) => t.name);
    expect(names).toEqual(expect.arrayContaining(['C = -1', 'C = 0', 'C = 1', 'gap', 'gapless']));
    expect(await w.locator('.chernel-summary').getAttribute('data-invariant')).toBe(String(haldaneChern(0.2, 0.1, Math.PI / 2)));
  });

  it('phase map: dragging the current point moves the controls and reads the phase there', async () => {
    const w = widget(2);
    const at = (x: number, y: number) =>
      w.locator('.chernel-plot').evaluate(
        (el, [px, py]) => {
          const gd = el as unknown as { _fullLayout: { xaxis: { d2p(v: number): number }; yaxis: { d2p(v: number): number }; _size: { l: number; t: number } } };
          const box = el.getBoundingClientRect();
          const L = gd._fullLayout;
          return [box.left + L._size.l + L.xaxis.d2p(px), box.top + L._size.t + L.yaxis.d2p(py)];
        },
        [x, y],
      );
    await w.locator('.chernel-plot').scrollIntoViewIfNeeded();
    const [x0, y0] = await at(Math.PI / 2, 0.2);
    const [x1, y1] = await at(Math.PI / 2, 0.8);
    await page.mouse.move(x0, y0);
    await page.mouse.down();
    await page.mouse.move(x1, y1, { steps: 10 });
    await page.mouse.up();
    const box = w.locator('.chernel-control[data-parameter="M"] input.chernel-control-value');
    await expect.poll(async () => Number(await box.inputValue())).toBeGreaterThan(0.6);
    const M = Number(await box.inputValue());
    expect(await w.locator('.chernel-summary').getAttribute('data-invariant')).toBe(String(haldaneChern(M, 0.1, Math.PI / 2)));
    await page.screenshot({ path: artifactPath('widgets-kinds.png'), fullPage: true });

    // A parameter the map does not sweep recomputes the map; the point stays and reads the new phase.
    await typeValue(w, 't2', 0.2);
    await w.locator('.chernel-status', { hasText: 'engine' }).waitFor({ timeout: 60_000 });
    await w.locator('.chernel-plot:not(.chernel-stale)').waitFor();
    expect(await w.locator('.chernel-summary').getAttribute('data-invariant')).toBe(String(haldaneChern(M, 0.2, Math.PI / 2)));
  });

  it('phase map: a long recompute shows its progress with the time left, and Stop keeps the last map', async () => {
    const w = widget(4);
    await w.locator('.chernel-plot .main-svg').first().waitFor({ timeout: 60_000 });
    await w.scrollIntoViewIfNeeded();
    await typeValue(w, 't2', 0.2);
    const progress = w.locator('.chernel-progress[data-active]');
    await progress.waitFor({ timeout: 30_000 });
    await expect.poll(() => progress.locator('span').textContent(), { timeout: 30_000 }).toMatch(/^computing: \d+% · about \d+ s left$/);
    await page.screenshot({ path: artifactPath('widgets-kinds-progress.png'), fullPage: true });
    await progress.locator('button', { hasText: 'Stop' }).click();
    expect(await w.locator('.chernel-message').textContent()).toMatch(/^Stopped: nothing was computed for .*t2 = 0\.2.*; the plot shows the last result\.$/);
    expect(await w.locator('.chernel-progress[data-active]').count()).toBe(0);
    expect(await w.locator('.chernel-status').textContent()).toMatch(/^stopped at /);
    // Back to the value the shown map was computed for: drawn again at once, no computation.
    await typeValue(w, 't2', 0.1);
    await w.locator('.chernel-status', { hasText: 'saved result' }).waitFor();
    expect(await w.locator('.chernel-message').getAttribute('data-level')).toBeNull();
  });

  it('flow with Z2: the Kane–Mele index changes across |lambda_v| = 3 sqrt3 lambda_SO', async () => {
    const w = widget(3);
    const summary = w.locator('.chernel-summary');
    expect(await summary.getAttribute('data-invariant')).toBe(String(kaneMeleZ2(0.1, 0.06)));
    expect(await summary.textContent()).toContain('Z₂');
    await typeValue(w, 'lambda_v', 0.5);
    await w.locator('.chernel-status', { hasText: 'lambda_v = 0.5' }).waitFor({ timeout: 60_000 });
    expect(await summary.getAttribute('data-invariant')).toBe(String(kaneMeleZ2(0.5, 0.06)));
  });

  it('ran without page errors', () => {
    expect(opened.errors).toEqual([]);
  });
});
