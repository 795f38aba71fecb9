// Damaged saved widget state in a real Chromium: export-html shows a visible message (and the
// widget's static picture) in place of a widget it cannot embed, and a widget whose saved state is
// damaged after export says so as soon as the page loads, not when a control first moves.
// (The widget state format is the Jupyter widget state schema 2.0; common practice.)
import { readFileSync, writeFileSync } from 'node:fs';
import { afterEach, describe, expect, it } from 'vitest';
import { exportHtmlCommand } from '../../cli/export-html.js';
import { artifactPath, demoWidgets, exportDemo, openPage, type OpenedPage } from './widgets-harness.js';

const STATE_MIME = 'application/vnd.jupyter.widget-state+json';
let opened: OpenedPage | null = null;

afterEach(async () => {
  await opened?.close();
  opened = null;
});

describe('damaged widget state', () => {
  it('export-html writes a visible message naming the cell in place of a widget whose state is gone, and exits 1', async () => {
    const { notebook } = exportDemo(demoWidgets().slice(0, 2), 'damaged-export');
    const nb = JSON.parse(readFileSync(notebook, 'utf8'));
    const [first] = Object.keys(nb.metadata.widgets[STATE_MIME].state);
    delete nb.metadata.widgets[STATE_MIME].state[first];
    writeFileSync(notebook, JSON.stringify(nb));
    const page = notebook.replace(/\.ipynb$/, '.html');
    const lines: string[] = [];
    expect(exportHtmlCommand([notebook, '-o', page], (l) => lines.push(l))).toBe(1);
    expect(lines.join('\n')).toContain(`cell 2: widget ${first} is not live in the page: its state was not saved with the notebook`);
    opened = await openPage(page);
    const message = opened.page.locator('.chernel-message[data-level="error"]').first();
    await message.waitFor();
    expect(await message.isVisible()).toBe(true);
    expect(await message.textContent()).toContain(`Widget ${first} (cell 2) is not live in this page`);
    // The other widget is live.
    await expect.poll(() => opened!.page.locator('.chernel-widget').count()).toBe(1);
    await opened.page.screenshot({ path: artifactPath('widgets-damaged-export.png'), fullPage: true });
  });

  it('a widget whose saved result lost its buffers says so when the page loads', async () => {
    const { page } = exportDemo(demoWidgets().slice(0, 1), 'damaged-page');
    const html = readFileSync(page, 'utf8');
    // Damage the state inside the written page (as an edit or a truncated copy would): drop the buffers.
    const start = html.indexOf(`<script type="${STATE_MIME}">`) + `<script type="${STATE_MIME}">`.length;
    const end = html.indexOf('</script>', start);
    const state = JSON.parse(html.slice(start, end));
    for (const entry of Object.values(state.state) as { buffers?: unknown[] }[]) entry.buffers = [];
    writeFileSync(page, html.slice(0, start) + JSON.stringify(state) + html.slice(end));
    opened = await openPage(page);
    const message = opened.page.locator('.chernel-widget .chernel-message');
    await expect.poll(async () => (await message.textContent()) ?? '').toContain("This widget's saved state is damaged");
    expect(await message.textContent()).toContain('binary buffer is missing');
  });
});
