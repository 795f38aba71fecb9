// A chernel widget live in the real lab with the real kernel, under the lab's default settings
// ("save widget state" off, as every user starts): a cell shows it, dragging a control recomputes
// in the browser and syncs the value back (a cell reads it), a cell moves the control, and the saved
// notebook carries the state and a picture in the widget's own output, so its HTML export draws with
// no kernel, a collaborator reopens it live, and an untrusted copy shows pictures (trusting it makes
// it live). An engine result shows its summary and its figure, live when trusted, a picture when not.
// Physics: Haldane, PRL 61, 2015 (1988): C(lower) = -sign(sin phi) for |M| < 3 sqrt3 t2 |sin phi|,
// else 0 (sign convention of /work/shared/references.md).
import { copyFileSync, existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Locator } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openLab, type CellOutput, type LabSession, type NotebookHandle } from './lab-harness.js';
import { openPage, projectDir } from './widgets-harness.js';
import { exportHtmlCommand } from '../../cli/export-html.js';

const haldaneChern = (M: number) => (Math.abs(M) < 3 * Math.sqrt(3) * 0.1 ? -1 : 0);
// The kernel must be built (npm run build): a missing one fails these tests rather than skipping them.
const kernelBuilt = (): void => {
  const cli = join(projectDir, 'dist', 'cli', 'main.js');
  if (!existsSync(cli)) throw new Error(`the kernel is not built (${cli} is missing): run npm run build`);
};

function text(outputs: CellOutput[]): string {
  const result = outputs.find((o) => o.output_type === 'execute_result' || o.output_type === 'error');
  if (result?.output_type === 'error') return `${result.ename}: ${result.evalue}`;
  const plain = result?.data?.['text/plain'];
  return Array.isArray(plain) ? plain.join('') : String(plain);
}

describe('chernel widget in the lab with the chernel kernel', () => {
  let lab: LabSession;
  let notebook: NotebookHandle;
  let view: Locator;

  beforeAll(async () => {
    kernelBuilt();
    // Default settings: the widget manager's "save widget state" stays off.
    lab = await openLab();
    notebook = await lab.newNotebook('chernel');
  });

  afterAll(async () => {
    await lab?.close();
  });

  it('one call shows the widget for a model', async () => {
    const outputs = await notebook.runCell(0, "const w = show(haldane(), { kind: 'curvature', grid: 24, bands: 1 });\nw");
    const data = outputs.find((o) => o.output_type === 'execute_result')?.data ?? {};
    expect(Object.keys(data)).toContain('application/vnd.jupyter.widget-view+json');
    view = notebook.cell(0).locator('.chernel-widget');
    await view.locator('.chernel-plot .main-svg').first().waitFor();
    expect(await view.locator('.chernel-summary').getAttribute('data-invariant')).toBe(String(haldaneChern(0.2)));
  });

  it('dragging a control recomputes in the browser and the kernel sees the new value', async () => {
    const slider = view.locator('.chernel-control[data-parameter="M"] input[type=range]');
    const box = view.locator('.chernel-control[data-parameter="M"] input.chernel-control-value');
    await slider.scrollIntoViewIfNeeded();
    const b = (await slider.boundingBox())!;
    const at = (v: number) => b.x + 8 + ((v + 2) / 4) * (b.width - 16); // range [-2, 2], 8 px half thumb
    await lab.page.mouse.move(at(0.2), b.y + b.height / 2);
    await lab.page.mouse.down();
    await lab.page.mouse.move(at(1.2), b.y + b.height / 2, { steps: 10 });
    await lab.page.mouse.up();
    const shown = await box.inputValue();
    await view.locator('.chernel-status', { hasText: `M = ${shown}` }).waitFor();
    const M = Number(shown);
    expect(Math.abs(M)).toBeGreaterThan(0.6);
    expect(await view.locator('.chernel-summary').getAttribute('data-invariant')).toBe(String(haldaneChern(M)));

    await expect.poll(async () => Number(text(await notebook.runCell(1, 'w.values.M'))), { timeout: 30_000 }).toBeCloseTo(M, 10);
    // The result computed in the browser came back too.
    // (the lattice total is an integer up to rounding)
    expect(Number(text(await notebook.runCell(2, 'w.result?.total')))).toBeCloseTo(haldaneChern(M), 9);
  });

  it('a cell moves the control; the widget recomputes for the pushed value', async () => {
    expect(text(await notebook.runCell(3, "w.setValues({ M: 0.1 }); 'sent'"))).toBe("'sent'");
    const box = view.locator('.chernel-control[data-parameter="M"] input.chernel-control-value');
    await expect.poll(() => box.inputValue()).toBe('0.1');
    await view.locator('.chernel-status', { hasText: 'M = 0.1 · engine' }).waitFor();
    expect(await view.locator('.chernel-summary').getAttribute('data-invariant')).toBe(String(haldaneChern(0.1)));
  });

  it('a value the model refuses is an error naming the parameter, and the kernel lives on', async () => {
    expect(text(await notebook.runCell(4, 'w.setValues({ M: 9 })'))).toMatch(/setValues\.M: outside its declared range \[-2, 2\]\. Value: 9/);
    expect(text(await notebook.runCell(5, 'w.values.M'))).toBe('0.1');
  });

  it('an engine result shows its summary and, below it, its figure drawn live', async () => {
    const outputs = await notebook.runCell(6, "compute({ kind: 'bands', model: haldane(), params: { M: 0.1 } })");
    expect(outputs.map((o) => Object.keys(o.data ?? {}).sort())).toEqual([
      ['text/html', 'text/plain'],
      ['application/vnd.plotly.v1+json', 'image/png', 'text/plain'],
    ]);
    const cell = notebook.cell(6);
    await cell.locator('.chernel-summary table').waitFor();
    await cell.locator('.chernel-saved-plot .main-svg').first().waitFor();
    expect(await cell.locator('.chernel-saved-plot .gtitle').textContent()).toMatch(/^Bands — /);
  });

  it('saved with the default settings, the widget output carries the state and a picture of the last result', async () => {
    await notebook.save();
    await lab.screenshot('widgets-lab');
    const path = join(lab.rootDir, notebook.path);
    const saved = JSON.parse(readFileSync(path, 'utf8')) as {
      metadata: { widgets?: unknown };
      cells: { outputs?: { output_type: string; data?: Record<string, unknown> }[] }[];
    };
    // The lab saved no widget state of its own: everything below comes from the output.
    expect(saved.metadata.widgets).toBeUndefined();
    const output = saved.cells[0].outputs?.find((o) => o.data?.['application/vnd.jupyter.widget-view+json']);
    const ours = output?.data?.['application/vnd.chernel.widget-state+json'] as { model_id: string; model_name: string; state: Record<string, unknown> };
    expect(ours.model_name).toBe('DiagnosticModel');
    expect(ours.model_id).toBe((output?.data?.['application/vnd.jupyter.widget-view+json'] as { model_id: string }).model_id);
    expect(ours.state.values).toMatchObject({ M: 0.1 });
    expect(ours.state.result_values).toMatchObject({ M: 0.1 });
    // The picture is the one the view shows now (drawn when the notebook was saved).
    const png = Buffer.from(String(output?.data?.['image/png']), 'base64');
    expect(png.subarray(1, 4).toString('ascii')).toBe('PNG');
    expect(String(output?.data?.['text/plain'])).toContain('M = 0.1');

    const out = join(lab.rootDir, 'exported.html');
    const messages: string[] = [];
    expect(exportHtmlCommand([path, '-o', out], (line) => messages.push(line)), messages.join('\n')).toBe(0);
    const page = await openPage(out);
    try {
      const exported = page.page.locator('.chernel-widget');
      await exported.locator('.chernel-plot .main-svg').first().waitFor();
      expect(await exported.locator('.chernel-status').textContent()).toContain('saved result');
      expect(await exported.locator('.chernel-summary').getAttribute('data-invariant')).toBe(String(haldaneChern(0.1)));
      expect(page.errors).toEqual([]);
    } finally {
      await page.close();
    }
  });

  it('a collaborator opening the saved notebook sees the plot without running anything, and can still drag', async () => {
    copyFileSync(join(lab.rootDir, notebook.path), join(lab.rootDir, 'shared.ipynb'));
    // The widget manager (@jupyter-widgets/jupyterlab-manager 5, upstream) restores in two chains when
    // a kernel connects; the kernel-only one can mark the manager restored before the notebook's
    // saved state is loaded, and a view asking for its model in between shows "model not found"
    // for good (seen in 2 of 5 CI runs here). A collaborator reopens; so does this test, once.
    const open = async () => {
      const shared = await lab.openNotebook('shared.ipynb');
      const cell = shared.cell(0);
      const missing = cell.getByText('Error displaying widget: model not found');
      await cell.locator('.chernel-widget .chernel-plot .main-svg').first().or(missing).waitFor({ timeout: 60_000 }).catch(async (err: Error) => {
        // Say what the cell showed instead (an error, a message, nothing).
        await lab.screenshot('widgets-lab-collaborator-failed');
        throw new Error(`${err.message}\ncell 0 shows: ${await cell.textContent()}`);
      });
      return { shared, lost: await missing.isVisible() };
    };
    let { shared, lost } = await open();
    if (lost) {
      console.warn('widgets-lab: the widget manager lost the saved model (upstream restore race); reopening once');
      await shared.close();
      ({ shared, lost } = await open());
    }
    expect(lost).toBe(false);
    const restored = shared.cell(0).locator('.chernel-widget');
    expect(await restored.locator('.chernel-status').textContent()).toContain('saved result');
    expect(await restored.locator('.chernel-summary').getAttribute('data-invariant')).toBe(String(haldaneChern(0.1)));
    // The model's parameter order survives the notebook's sorted JSON.
    expect(await restored.locator('.chernel-control').evaluateAll((rows) => rows.map((r) => (r as HTMLElement).dataset.parameter))).toEqual(['t1', 't2', 'phi', 'M']);

    const box = restored.locator('.chernel-control[data-parameter="M"] input.chernel-control-value');
    await box.fill('1.5');
    await box.press('Enter');
    await restored.locator('.chernel-status', { hasText: 'M = 1.5 · engine' }).waitFor();
    expect(await restored.locator('.chernel-summary').getAttribute('data-invariant')).toBe(String(haldaneChern(1.5)));
    await lab.screenshot('widgets-lab-restored');
    // What the collaborator explored is saved too, though no kernel knows this widget.
    await shared.save();
    const output = (JSON.parse(readFileSync(join(lab.rootDir, 'shared.ipynb'), 'utf8')) as { cells: { outputs: { data?: Record<string, unknown> }[] }[] }).cells[0].outputs.find((o) => o.data?.['application/vnd.chernel.widget-state+json']);
    expect((output?.data?.['application/vnd.chernel.widget-state+json'] as { state: { result_values: Record<string, number> } }).state.result_values).toMatchObject({ M: 1.5 });
    expect(String(output?.data?.['text/plain'])).toContain('M = 1.5');
    // Nothing from the widget bundle among the page's errors.
    expect(lab.unexpectedErrors().filter((line) => /chernel|widgets_lib_index/.test(line))).toEqual([]);
  });

  it('an untrusted copy shows a picture for the widget and for the figure; trusting it makes both live', async () => {
    // Any change to the file makes it a notebook the lab has not signed: what a collaborator receives.
    const copy = JSON.parse(readFileSync(join(lab.rootDir, notebook.path), 'utf8')) as { metadata: Record<string, unknown> };
    copy.metadata.received_from = 'a collaborator';
    writeFileSync(join(lab.rootDir, 'untrusted.ipynb'), JSON.stringify(copy, null, 1));
    const untrusted = await lab.openNotebook('untrusted.ipynb');
    const widgetCell = untrusted.cell(0);
    const figureCell = untrusted.cell(6);
    await widgetCell.locator('.jp-RenderedImage img').waitFor();
    await figureCell.locator('.jp-RenderedImage img').waitFor();
    expect(await widgetCell.locator('.chernel-widget').count()).toBe(0);
    expect(await figureCell.locator('.chernel-saved-plot').count()).toBe(0);
    // The pictures are drawn: not blank, the size the kernel and the page draw them.
    for (const cell of [widgetCell, figureCell]) {
      const size = await cell.locator('.jp-RenderedImage img').evaluate((img) => [(img as HTMLImageElement).naturalWidth, (img as HTMLImageElement).naturalHeight]);
      expect(size).toEqual([760, 480]);
    }
    await lab.screenshot('widgets-lab-untrusted');

    await lab.page.evaluate(() => void window.chernelLab!.commands.execute('notebook:trust'));
    await lab.page.locator('.jp-Dialog .jp-mod-accept').click();
    await widgetCell.locator('.chernel-widget .chernel-plot .main-svg').first().waitFor({ timeout: 60_000 });
    await figureCell.locator('.chernel-saved-plot .main-svg').first().waitFor();
    // Its own saved state (M = 0.1), not that of the other copy open beside it (dragged to 1.5).
    await widgetCell.locator('.chernel-status', { hasText: 'M = 0.1' }).waitFor();
    expect(await widgetCell.locator('.chernel-summary').getAttribute('data-invariant')).toBe(String(haldaneChern(0.1)));
    await lab.screenshot('widgets-lab-trusted');
  });
});
