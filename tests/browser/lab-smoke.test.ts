// The lab end to end in real Chromium: the app starts with every plugin activated, a notebook
// opens with a real kernel, a typed cell runs, the output reaches the page and the saved file, and
// the notebook survives a reload. Uses the chernel kernel once bin/chernel.js exists (registered in
// .jupyter-local by the harness), else Debian's python3 kernel so that the lab itself stays tested.
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { projectDir } from '../../lab/launch.js';
import { openLab, type CellOutput, type LabSession } from './lab-harness.js';

const useChernel = existsSync(join(projectDir, 'bin', 'chernel.js'));
const kernel = useChernel ? 'chernel' : 'python3';
// 6 * 7 = 42 in either language (arithmetic; common practice). The second cell reads state the
// first left, so it proves the kernel keeps state between cells.
const cells = useChernel
  ? { define: 'const answer: number = 6 * 7;\nanswer', reuse: 'answer + 1' }
  : { define: 'answer = 6 * 7\nanswer', reuse: 'answer + 1' };

function plainText(outputs: CellOutput[]): string {
  const result = outputs.find(output => output.output_type === 'execute_result');
  const text = result?.data?.['text/plain'];
  return Array.isArray(text) ? text.join('') : String(text);
}

describe(`lab smoke test with the ${kernel} kernel`, () => {
  let lab: LabSession;

  beforeAll(async () => {
    lab = await openLab();
  });

  afterAll(async () => {
    await lab?.close();
  });

  it('offers the kernel under test', async () => {
    if (useChernel) expect(lab.chernelKernel).toEqual({ registered: true });
    const specs = await fetch(`${lab.server.baseUrl}api/kernelspecs`, { headers: { Authorization: `token ${lab.server.token}` } });
    const names = Object.keys(((await specs.json()) as { kernelspecs: Record<string, unknown> }).kernelspecs);
    expect(names).toContain(kernel);
  });

  it('starts with every plugin activated and no unexpected errors', async () => {
    const shown = await lab.page.locator('#jp-main-dock-panel').isVisible();
    expect(shown).toBe(true);
    const wanted = ['@jupyterlab/notebook-extension:tracker', '@jupyter-widgets/jupyterlab-manager:plugin'];
    if (useChernel) wanted.push('chernel-widgets:plugin');
    expect(await lab.inactivePlugins(wanted)).toEqual([]);
    expect(lab.unexpectedErrors()).toEqual([]);
  });

  it.runIf(useChernel)('loads the widgets as users get them: the prebuilt extension `chernel install` put in a Jupyter data directory', async () => {
    // Not bundled into the lab: the page config lists it among the federated extensions found in
    // the labextensions/ folders on JUPYTER_PATH, and the page loaded its remote entry from there.
    const installed = JSON.parse(readFileSync(join(projectDir, '.jupyter-local', 'share', 'jupyter', 'labextensions', 'chernel-widgets', 'package.json'), 'utf8')) as {
      jupyterlab: { _build: { load: string } };
    };
    expect(await lab.federatedExtensions()).toEqual(['chernel-widgets']);
    // With the note JupyterLab's extension listings show on how to remove it.
    const installedDir = join(projectDir, '.jupyter-local', 'share', 'jupyter', 'labextensions', 'chernel-widgets');
    expect(JSON.parse(readFileSync(join(installedDir, 'install.json'), 'utf8'))).toMatchObject({ packageName: 'chernel-widgets', uninstallInstructions: expect.stringContaining('chernel remove') });
    const loaded = await lab.page.evaluate(() => performance.getEntriesByType('resource').map(entry => new URL(entry.name).pathname));
    expect(loaded).toContain(`/lab/extensions/chernel-widgets/${installed.jupyterlab._build.load}`);
  });

  it.runIf(useChernel)('lists the chernel kernel first in the launcher', async () => {
    const cards = lab.page.locator('.jp-LauncherCard[data-category="Notebook"]');
    await cards.first().waitFor();
    expect(await cards.first().getAttribute('title')).toMatch(/chernel/);
  });

  it('runs typed cells, saves them, and shows them again after a reload', async () => {
    const notebook = await lab.newNotebook(kernel);
    expect(await notebook.kernelName()).toBe(kernel);

    const first = await notebook.runCell(0, cells.define, { typed: true });
    expect(plainText(first)).toBe('42');
    // Nothing but the result: the lab's own traffic (e.g. the widget manager probing comm targets
    // the kernel lacks) must not spill into the user's cell.
    expect(first.map(output => output.output_type)).toEqual(['execute_result']);
    expect(await notebook.renderedOutput(0)).toContain('42');
    const second = await notebook.runCell(1, cells.reuse);
    expect(plainText(second)).toBe('43');

    await notebook.save();
    await lab.screenshot(`lab-smoke-${kernel}`);
    const saved = JSON.parse(readFileSync(join(lab.rootDir, notebook.path), 'utf8')) as {
      metadata: { kernelspec?: { name: string } };
      cells: Array<{ source: string | string[]; outputs?: CellOutput[] }>;
    };
    expect(saved.metadata.kernelspec?.name).toBe(kernel);
    const source = saved.cells[0].source;
    expect(Array.isArray(source) ? source.join('') : source).toBe(cells.define);
    expect(plainText(saved.cells[1].outputs ?? [])).toBe('43');

    await lab.reload();
    const reopened = await lab.openNotebook(notebook.path);
    expect(await reopened.cellCount()).toBe(2);
    expect(await reopened.renderedOutput(1)).toContain('43');
    expect(lab.unexpectedErrors()).toEqual([]);
  });
});
