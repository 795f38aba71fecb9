// Shared by the widget browser tests and the widget bench: a demo notebook whose widget state is
// written by the kernel's own code (kernel/widgets.ts) with engine results, its standalone HTML
// export, and headless Chromium opened on it from a file:// URL.
import { mkdirSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { chromium, type BrowserContext, type Locator, type Page } from 'playwright-core';
import { CHROMIUM_ARGS, CHROMIUM_PATH } from './chromium.js';
import { displayOutputs } from '../../kernel/display/index.js';
import { exportHtmlCommand } from '../../cli/export-html.js';
import { savedStateEntry, startValues, widgetState } from '../../kernel/widget-state.js';
import { widgetRequest } from '../../contract/option-sliders.js';
import { WIDGET_STATE_MIME, WIDGET_VIEW_MIME, type WidgetKind } from '../../contract/protocol.js';
import { compute, haldane, kaneMele, qwz, type ModelSpec } from '../../src/index.js';
import { computeView } from '../../src/views.js';
import type { ModelSpecView } from '../../contract/protocol.js';

export const projectDir = resolve(import.meta.dirname, '../..');
export const artifactsDir = resolve(process.env.CHERNEL_ARTIFACTS ?? join(projectDir, 'test-artifacts'));

export interface DemoWidget {
  id: string;
  kind: WidgetKind;
  spec: ModelSpec;
  options: Record<string, unknown>;
  values?: Record<string, number>;
  title?: string;
}

/** QWZ with an extra parameter whose zero makes an amplitude infinite: a demo of an engine error. */
export function fragileQwz(): ModelSpec {
  const spec = qwz();
  return {
    ...spec,
    name: 'qwz-fragile',
    parameters: { ...spec.parameters, w: { default: 1, range: [0, 2], doc: 'demo only: log(w) is added to the first onsite energy' } },
    terms: spec.terms.map((t, i) => (i === 0 ? { ...t, amplitude: `(${String(t.amplitude)}) + log(w)` } : t)),
  };
}

/** Widgets of every other kind: bands, ribbon, a phase map, a flow with Z2. */
export function moreWidgets(): DemoWidget[] {
  return [
    { id: 'c0ffee0000000000000000000000b001', kind: 'bands', spec: haldane(), options: { bands: 1, pointsPerSegment: 40 } },
    { id: 'c0ffee0000000000000000000000b002', kind: 'ribbon', spec: qwz(), options: { direction: 1, width: 16, nk: 61 } },
    {
      id: 'c0ffee0000000000000000000000b003',
      kind: 'phase-map',
      spec: haldane(),
      options: { axes: [{ param: 'phi', from: -3, to: 3, count: 13 }, { param: 'M', from: -1, to: 1, count: 13 }], quantity: 'chern', grid: 12, bands: 1 },
    },
    { id: 'c0ffee0000000000000000000000b004', kind: 'wannier-flow', spec: kaneMele(), values: { lambda_R: 0 }, options: { grid: [48, 32], bands: 2, invariant: 'z2' } },
    {
      // A fine map: recomputing it takes seconds (progress and stop).
      id: 'c0ffee0000000000000000000000b005',
      kind: 'phase-map',
      spec: haldane(),
      options: { axes: [{ param: 'phi', from: -3, to: 3, count: 90 }, { param: 'M', from: -1, to: 1, count: 90 }], quantity: 'chern', grid: 24, bands: 1 },
    },
  ];
}

/** The demo widgets: the state each one's kernel object would send, as saved in a notebook. */
export function demoWidgets(): DemoWidget[] {
  return [
    { id: 'c0ffee0000000000000000000000a001', kind: 'curvature', spec: haldane(), options: { grid: 48, bands: 1 } },
    { id: 'c0ffee0000000000000000000000a002', kind: 'wannier-flow', spec: qwz(), options: { grid: [32, 48], bands: 1 } },
    { id: 'c0ffee0000000000000000000000a003', kind: 'curvature', spec: fragileQwz(), options: { grid: 24, bands: 1 } },
  ];
}

export function notebookFor(widgets: DemoWidget[]): Record<string, unknown> {
  const state: Record<string, unknown> = {};
  const cells: Record<string, unknown>[] = [
    { cell_type: 'markdown', metadata: {}, source: '# Widgets demo\n\nDrag a control: the plot recomputes in the page.' },
  ];
  widgets.forEach((w, i) => {
    const values = startValues(w.spec, w.options, w.values ?? {});
    const request = widgetRequest(w.kind, w.spec as unknown as ModelSpecView, w.options, values);
    const result = computeView(request);
    state[w.id] = savedStateEntry(
      widgetState({ kind: w.kind, spec: w.spec, options: w.options, values, result, error: '', title: w.title ?? '' }),
    );
    cells.push({
      cell_type: 'code',
      metadata: {},
      execution_count: i + 1,
      source: `show(${w.spec.name}, { kind: '${w.kind}' })`,
      outputs: [
        {
          output_type: 'display_data',
          metadata: {},
          data: { 'text/plain': `${w.kind} widget`, [WIDGET_VIEW_MIME]: { model_id: w.id, version_major: 2, version_minor: 0 } },
        },
      ],
    });
  });
  // An engine result a cell displayed (the kernel's own rich display): a static plot in the page.
  const [summary, shown] = displayOutputs(compute({ kind: 'bands', model: qwz(), params: { u: -1 } }));
  cells.push({
    cell_type: 'code',
    metadata: {},
    execution_count: widgets.length + 1,
    source: "compute({ kind: 'bands', model: qwz() })",
    outputs: [
      { output_type: 'display_data', metadata: summary.metadata, data: summary.data },
      { output_type: 'execute_result', execution_count: widgets.length + 1, metadata: shown.metadata, data: shown.data },
    ],
  });
  return {
    nbformat: 4,
    nbformat_minor: 5,
    metadata: {
      kernelspec: { name: 'chernel', display_name: 'chernel (TypeScript)', language: 'typescript' },
      widgets: { [WIDGET_STATE_MIME]: { version_major: 2, version_minor: 0, state } },
    },
    cells,
  };
}

/** Writes the notebook and its HTML export into a fresh folder; returns the page's path. */
export function exportDemo(widgets: DemoWidget[] = demoWidgets(), name = 'widgets-demo'): { notebook: string; page: string } {
  const dir = mkdtempSync(join(tmpdir(), 'chernel-widgets-'));
  const notebook = join(dir, `${name}.ipynb`);
  const page = join(dir, `${name}.html`);
  writeFileSync(notebook, JSON.stringify(notebookFor(widgets), null, 1));
  const messages: string[] = [];
  const code = exportHtmlCommand([notebook, '-o', page], (line) => messages.push(line));
  if (code !== 0) throw new Error(`export-html failed (${code}): ${messages.join('\n')}`);
  return { notebook, page };
}


export interface OpenedPage {
  context: BrowserContext;
  page: Page;
  /** Page errors and console errors seen so far. */
  errors: string[];
  close(): Promise<void>;
}

/** Headless Chromium (Debian's) with a fresh profile, on a file:// URL; waits for the widgets. */
export async function openPage(path: string): Promise<OpenedPage> {
  const profile = mkdtempSync(join(tmpdir(), 'chernel-chromium-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM_PATH,
    headless: true,
    args: CHROMIUM_ARGS,
    viewport: { width: 1000, height: 900 },
    acceptDownloads: true,
  });
  const page = context.pages()[0] ?? (await context.newPage());
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(`pageerror: ${e.message}`));
  page.on('console', (m) => {
    if (m.type() === 'error') errors.push(`console: ${m.text()}`);
  });
  await page.goto(`file://${path}`);
  // Expressions as text: this file is also compiled without the DOM library (bench/).
  await page.waitForFunction('window.chernelWidgets !== undefined');
  await page.evaluate('window.chernelWidgets.ready');
  return { context, page, errors, close: () => context.close() };
}

export function artifactPath(name: string): string {
  mkdirSync(artifactsDir, { recursive: true });
  return join(artifactsDir, name);
}

/** A parameter's (or option slider's) controls in a widget: its slider and its typed box. */
export function control(w: Locator, name: string): { slider: Locator; box: Locator } {
  const row = w.locator(`.chernel-control[data-parameter="${name}"]`);
  return { slider: row.locator('input[type=range]'), box: row.locator('input.chernel-control-value') };
}

/** Drags a slider's thumb with the mouse, in small moves, to the position of `target`. */
export async function drag(page: Page, slider: Locator, target: number): Promise<void> {
  await slider.scrollIntoViewIfNeeded();
  const box = (await slider.boundingBox())!;
  const [min, max, now] = await slider.evaluate((el: HTMLInputElement) => [Number(el.min), Number(el.max), Number(el.value)]);
  const thumb = 8; // half the thumb width in Chromium's default range style (common practice)
  const xOf = (v: number) => box.x + thumb + ((v - min) / (max - min)) * (box.width - 2 * thumb);
  const y = box.y + box.height / 2;
  await page.mouse.move(xOf(now), y);
  await page.mouse.down();
  await page.mouse.move(xOf(target), y, { steps: 12 });
  await page.mouse.up();
}

/** Types a value into a control's box and commits it with Enter. */
export async function typeValue(w: Locator, name: string, value: number): Promise<void> {
  const { box } = control(w, name);
  await box.fill(String(value));
  await box.press('Enter');
}
