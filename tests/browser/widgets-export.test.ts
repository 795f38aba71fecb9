// The standalone HTML export of a notebook with chernel widgets, opened from a file in headless
// Chromium: saved plots draw with no kernel, and dragging a control recomputes in the page's
// engine worker. Physics checked against published values:
//   Haldane, PRL 61, 2015 (1988): C(lower band) = -sign(sin phi) for |M| < 3 sqrt3 t2 |sin phi|,
//     0 outside; the gap closes at K or K' on the boundary (sign in the convention of
//     /work/shared/references.md).
//   Qi, Wu, Zhang, PRB 74, 085308 (2006): C(lower) = +1 for -2 < u < 0, -1 for 0 < u < 2.
import { readFileSync, writeFileSync } from 'node:fs';
import type { Locator, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { artifactPath, control, drag, exportDemo, openPage, typeValue, type OpenedPage } from './widgets-harness.js';

const HALDANE = { t2: 0.1, phi: Math.PI / 2 };
const haldaneBoundary = 3 * Math.sqrt(3) * HALDANE.t2 * Math.abs(Math.sin(HALDANE.phi));
const haldaneChern = (M: number) => (Math.abs(M) < haldaneBoundary ? -Math.sign(Math.sin(HALDANE.phi)) : 0);
const qwzChern = (u: number) => (u > -2 && u < 0 ? 1 : u > 0 && u < 2 ? -1 : 0);

let opened: OpenedPage;
let page: Page;

function widget(index: number): Locator {
  return page.locator('.chernel-widget').nth(index);
}

/** Waits until the widget shows a result for the value its `name` box shows, and returns it. */
async function settled(w: Locator, name: string): Promise<{ value: number; invariant: string; gapless: string }> {
  const { box } = control(w, name);
  const shown = await box.inputValue();
  await w.locator('.chernel-status', { hasText: `${name} = ${shown}` }).waitFor();
  await w.locator('.chernel-plot:not(.chernel-stale)').waitFor();
  const summary = w.locator('.chernel-summary');
  return {
    value: Number(shown),
    invariant: (await summary.getAttribute('data-invariant')) ?? '',
    gapless: (await summary.getAttribute('data-gapless')) ?? '',
  };
}

async function traceNames(w: Locator): Promise<string[]> {
  return w.locator('.chernel-plot').evaluate((el) => ((el as unknown as { data: { name?: string }[] }).data ?? []).map((t) => t.name ?? ''));
}

beforeAll(async () => {
  const { page: html } = exportDemo();
  opened = await openPage(html);
  page = opened.page;
});

afterAll(async () => {
  await opened?.close();
});

describe('exported notebook page', () => {
  it('draws the saved curvature map and flow plot without computing', async () => {
    await expect.poll(() => page.locator('.chernel-widget').count()).toBe(3);
    const haldane = widget(0);
    // The map is a picture under the axes (figures/picture.ts).
    await haldane.locator('.chernel-plot .imagelayer image').first().waitFor();
    expect(await haldane.locator('.chernel-status').textContent()).toContain('saved result');
    expect(await haldane.locator('.chernel-summary').getAttribute('data-invariant')).toBe(String(haldaneChern(0.2)));
    // Hexagonal lattice: the zone boundary is drawn over the map.
    expect(await traceNames(haldane)).toContain('Brillouin zone');

    const flow = widget(1);
    await flow.locator('.chernel-plot .scatterlayer .point').first().waitFor();
    expect(await flow.locator('.chernel-plot .scatterlayer .point').count()).toBeGreaterThan(30);
    expect(await flow.locator('.chernel-summary').getAttribute('data-invariant')).toBe(String(qwzChern(-1)));
    expect(await traceNames(flow)).toContain('largest gap');
  });

  it('dragging M across the Haldane phase boundary changes the plotted Chern number, and back', async () => {
    const haldane = widget(0);
    const { slider } = control(haldane, 'M');
    await drag(page, slider, 1.2);
    const outside = await settled(haldane, 'M');
    expect(Math.abs(outside.value)).toBeGreaterThan(haldaneBoundary + 0.05);
    expect(outside.invariant).toBe(String(haldaneChern(outside.value)));
    expect(await haldane.locator('.gtitle').textContent()).toContain(`C = ${haldaneChern(outside.value)}`);

    await drag(page, slider, -0.2);
    const inside = await settled(haldane, 'M');
    expect(Math.abs(inside.value)).toBeLessThan(haldaneBoundary - 0.05);
    expect(inside.invariant).toBe(String(haldaneChern(inside.value)));
    await page.screenshot({ path: artifactPath('widgets-export-haldane.png'), fullPage: true });
  });

  it('a drag step draws only the picture and title; at rest plotly redraws in full, hover values included', async () => {
    const haldane = widget(0);
    const picture = haldane.locator('.chernel-plot .imagelayer image').first();
    const before = await picture.getAttribute('href');
    const steps = (await haldane.evaluate(async (w) => {
      const slider = w.querySelector('.chernel-control[data-parameter="M"] input[type=range]') as unknown as { value: string; dispatchEvent(e: unknown): void };
      const out: unknown[] = [];
      for (const v of ['0.11', '0.12', '0.13']) {
        const drawn = new Promise((resolve) => w.addEventListener('chernel-drawn', (e) => resolve((e as unknown as { detail: unknown }).detail), { once: true }));
        slider.value = v;
        slider.dispatchEvent(new Event('input', { bubbles: true }));
        out.push(await drawn);
      }
      return out;
    })) as { previewed: boolean; summary: string }[];
    // The first step may redraw in full (the draw before it may have been a preview that settled);
    // the steps after it follow a full draw of the same frame and are previews (widgets/src/preview.ts).
    expect(steps.slice(1).map((d) => d.previewed)).toEqual([true, true]);
    expect(await haldane.locator('canvas.chernel-preview').count()).toBe(1);
    expect(await haldane.locator('.gtitle').textContent()).toContain(steps[2].summary);
    // At rest (250 ms, widget.ts) plotly redraws: the preview goes, the layout image is the new
    // picture, and the invisible heatmap answers hover with the curvature there.
    await haldane.evaluate((w) => new Promise((resolve) => w.addEventListener('chernel-drawn', resolve, { once: true })));
    expect(await haldane.locator('canvas.chernel-preview').count()).toBe(0);
    expect(await picture.getAttribute('href')).not.toBe(before);
    const plotArea = (await haldane.locator('.chernel-plot .nsewdrag').first().boundingBox())!;
    await page.mouse.move(plotArea.x + plotArea.width * 0.3, plotArea.y + plotArea.height * 0.4);
    await expect.poll(() => haldane.locator('.hoverlayer .hovertext').textContent()).toMatch(/Ω = -?[0-9.e+-]+ rad⁻²/);
    await page.mouse.move(0, 0);
  });

  it('dragging u in the flow widget changes the winding across the QWZ transition at u = 0', async () => {
    const flow = widget(1);
    await drag(page, control(flow, 'u').slider, 1);
    const after = await settled(flow, 'u');
    expect(after.value).toBeGreaterThan(0.2);
    expect(after.invariant).toBe(String(qwzChern(after.value)));
    // During the drag a sketch on a canvas stood in for the traces (widgets/src/preview.ts); at rest
    // plotly draws the traces themselves again, and the canvas is gone.
    await expect.poll(() => flow.locator('canvas.chernel-preview').count()).toBe(0);
    expect(await flow.locator('.chernel-plot').getAttribute('class')).not.toMatch(/chernel-preview/);
    expect(await flow.locator('.chernel-plot .scatterlayer .point').first().isVisible()).toBe(true);
  });

  it('a value that closes the gap is flagged gapless: no invariant, the closing k marked', async () => {
    const haldane = widget(0);
    await typeValue(haldane, 'M', haldaneBoundary);
    await haldane.locator('.chernel-summary[data-gapless="true"]').waitFor();
    expect(await haldane.locator('.chernel-summary').getAttribute('data-invariant')).toBe('');
    expect(await haldane.locator('.chernel-summary').textContent()).toContain('C withheld');
    expect(await haldane.locator('.chernel-message').textContent()).toContain('Gapless');
    await expect.poll(() => traceNames(haldane)).toContain('gap closes');

    await typeValue(haldane, 'M', 0.1);
    const back = await settled(haldane, 'M');
    expect(back.gapless).toBe('false');
    expect(back.invariant).toBe(String(haldaneChern(0.1)));
  });

  it('an engine error shows in the widget, and the widget recovers when the value moves back', async () => {
    const fragile = widget(2);
    await typeValue(fragile, 'w', 0);
    const message = fragile.locator('.chernel-message[data-level="error"]');
    await message.waitFor();
    expect(await message.textContent()).toMatch(/ModelError: terms\[0\]/);

    await typeValue(fragile, 'w', 1);
    const back = await settled(fragile, 'w');
    expect(await fragile.locator('.chernel-message').getAttribute('data-level')).toBeNull();
    expect(back.invariant).toBe(String(qwzChern(-1)));
  });

  it('refuses a typed value outside the declared range or not a number, naming the parameter and the value, and puts the value in use back', async () => {
    const fragile = widget(2);
    await typeValue(fragile, 'u', 99);
    expect(await fragile.locator('.chernel-message').textContent()).toBe('u: outside its declared range [-4, 4]. Value: 99; kept -1');
    expect(await control(fragile, 'u').slider.inputValue()).toBe('-1');
    expect(await control(fragile, 'u').box.inputValue()).toBe('-1');
    await control(fragile, 'u').box.fill('abc');
    await control(fragile, 'u').box.press('Enter');
    expect(await fragile.locator('.chernel-message').textContent()).toBe('u: must be a finite number. Value: "abc"; kept -1');
    expect(await control(fragile, 'u').box.inputValue()).toBe('-1');
  });

  it('exports the data as CSV and the figure as PNG', async () => {
    const haldane = widget(0);
    const [csv] = await Promise.all([page.waitForEvent('download'), haldane.locator('button[data-export="csv"]').click()]);
    const text = readFileSync((await csv.path())!, 'utf8').trim().split('\n');
    expect(text[0]).toBe('"k1 [b1]","k2 [b2]","curvature [rad^-2]"');
    expect(text).toHaveLength(1 + 48 * 48);

    const [png] = await Promise.all([page.waitForEvent('download'), haldane.locator('button[data-export="png"]').click()]);
    const bytes = readFileSync((await png.path())!);
    expect(bytes.subarray(1, 4).toString('latin1')).toBe('PNG');
    expect(png.suggestedFilename()).toMatch(/\.png$/);
    writeFileSync(artifactPath('widgets-export-figure.png'), bytes);

    const [svg] = await Promise.all([page.waitForEvent('download'), haldane.locator('button[data-export="svg"]').click()]);
    const svgText = readFileSync((await svg.path())!, 'utf8');
    expect(svgText).toMatch(/^<svg[^>]*xmlns="http:\/\/www.w3.org\/2000\/svg"/);
    // The map travels inside the figure file (figures/picture.ts), not as a link.
    expect(svgText).toContain('data:image/bmp;base64,');

    const [json] = await Promise.all([page.waitForEvent('download'), haldane.locator('button[data-export="json"]').click()]);
    const saved = JSON.parse(readFileSync((await json.path())!, 'utf8')) as { request: { kind: string; params: Record<string, number> }; result: { values: number[]; grid: number[] } };
    expect(saved.request.kind).toBe('curvature');
    expect(saved.result.grid).toEqual([48, 48]);
    expect(saved.result.values).toHaveLength(48 * 48);
  });

  it('draws the static plot of an engine result a cell displayed', async () => {
    const plot = page.locator('.chernel-saved-plot');
    await plot.locator('.main-svg').first().waitFor();
    expect(await page.evaluate('window.chernelWidgets.plots')).toBe(1);
    expect(await page.locator('.plotly-fallback').count()).toBe(0);
  });

  it('ran without page errors', () => {
    expect(opened.errors).toEqual([]);
  });
});
