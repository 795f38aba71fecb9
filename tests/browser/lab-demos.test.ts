// The demo notebooks in the real lab with the real chernel kernel, the way a reader meets them:
// open each one, run all cells, no error output anywhere, every widget draws. In the coupled-wire
// notebook, drag the coupling g below the dimerization delta and watch the widget's Chern number
// go from 1 to 0; save, end the kernel, reload the page, and the widget comes back from the saved
// notebook without a cell being run. Works on copies (outputs and widget state stripped) in a
// temporary root; notebooks-demo/ is never written. Screenshots go to $CHERNEL_ARTIFACTS.
// First, each demo as shipped is opened the way a collaborator opens a notebook they received
// (not trusted): every widget and every figure output shows its picture.
//
// Physics: the coupled-wire Chern insulator of src/model/catalogue.ts (our design; the wire
// construction of quantum Hall states is common practice) has C(lower) = 1 for |delta| < |g| < t and
// 0 for |delta| > |g|: its d-vector (v + w cos k + 2g cos ky, -w sin k, 2g sin ky) winds once around
// the origin exactly when the k = pi mass 2 delta is smaller than the coupling 2g (degree of d/|d|,
// the convention of /work/shared/references.md). Checked independently in tests/reference/.
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Locator } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { projectDir } from '../../lab/launch.js';
import { artifactsDir, openLab, type CellOutput, type LabSession, type NotebookHandle } from './lab-harness.js';

const WIDGET_VIEW = 'application/vnd.jupyter.widget-view+json';
const WIDGET_STATE = 'application/vnd.jupyter.widget-state+json';
const SAVED_WIDGET = 'application/vnd.chernel.widget-state+json';
const demoDir = join(projectDir, 'notebooks-demo');
// The kernel must be built (npm run build): a missing one fails these tests rather than skipping them.
const kernelBuilt = (): void => {
  const cli = join(projectDir, 'dist', 'cli', 'main.js');
  if (!existsSync(cli)) throw new Error(`the kernel is not built (${cli} is missing): run npm run build`);
};

interface Notebook {
  metadata: Record<string, unknown> & { widgets?: Record<string, { state: Record<string, { model_name: string; state: Record<string, unknown> }> }> };
  cells: Array<{ cell_type: string; source: string | string[]; outputs?: CellOutput[]; execution_count?: number | null }>;
}

const joined = (text: string | string[] | undefined) => (Array.isArray(text) ? text.join('') : (text ?? ''));
const readNotebook = (path: string) => JSON.parse(readFileSync(path, 'utf8')) as Notebook;
const demoNames = readdirSync(demoDir).filter(name => name.endsWith('.ipynb')).sort();

/** A copy with no outputs, counts or saved widget state, so that everything seen later is made by this run. */
function strippedCopy(name: string, rootDir: string): void {
  const notebook = readNotebook(join(demoDir, name));
  delete notebook.metadata.widgets;
  for (const cell of notebook.cells) {
    if (cell.cell_type !== 'code') continue;
    cell.outputs = [];
    cell.execution_count = null;
  }
  writeFileSync(join(rootDir, name), JSON.stringify(notebook, null, 1));
}

/**
 * The shipped demo, changed in one metadata field so that no lab has signed it: a notebook someone
 * else saved. Returns, per cell, the indexes of its outputs that are a widget or a figure.
 */
function receivedCopy(name: string, dir: string): number[][] {
  const notebook = readNotebook(join(demoDir, name));
  notebook.metadata.received_from = 'a collaborator';
  writeFileSync(join(dir, name), JSON.stringify(notebook, null, 1));
  return notebook.cells.map(cell =>
    (cell.outputs ?? []).flatMap((o, i) => (o.data?.[WIDGET_VIEW] !== undefined || o.data?.['application/vnd.plotly.v1+json'] !== undefined ? [i] : [])),
  );
}

/** Error outputs and anything written to stderr, as `cell N: text`. */
function problems(outputs: CellOutput[][]): string[] {
  return outputs.flatMap((cell, index) =>
    cell
      .filter(o => o.output_type === 'error' || (o.output_type === 'stream' && o.name === 'stderr'))
      .map(o => `cell ${index}: ${o.output_type === 'error' ? `${o.ename}: ${o.evalue}` : joined(o.text)}`),
  );
}

/** Indexes of the cells whose outputs include a widget view. */
function widgetCells(outputs: CellOutput[][]): number[] {
  return outputs.flatMap((cell, index) => (cell.some(o => o.data?.[WIDGET_VIEW] !== undefined) ? [index] : []));
}

/** Indexes of code cells with no execution count (after a run all, cells a failure skipped). */
async function unrunCodeCells(notebook: NotebookHandle, cellCount: number): Promise<number[]> {
  const counts = await notebook.executionCounts();
  expect(counts).toHaveLength(cellCount);
  const kinds = await notebook.locator.locator('.jp-Notebook .jp-Cell').evaluateAll(cells => cells.map(cell => cell.classList.contains('jp-CodeCell')));
  return counts.flatMap((count, index) => (kinds[index] && count === null ? [index] : []));
}

/** Waits until the widget in cell `index` has drawn its plot; returns its root element. */
async function drawnWidget(notebook: NotebookHandle, index: number): Promise<Locator> {
  await notebook.cell(index).scrollIntoViewIfNeeded();
  const view = notebook.cell(index).locator('.chernel-widget');
  await view.locator('.chernel-plot .main-svg').first().waitFor({ timeout: 60_000 });
  await expect.poll(() => view.locator('.chernel-summary').textContent(), { timeout: 60_000 }).not.toBe('');
  return view;
}

/**
 * Fails fast when the page no longer answers (a renderer stuck in a script), instead of letting each
 * remaining test wait out its timeout; the console log in the artefacts says what it was doing.
 */
async function answering(lab: LabSession): Promise<void> {
  const timeout = new Promise<false>(done => setTimeout(() => done(false), 15_000));
  if (!(await Promise.race([lab.page.evaluate(() => true), timeout]))) {
    const recent = lab.console.slice(-3).join('\n');
    throw new Error(`lab: the page stopped answering (renderer busy); last console messages:\n${recent}`);
  }
}

describe('demo notebooks in the lab with the chernel kernel', () => {
  let lab: LabSession;
  let rootDir: string;

  beforeAll(async () => {
    kernelBuilt();
    rootDir = mkdtempSync(join(tmpdir(), 'chernel-lab-demos-'));
    for (const name of demoNames) strippedCopy(name, rootDir);
    // The lab's default settings: "save widget state" off; widgets keep their state in their outputs.
    lab = await openLab({ rootDir });
  });

  afterAll(async () => {
    if (lab) {
      mkdirSync(artifactsDir, { recursive: true });
      writeFileSync(join(artifactsDir, 'lab-demos-console.log'), lab.console.join('\n'));
    }
    await lab?.close();
    if (rootDir) rmSync(rootDir, { recursive: true, force: true });
  });

  it('finds the seven demo notebooks', () => {
    expect(demoNames).toHaveLength(7);
    expect(demoNames).toContain('01-coupled-wires.ipynb');
  });

  for (const name of demoNames) {
    it(`${name} as shipped, not trusted: every widget and figure output shows its picture`, async () => {
      await answering(lab);
      mkdirSync(join(rootDir, 'received'), { recursive: true });
      const pictured = receivedCopy(name, join(rootDir, 'received'));
      expect(pictured.flat().length).toBeGreaterThan(0);
      const notebook = await lab.openNotebook(`received/${name}`);
      for (const [index, outputs] of pictured.entries()) {
        if (outputs.length === 0) continue;
        const cell = notebook.cell(index);
        await cell.scrollIntoViewIfNeeded();
        for (const output of outputs) {
          const image = cell.locator('.jp-OutputArea-child').nth(output).locator('.jp-RenderedImage img');
          await image.waitFor();
          // Drawn, not broken: the size the kernel draws its pictures.
          expect([index, output, await image.evaluate(img => [(img as HTMLImageElement).naturalWidth, (img as HTMLImageElement).naturalHeight])]).toEqual([index, output, [760, 480]]);
        }
        expect(await cell.locator('.chernel-widget, .chernel-saved-plot').count()).toBe(0);
      }
      await lab.screenshot(`lab-demo-received-${name.replace(/\.ipynb$/, '')}`);
      await notebook.close();
    }, 180_000);
  }

  describe('01-coupled-wires.ipynb', () => {
    const name = '01-coupled-wires.ipynb';
    let notebook: NotebookHandle;
    let widgetIndex: number;
    let view: Locator;
    let draggedTo: number;
    let consoleStart: number;

    it('runs every cell with no error output; the widget draws C = 1 at g = 0.3, delta = 0.1', async () => {
      await answering(lab);
      consoleStart = lab.console.length;
      notebook = await lab.openNotebook(name, 'chernel');
      const outputs = await notebook.runAll();
      expect.soft(problems(outputs)).toEqual([]);
      expect(await unrunCodeCells(notebook, outputs.length)).toEqual([]);
      const cells = widgetCells(outputs);
      expect(cells).toHaveLength(1);
      widgetIndex = cells[0];
      view = await drawnWidget(notebook, widgetIndex);
      await view.scrollIntoViewIfNeeded();
      expect(await view.locator('.chernel-control[data-parameter="g"] input.chernel-control-value').inputValue()).toBe('0.3');
      expect(await view.locator('.chernel-control[data-parameter="delta"] input.chernel-control-value').inputValue()).toBe('0.1');
      expect(await view.locator('.chernel-summary').getAttribute('data-invariant')).toBe('1');
      expect(await view.locator('.chernel-summary').textContent()).toMatch(/^C = 1 /);
      await lab.screenshot('lab-demo-01-coupled-wires-before-drag');
    }, 300_000);

    it('dragging g below |delta| with the mouse turns C from 1 to 0', async () => {
      const slider = view.locator('.chernel-control[data-parameter="g"] input[type=range]');
      const box = view.locator('.chernel-control[data-parameter="g"] input.chernel-control-value');
      await slider.scrollIntoViewIfNeeded();
      const b = (await slider.boundingBox())!;
      // The slider spans g's declared range [-0.5, 0.5]; Chromium's thumb is about 16 px wide.
      const at = (g: number) => b.x + 8 + ((g + 0.5) / 1) * (b.width - 16);
      const y = b.y + b.height / 2;
      await lab.page.mouse.move(at(0.3), y);
      await lab.page.mouse.down();
      await lab.page.mouse.move(at(0.05), y, { steps: 12 });
      await lab.page.mouse.up();
      draggedTo = Number(await box.inputValue());
      // Across the transition, with room on both sides of |g| = |delta| = 0.1 and of g = 0.
      expect(draggedTo).toBeGreaterThan(0.02);
      expect(draggedTo).toBeLessThan(0.08);
      await view.locator('.chernel-status', { hasText: `g = ${draggedTo} · engine` }).waitFor({ timeout: 60_000 });
      expect(await view.locator('.chernel-summary').getAttribute('data-invariant')).toBe('0');
      expect(await view.locator('.chernel-summary').textContent()).toMatch(/^C = 0 /);
      await lab.screenshot('lab-demo-01-coupled-wires-after-drag');
      await lab.screenshot('lab-demo-01-coupled-wires-widget-after-drag', view);
    });

    it('saves the dragged state; after the kernel ends and the page reloads, the widget shows it again without running a cell', async () => {
      await notebook.save();
      const saved = readNotebook(join(rootDir, name));
      expect(saved.metadata.widgets?.[WIDGET_STATE]).toBeUndefined();
      const states = saved.cells.flatMap(cell => (cell.outputs ?? []).flatMap(o => (o.data?.[SAVED_WIDGET] ? [o.data[SAVED_WIDGET] as { model_name: string; state: Record<string, unknown> }] : [])));
      const ours = states.find(s => s.model_name === 'DiagnosticModel');
      expect(ours?.state.values).toMatchObject({ g: draggedTo, delta: 0.1 });
      expect(ours?.state.result_values).toMatchObject({ g: draggedTo, delta: 0.1 });
      const savedCounts = saved.cells.map(cell => cell.execution_count ?? null);

      // A fresh kernel knows no widgets: what shows after the reload can only come from the file.
      await notebook.close();
      await lab.reload();
      const reopened = await lab.openNotebook(name, 'chernel');
      const restored = await drawnWidget(reopened, widgetIndex);
      await restored.scrollIntoViewIfNeeded();
      await restored.locator('.chernel-status', { hasText: `g = ${draggedTo}` }).waitFor();
      expect(await restored.locator('.chernel-status').textContent()).toContain('saved result');
      expect(await restored.locator('.chernel-control[data-parameter="g"] input.chernel-control-value').inputValue()).toBe(String(draggedTo));
      expect(await restored.locator('.chernel-summary').getAttribute('data-invariant')).toBe('0');
      // Nothing ran: every cell shows the count it was saved with.
      expect(await reopened.executionCounts()).toEqual(savedCounts);
      await lab.screenshot('lab-demo-01-coupled-wires-restored');
      await lab.screenshot('lab-demo-01-coupled-wires-widget-restored', restored);
      expect.soft(lab.unexpectedErrors(consoleStart)).toEqual([]);
    });
  });

  for (const name of demoNames.filter(n => n !== '01-coupled-wires.ipynb')) {
    it(`${name}: runs every cell with no error output, and every widget draws`, async () => {
      await answering(lab);
      const consoleStart = lab.console.length;
      const notebook = await lab.openNotebook(name, 'chernel');
      const outputs = await notebook.runAll();
      // Soft: a failure is reported, and the widgets are still checked.
      expect.soft(problems(outputs)).toEqual([]);
      const sources = readNotebook(join(rootDir, name)).cells.map(cell => joined(cell.source));
      expect(outputs.length).toBe(sources.length);
      expect(await unrunCodeCells(notebook, sources.length)).toEqual([]);
      // One drawn widget for each cell that calls show(...), the cell-scope widget call (README).
      const expected = sources.flatMap((source, index) => (/\bshow\(/.test(source) ? [index] : []));
      expect(widgetCells(outputs)).toEqual(expected);
      for (const index of expected) {
        const view = await drawnWidget(notebook, index);
        expect(await view.locator('.chernel-message').getAttribute('data-level')).not.toBe('error');
        await view.scrollIntoViewIfNeeded();
      }
      await lab.screenshot(`lab-demo-${name.replace(/\.ipynb$/, '')}`);
      await notebook.save();
      await notebook.close();
      expect.soft(lab.unexpectedErrors(consoleStart)).toEqual([]);
    }, 300_000);
  }
});
