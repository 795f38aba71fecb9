// A new user's first hour, followed literally: a fresh clone of the committed HEAD in a scratch
// folder, with no node_modules, and the README's "Two commands" in README order.
//   1. `npm start` installs everything (Debian packages are already there), builds, and prints one
//      address, on 8888 or the next free port (this test holds 8888 when it can).
//   2. In a fresh Chromium on that address: chernel heads the launcher; the widgets come from the
//      prebuilt extension in a Jupyter data directory; each demo, opened without trusting it, shows
//      every figure and widget output as a picture; a trusted demo's widget follows a drag; a new
//      notebook with a widget is saved with the lab's default settings. Ctrl-C stops it all.
//   3. `npm start` again after a package was deleted from node_modules (a half-installed tree): it
//      repairs it; in a fresh lab (fresh settings, fresh browser profile) the saved notebook shows
//      its widget as a picture untrusted, and live once trusted.
//   4. `chernel export-html` and Debian's nbconvert (`python3 -m nbconvert --to html`) both show
//      the saved widget's picture.
//   5. The second command (setup, then one fast test layer chosen with CHERNEL_LAYERS, so that this
//      test does not recurse into the whole suite).
// npm installs from its cache when it can (prefer-offline); CI fills the cache from the registry.
// Screenshots of each step: $CHERNEL_ARTIFACTS/readme-*.png. Takes 5-8 minutes, most of it npm ci
// and the builds.
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { createWriteStream, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { createServer, type Server } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { projectDir } from '../../lab/launch.js';
import { CHROMIUM_ARGS, CHROMIUM_PATH } from './chromium.js';
import { artifactsDir, openBrowserOn, type CellOutput, type LabSession, type NotebookHandle } from './lab-harness.js';

const WIDGET_VIEW = 'application/vnd.jupyter.widget-view+json';
/** Outputs that draw something: a widget, a plotly figure, a picture. */
const PICTURE_MIMES = [WIDGET_VIEW, 'application/vnd.plotly.v1+json', 'image/png', 'image/svg+xml'];
/** Smaller than this (CSS px) is an icon or a placeholder, not a figure. */
const MIN_SIDE = 100;

/** The shell lines of the README's "Two commands" block, comments dropped. */
function readmeCommands(): string[] {
  const readme = readFileSync(join(projectDir, 'README.md'), 'utf8');
  const section = readme.split(/^## /m).find(part => part.startsWith('Two commands'));
  const block = section?.match(/```sh\n([\s\S]*?)```/)?.[1];
  if (block === undefined) throw new Error('README.md: no ```sh block under "## Two commands"');
  return block
    .split('\n')
    .map(line => line.replace(/#.*$/, '').trim())
    .filter(line => line !== '');
}

/**
 * The environment of a user's shell: nothing inherited from the npm script or vitest running this
 * test; npm takes packages from its cache when it has them.
 */
function userEnv(extra: Record<string, string> = {}): NodeJS.ProcessEnv {
  const env: NodeJS.ProcessEnv = {};
  for (const [key, value] of Object.entries(process.env)) {
    if (/^(npm_|VITEST|CHERNEL_|INIT_CWD$|NODE_ENV$|NODE_OPTIONS$|TEST$)/.test(key)) continue;
    env[key] = value;
  }
  return { ...env, npm_config_prefer_offline: 'true', ...extra };
}

const logPath = join(artifactsDir, 'readme-clean-clone.log');
let logStream: ReturnType<typeof createWriteStream> | undefined;
function log(text: string): void {
  logStream?.write(`[${new Date().toISOString()}] ${text}\n`);
}
const tail = (text: string) => text.trim().split('\n').slice(-30).join('\n');

/** Runs a README command in the clone through bash, as a user types it; output goes to the log. */
function runCommand(command: string, cwd: string, env: NodeJS.ProcessEnv, timeoutMs: number): { status: number | null; output: string } {
  const started = Date.now();
  const result = spawnSync('bash', ['-c', command], { cwd, env, encoding: 'utf8', timeout: timeoutMs, maxBuffer: 256 << 20 });
  const output = `${result.stdout ?? ''}${result.stderr ?? ''}`;
  log(`$ ${command}   (${((Date.now() - started) / 1000).toFixed(0)} s, exit ${result.status ?? result.signal})\n${output}`);
  return { status: result.status, output };
}

/** `npm start` running in the clone, in its own process group as in a terminal. */
class NpmStart {
  output = '';
  readonly child: ChildProcess;
  private readonly exited: Promise<void>;

  constructor(
    readonly command: string,
    cwd: string,
  ) {
    this.child = spawn('bash', ['-c', command], { cwd, env: userEnv(), detached: true, stdio: ['ignore', 'pipe', 'pipe'] });
    this.child.stdout!.on('data', (chunk: Buffer) => (this.output += chunk.toString()));
    this.child.stderr!.on('data', (chunk: Buffer) => (this.output += chunk.toString()));
    this.exited = new Promise(done => this.child.once('exit', () => done()));
  }

  /** The lab address it printed, once it has. */
  async address(timeoutMs: number): Promise<URL> {
    const deadline = Date.now() + timeoutMs;
    for (;;) {
      const found = this.output.match(/http:\/\/127\.0\.0\.1:\d+\/lab\?token=[0-9a-f]+/);
      if (found) return new URL(found[0]);
      if (this.child.exitCode !== null) throw new Error(`${this.command} exited (${this.child.exitCode}) before printing the address:\n${tail(this.output)}`);
      if (Date.now() > deadline) throw new Error(`${this.command} printed no address within ${timeoutMs / 1000} s:\n${tail(this.output)}`);
      await new Promise(done => setTimeout(done, 250));
    }
  }

  /** Ctrl-C (SIGINT to the foreground process group); true when it exited within 30 s. */
  async interrupt(): Promise<boolean> {
    process.kill(-this.child.pid!, 'SIGINT');
    return Promise.race([this.exited.then(() => true), new Promise<boolean>(done => setTimeout(() => done(false), 30_000))]);
  }

  /** Ends it whatever state it is in (the server too, through its API when it answers). */
  async kill(address?: URL): Promise<void> {
    log(`$ ${this.command}\n${this.output}`);
    if (address) {
      const token = address.searchParams.get('token');
      await fetch(`${address.origin}/api/shutdown`, { method: 'POST', headers: { Authorization: `token ${token}` } }).catch(() => undefined);
    }
    if (this.child.exitCode === null && this.child.signalCode === null) {
      try {
        process.kill(-this.child.pid!, 'SIGKILL');
      } catch {
        // Already gone.
      }
    }
  }
}

/** A lab session on the server `npm start` printed; the test stops the server itself (Ctrl-C). */
function browserOn(address: URL, rootDir: string): Promise<LabSession> {
  const token = address.searchParams.get('token')!;
  const baseUrl = `${address.origin}/`;
  return openBrowserOn({ baseUrl, token, labUrl: address.href, stop: async () => undefined }, rootDir);
}

/** Holds 127.0.0.1:port for the test when it is free, so that `npm start` must look further. */
function hold(port: number): Promise<Server | null> {
  return new Promise(done => {
    const server = createServer();
    server.once('error', () => done(null));
    server.listen(port, '127.0.0.1', () => done(server));
  });
}

interface SavedNotebook {
  cells: Array<{ cell_type: string; outputs?: CellOutput[] }>;
}

/** For each code cell with a drawing output: the cell's index and the indexes of those outputs. */
function drawingOutputs(path: string): Array<{ cell: number; outputs: number[] }> {
  const notebook = JSON.parse(readFileSync(path, 'utf8')) as SavedNotebook;
  return notebook.cells.flatMap((cell, index) => {
    const outputs = (cell.outputs ?? []).flatMap((output, j) => (PICTURE_MIMES.some(mime => output.data?.[mime] !== undefined) ? [j] : []));
    return outputs.length > 0 ? [{ cell: index, outputs }] : [];
  });
}

/** Which of the listed outputs of a cell do not show a picture of at least MIN_SIDE px a side. */
async function missingPictures(notebook: NotebookHandle, cell: number, outputs: number[]): Promise<string[]> {
  await notebook.cell(cell).scrollIntoViewIfNeeded();
  const sizes = await notebook.outputPictures(cell);
  return outputs
    .filter(j => !sizes[j] || sizes[j]!.width < MIN_SIDE || sizes[j]!.height < MIN_SIDE)
    .map(j => `cell ${cell} output ${j}: ${sizes[j] ? `${Math.round(sizes[j]!.width)}x${Math.round(sizes[j]!.height)} px` : 'no picture'}`);
}

/** Waits until every listed output shows a picture; returns what is still missing after `timeoutMs`. */
async function waitForPictures(notebook: NotebookHandle, wanted: Array<{ cell: number; outputs: number[] }>, timeoutMs: number): Promise<string[]> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const missing: string[] = [];
    for (const { cell, outputs } of wanted) missing.push(...(await missingPictures(notebook, cell, outputs)));
    if (missing.length === 0 || Date.now() > deadline || (await modelLost(notebook))) return missing;
    await new Promise(done => setTimeout(done, 500));
  }
}

/**
 * Whether a widget view says its model is not found: the widget manager (@jupyter-widgets/
 * jupyterlab-manager 5, upstream) can mark itself restored before the notebook's saved state is
 * loaded (tests/browser/widgets-lab.test.ts). A user reopens the notebook; so does this test, once.
 */
function modelLost(notebook: NotebookHandle): Promise<boolean> {
  return notebook.locator.getByText('Error displaying widget: model not found').first().isVisible();
}

/** Opens a saved notebook and waits for its pictures, reopening it once if the upstream race hit. */
async function openWithPictures(lab: LabSession, path: string, timeoutMs: number): Promise<{ notebook: NotebookHandle; missing: string[] }> {
  const wanted = drawingOutputs(join(lab.rootDir, path));
  let notebook = await lab.openNotebook(path);
  let missing = await waitForPictures(notebook, wanted, timeoutMs);
  if (missing.length > 0 && (await modelLost(notebook))) {
    console.warn(`readme-clean-clone: the widget manager lost a saved model of ${path} (upstream restore race); reopening once`);
    await notebook.close();
    notebook = await lab.openNotebook(path);
    missing = await waitForPictures(notebook, wanted, timeoutMs);
  }
  return { notebook, missing };
}

/** Objects anywhere in `value` that have `values` with `name: expected` (a widget's saved state). */
function findValues(value: unknown, name: string, expected: number): boolean {
  if (typeof value !== 'object' || value === null) return false;
  const values = (value as { values?: Record<string, unknown> }).values;
  if (typeof values === 'object' && values !== null && values[name] === expected) return true;
  return Object.values(value).some(child => findValues(child, name, expected));
}

/** The sizes (CSS px) of the pictures a static HTML page shows: <img>, plotly SVG, canvas. */
async function pagePictures(file: string, screenshot: string): Promise<Array<{ width: number; height: number }>> {
  const profile = mkdtempSync(join(tmpdir(), 'chernel-chromium-'));
  const context = await chromium.launchPersistentContext(profile, { executablePath: CHROMIUM_PATH, headless: true, args: CHROMIUM_ARGS, viewport: { width: 1200, height: 900 } });
  try {
    const page = context.pages()[0] ?? (await context.newPage());
    await page.goto(`file://${file}`, { waitUntil: 'load' });
    // A live page (chernel's export) draws after load; a static one (nbconvert's) has drawn by then.
    await page.waitForFunction('!window.chernelWidgets || window.chernelWidgets.ready', undefined, { timeout: 30_000 }).catch(() => undefined);
    await page.waitForTimeout(1000);
    await page.screenshot({ path: join(artifactsDir, `${screenshot}.png`), fullPage: true });
    return await page.locator('img, svg.main-svg, canvas').evaluateAll(elements =>
      elements.map(element => {
        const { width, height } = element.getBoundingClientRect();
        return { width, height };
      }),
    );
  } finally {
    await context.close();
    rmSync(profile, { recursive: true, force: true });
  }
}

describe('the README followed from a clean clone', () => {
  const [startCommand, testCommand] = readmeCommands();
  let scratch: string;
  let clone: string;
  let demoDir: string;
  let held: Server | null = null;
  let running: { start: NpmStart; address?: URL } | undefined;
  let lab: LabSession | undefined;
  /** The notebook the user made and saved, relative to the lab's root (notebooks-demo/). */
  let savedPath: string | undefined;

  beforeAll(async () => {
    mkdirSync(artifactsDir, { recursive: true });
    logStream = createWriteStream(logPath);
    scratch = mkdtempSync(join(tmpdir(), 'chernel-clean-clone-'));
    clone = join(scratch, 'chernel');
    demoDir = join(clone, 'notebooks-demo');
    const cloned = spawnSync('git', ['clone', '--quiet', projectDir, clone], { encoding: 'utf8' });
    if (cloned.status !== 0) throw new Error(`git clone failed: ${cloned.stderr}`);
    log(`cloned ${projectDir} at ${spawnSync('git', ['rev-parse', 'HEAD'], { cwd: clone, encoding: 'utf8' }).stdout.trim()} into ${clone}`);
    held = await hold(8888);
  });

  afterAll(async () => {
    await lab?.close();
    await running?.start.kill(running.address);
    held?.close();
    if (scratch) rmSync(scratch, { recursive: true, force: true });
    log('scratch folder removed');
    await new Promise(done => (logStream ? logStream.end(done) : done(undefined)));
  });

  it('names the two commands, `npm start` first', () => {
    expect([startCommand, testCommand]).toEqual(['npm start', 'npm run setup && npm test']);
    expect(existsSync(join(clone, 'node_modules'))).toBe(false);
  });

  it('`npm start` on the fresh clone installs and builds what is missing, then prints one address: 8888 or the next free port', async () => {
    running = { start: new NpmStart(startCommand, clone) };
    running.address = await running.start.address(8 * 60_000);
    const { output } = running.start;
    expect(output).toMatch(/setup: npm ci in \. /);
    expect(output).toMatch(/setup: npm ci in widgets /);
    expect(output).toMatch(/setup: npm ci in lab /);
    // The server's own banner (its address twice, the token masked) is not repeated before ours.
    expect(output.match(/https?:\/\/[^\s]*:\d+\//g)).toEqual([running.address.href.replace(/lab\?.*$/, '')]);
    const port = Number(running.address.port);
    if (held) expect(port).toBeGreaterThan(8888);
    else expect(port).toBeGreaterThanOrEqual(8888);
    expect(port).toBeLessThan(8888 + 50);
  }, 9 * 60_000);

  it('opens in the browser with chernel first in the launcher and the widgets loaded from the prebuilt extension', async () => {
    lab = await browserOn(running!.address!, demoDir);
    const cards = lab.page.locator('.jp-LauncherCard[data-category="Notebook"]');
    await cards.first().waitFor();
    expect(await cards.first().getAttribute('title')).toMatch(/chernel/);
    expect(await lab.federatedExtensions()).toContain('chernel-widgets');
    expect(await lab.inactivePlugins(['chernel-widgets:plugin'])).toEqual([]);
    await lab.screenshot('readme-1-launcher');
  });

  const demos = readdirSync(join(projectDir, 'notebooks-demo')).filter(name => name.endsWith('.ipynb')).sort();
  it.each(demos)('demo %s, opened without trusting it, shows every figure and widget as a picture', async name => {
    expect(drawingOutputs(join(demoDir, name)).length).toBeGreaterThan(0);
    const { notebook, missing } = await openWithPictures(lab!, name, 30_000);
    try {
      await lab!.screenshot(`readme-2-demo-${name.replace(/\.ipynb$/, '')}`);
      expect(missing).toEqual([]);
    } finally {
      await notebook.close();
    }
  });

  it('a trusted demo widget follows a drag', async () => {
    const notebook = await lab!.openNotebook('02-honeycomb-chern.ipynb');
    await notebook.trust();
    const view = notebook.locator.locator('.chernel-widget').first();
    await view.locator('.chernel-plot .main-svg').first().waitFor({ timeout: 60_000 });
    const control = view.locator('.chernel-control').last();
    const parameter = await control.getAttribute('data-parameter');
    const slider = control.locator('input[type=range]');
    await slider.scrollIntoViewIfNeeded();
    const before = await control.locator('input.chernel-control-value').inputValue();
    const b = (await slider.boundingBox())!;
    await lab!.page.mouse.move(b.x + b.width * 0.3, b.y + b.height / 2);
    await lab!.page.mouse.down();
    await lab!.page.mouse.move(b.x + b.width * 0.8, b.y + b.height / 2, { steps: 10 });
    await lab!.page.mouse.up();
    const after = await control.locator('input.chernel-control-value').inputValue();
    expect(after).not.toBe(before);
    await view.locator('.chernel-status', { hasText: `${parameter} = ${after}` }).waitFor({ timeout: 30_000 });
    await lab!.screenshot('readme-3-trusted-drag');
    await notebook.close();
  });

  it('a new notebook with a widget, saved with the lab\'s default settings, keeps the widget\'s state and picture', async () => {
    const notebook = await lab!.newNotebook('chernel');
    savedPath = notebook.path;
    await notebook.runCell(0, "show(haldane(), { kind: 'curvature', grid: 24, bands: 1 })");
    const view = notebook.cell(0).locator('.chernel-widget');
    await view.locator('.chernel-plot .main-svg').first().waitFor({ timeout: 60_000 });
    const box = view.locator('.chernel-control[data-parameter="M"] input.chernel-control-value');
    await box.fill('0.9');
    await box.press('Enter');
    await view.locator('.chernel-status', { hasText: 'M = 0.9 · engine' }).waitFor({ timeout: 30_000 });
    // Saved through the document context, as Ctrl-S does (without its first-save rename dialog);
    // the widget manager's "save widget state" stays as the lab ships it.
    await notebook.save();
    await lab!.screenshot('readme-4-new-notebook');
    const saved = JSON.parse(readFileSync(join(demoDir, savedPath), 'utf8')) as SavedNotebook;
    const outputs = saved.cells[0].outputs ?? [];
    const widget = outputs.find(output => output.data?.[WIDGET_VIEW] !== undefined);
    expect(widget).toBeDefined();
    // [h15b] The widget's state, with the value set above, is in the saved file, and its output
    // carries a static picture of it.
    expect(findValues(saved, 'M', 0.9)).toBe(true);
    expect(widget?.data?.['image/png']).toBeDefined();
  });

  it('Ctrl-C stops `npm start` and its server', async () => {
    await lab?.close();
    lab = undefined;
    const { start, address } = running!;
    expect(await start.interrupt(), tail(start.output)).toBe(true);
    // npm may exit a moment before the server it started has shut down.
    const auth = { headers: { Authorization: `token ${address!.searchParams.get('token')}` } };
    await expect.poll(() => fetch(`${address!.origin}/api/status`, auth).then(() => 'answering', () => 'gone'), { timeout: 15_000 }).toBe('gone');
    log(`$ ${start.command}\n${start.output}`);
    running = undefined;
  });

  it('`npm start` repairs a half-installed node_modules; in a fresh lab the saved widget shows its picture, and is live once trusted', async () => {
    // What ran first on the fresh clone and failed there: esbuild, which the TypeScript loader needs.
    rmSync(join(clone, 'node_modules', 'esbuild'), { recursive: true, force: true });
    running = { start: new NpmStart(startCommand, clone) };
    running.address = await running.start.address(5 * 60_000);
    expect(running.start.output).toMatch(/setup: npm ci in \. \(node_modules\/esbuild is missing\)/);
    expect(running.start.output).not.toMatch(/setup: npm ci in (widgets|lab) /);

    lab = await browserOn(running.address, demoDir);
    // [h15b] Untrusted (a fresh lab's trust database is empty): the saved picture.
    const { notebook, missing } = await openWithPictures(lab, savedPath!, 30_000);
    await lab.screenshot('readme-5-reopened-untrusted');
    expect(missing).toEqual([]);
    // Trusted: the widget itself, with the saved value, recomputing with no cell run.
    await notebook.trust();
    const view = notebook.cell(0).locator('.chernel-widget');
    await view.locator('.chernel-plot .main-svg').first().waitFor({ timeout: 60_000 });
    const box = view.locator('.chernel-control[data-parameter="M"] input.chernel-control-value');
    expect(await box.inputValue()).toBe('0.9');
    await box.fill('1.5');
    await box.press('Enter');
    await view.locator('.chernel-status', { hasText: 'M = 1.5 · engine' }).waitFor({ timeout: 30_000 });
    await lab.screenshot('readme-6-reopened-trusted');
    await notebook.close();
    await lab.close();
    lab = undefined;
    expect(await running.start.interrupt(), tail(running.start.output)).toBe(true);
    log(`$ ${running.start.command}\n${running.start.output}`);
    running = undefined;
  }, 8 * 60_000);

  it('`chernel export-html` and Debian\'s nbconvert both show the saved widget\'s picture', async () => {
    const notebook = join(demoDir, savedPath!);
    const page = join(scratch, 'exported.html');
    const exported = runCommand(`node bin/chernel.js export-html '${notebook}' -o '${page}'`, clone, userEnv(), 60_000);
    expect(exported.status, tail(exported.output)).toBe(0);
    // Nothing missing: a widget without its state would be said here.
    expect(exported.output).not.toMatch(/missing|no state|placeholder/i);
    const live = await pagePictures(page, 'readme-7-export-html');
    expect(live.some(size => size.width >= MIN_SIDE && size.height >= MIN_SIDE)).toBe(true);

    const converted = runCommand(`/usr/bin/python3 -m nbconvert --to html --output-dir '${scratch}' '${notebook}'`, clone, userEnv(), 120_000);
    expect(converted.status, tail(converted.output)).toBe(0);
    const html = join(scratch, savedPath!.replace(/\.ipynb$/, '.html'));
    // [h15b] The widget output's static PNG, which nbconvert writes as an <img>.
    expect(readFileSync(html, 'utf8')).toMatch(/<img[^>]+src="data:image\/png;base64,/);
    const pictures = await pagePictures(html, 'readme-8-nbconvert');
    expect(pictures.some(size => size.width >= MIN_SIDE && size.height >= MIN_SIDE)).toBe(true);
  }, 4 * 60_000);

  it('runs the second command: setup, then the tests (one fast layer, chosen with CHERNEL_LAYERS)', () => {
    const { status, output } = runCommand(testCommand, clone, userEnv({ CHERNEL_LAYERS: 'engine-purity' }), 8 * 60_000);
    expect(status, tail(output)).toBe(0);
    expect(output).toContain('setup: done');
    expect(output).toMatch(/=== engine-purity passed in \d+ s/);
    // Only that layer ran.
    expect(output.match(/^=== \S+:/gm)).toEqual(['=== engine-purity:']);
  }, 9 * 60_000);
});
