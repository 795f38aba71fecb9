// Drives the real chernel lab (lab/: JupyterLab 4.6 served by Debian's jupyter_server) in real
// headless Chromium: start a server on a free port, open the lab, create or open notebooks through
// the app's command registry, run cells, read outputs, save, reload, take screenshots.
//
//   const lab = await openLab();
//   const nb = await lab.newNotebook('chernel');
//   const outputs = await nb.runCell(0, 'let x = 1 + 1; x');
//   await lab.close();
import { mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { chromium, type BrowserContext, type Locator, type Page } from 'playwright-core';
import { CHROMIUM_ARGS, CHROMIUM_PATH } from './chromium.js';
import {
  ensureLabBuilt,
  projectDir,
  registerChernelKernel,
  startLabServer,
  type KernelRegistration,
  type LabServer,
} from '../../lab/launch.js';

export const artifactsDir = resolve(process.env.CHERNEL_ARTIFACTS ?? join(projectDir, 'test-artifacts'));


/**
 * Console noise this server version is known to cause (lab/ README in /work/shared/JUPYTERLAB.md):
 * APIs of jupyter_server 2.x that 1.23 lacks, and a kernel-manager option it does not know.
 */
const knownNoise = [
  /\/api\/me\b/,
  /\/api\/events\/subscribe/,
  /kernelInfoTimeout/,
  /yjs|Yjs/,
  /Failed to load resource: the server responded with a status of 404/,
];

/** One output of a cell, as nbformat stores it. */
export interface CellOutput {
  output_type: 'stream' | 'execute_result' | 'display_data' | 'error' | 'update_display_data';
  name?: string;
  text?: string | string[];
  data?: Record<string, unknown>;
  metadata?: Record<string, unknown>;
  execution_count?: number | null;
  ename?: string;
  evalue?: string;
  traceback?: string[];
}

// Just the parts of the JupyterLab objects the page-side functions below touch.
interface PageCellModel {
  type: string;
  /** Absent on markdown cells. */
  executionCount: number | null;
  executionState?: 'idle' | 'running';
  sharedModel: { getSource(): string; setSource(source: string): void };
  outputs?: { toJSON(): CellOutput[] };
}
interface PageNotebookPanel {
  id: string;
  context: { path: string; save(): Promise<void>; model: { dirty: boolean } };
  sessionContext: {
    ready: Promise<void>;
    kernelDisplayName: string;
    session: { kernel: { name: string; status: string } | null } | null;
    shutdown(): Promise<void>;
  };
  dispose(): void;
  content: { widgets: ReadonlyArray<{ model: PageCellModel }>; activeCellIndex: number };
}
interface PageLab {
  isPluginActivated(id: string): boolean;
  commands: { execute(id: string, args?: Record<string, unknown>): Promise<unknown> };
  shell: { widgets(area: string): Iterable<{ id: string }>; activateById(id: string): void };
}
declare global {
  interface Window {
    /** Put there by lab/src/index.js once the app is restored. */
    chernelLab?: PageLab;
    /** The names of the federated (prebuilt) extensions the page loaded (lab/src/bootstrap.js). */
    chernelFederatedExtensions?: string[];
  }
}

export interface OpenLabOptions {
  /** Folder the lab serves; default a fresh temporary one (removed on close). */
  rootDir?: string;
  /** Extra kernelspec folders (each holding kernels/NAME/kernel.json). */
  jupyterPath?: string[];
  viewport?: { width: number; height: number };
}

/** What a session needs of a lab server: where it is, its token, and how to stop it. */
export type LabEndpoint = Pick<LabServer, 'baseUrl' | 'token' | 'labUrl' | 'stop'>;

/** Builds what is stale, registers the chernel kernel when it exists, starts server and browser. */
export async function openLab(options: OpenLabOptions = {}): Promise<LabSession> {
  ensureLabBuilt(() => undefined);
  const chernelKernel = registerChernelKernel(() => undefined);
  const ownRoot = options.rootDir === undefined;
  const rootDir = options.rootDir ?? mkdtempSync(join(tmpdir(), 'chernel-lab-root-'));
  const server = await startLabServer({ rootDir, jupyterPath: options.jupyterPath });
  return openBrowserOn(server, rootDir, {
    viewport: options.viewport,
    chernelKernel,
    cleanup: () => {
      if (ownRoot) rmSync(rootDir, { recursive: true, force: true });
    },
  });
}

/**
 * A fresh headless Chromium (new profile) on a running lab server, e.g. one `npm start` started;
 * `close()` closes it and calls the server's `stop`.
 */
export async function openBrowserOn(
  server: LabEndpoint,
  rootDir: string,
  options: { viewport?: { width: number; height: number }; chernelKernel?: KernelRegistration; cleanup?: () => void } = {},
): Promise<LabSession> {
  const profile = mkdtempSync(join(tmpdir(), 'chernel-chromium-'));
  try {
    const context = await chromium.launchPersistentContext(profile, {
      executablePath: CHROMIUM_PATH,
      headless: true,
      args: CHROMIUM_ARGS,
      viewport: options.viewport ?? { width: 1400, height: 900 },
    });
    const page = context.pages()[0] ?? (await context.newPage());
    const session = new LabSession(server, context, page, rootDir, options.chernelKernel ?? { registered: true }, () => {
      rmSync(profile, { recursive: true, force: true });
      options.cleanup?.();
    });
    await session.load();
    return session;
  } catch (error) {
    await server.stop();
    rmSync(profile, { recursive: true, force: true });
    options.cleanup?.();
    throw error;
  }
}

export class LabSession {
  /** Every console message and page error, in order, as `type: text`. */
  readonly console: string[] = [];

  constructor(
    readonly server: LabEndpoint,
    readonly context: BrowserContext,
    readonly page: Page,
    readonly rootDir: string,
    /** Whether the chernel kernelspec was registered for this server, and why not. */
    readonly chernelKernel: KernelRegistration,
    private readonly cleanup: () => void,
  ) {
    page.on('console', message => {
      const { url, lineNumber } = message.location();
      const where = message.type() === 'error' && url ? ` (${url.replace(/^.*\//, '')}:${lineNumber})` : '';
      this.console.push(`${message.type()}: ${message.text()}${where}`);
    });
    page.on('pageerror', error => this.console.push(`pageerror: ${error.stack ?? error.message}`));
  }

  /** Opens (or reopens) the lab page and waits until the app is restored. */
  async load(): Promise<void> {
    await this.page.goto(this.server.labUrl);
    await this.waitUntilReady();
  }

  /** Reloads the page; notebooks open before come back from the workspace. */
  async reload(): Promise<void> {
    await this.page.reload();
    await this.waitUntilReady();
  }

  private async waitUntilReady(): Promise<void> {
    const state = await this.page
      .waitForFunction(() => document.body.dataset.chernelLab, undefined, { timeout: 90_000 })
      .then(handle => handle.jsonValue());
    if (state !== 'ready') throw new Error(`lab: the app failed to start:\n${this.console.join('\n')}`);
  }

  /** Console errors and page errors not in the list of known harmless noise (from message `since` on). */
  unexpectedErrors(since = 0): string[] {
    return this.console.slice(since).filter(line => /^(error|pageerror):/.test(line) && !knownNoise.some(pattern => pattern.test(line)));
  }

  /** The ids among `ids` of plugins that are not activated. */
  inactivePlugins(ids: string[]): Promise<string[]> {
    return this.page.evaluate(ids => ids.filter(id => !window.chernelLab!.isPluginActivated(id)), ids);
  }

  /** The prebuilt (federated) extensions the page loaded from the Jupyter data directories. */
  federatedExtensions(): Promise<string[]> {
    return this.page.evaluate(() => window.chernelFederatedExtensions ?? []);
  }

  /** Runs a command of the app's command registry (the same ones menus and shortcuts run). */
  async command(id: string, args: Record<string, unknown> = {}): Promise<void> {
    await this.page.evaluate(
      async ([id, args]) => {
        await window.chernelLab!.commands.execute(id, args);
      },
      [id, args] as const,
    );
  }

  /** A new untitled notebook in `dir` (relative to the root), with the kernel `kernel` started. */
  async newNotebook(kernel: string, dir = ''): Promise<NotebookHandle> {
    const opened = await this.page.evaluate(
      async ([kernel, dir]) => {
        const panel = (await window.chernelLab!.commands.execute('notebook:create-new', { kernelName: kernel, cwd: dir })) as PageNotebookPanel;
        return { id: panel.id, path: panel.context.path };
      },
      [kernel, dir] as const,
    );
    const notebook = new NotebookHandle(this, opened.id, opened.path);
    await notebook.waitForKernel();
    return notebook;
  }

  /** Opens the notebook at `path` (relative to the root), or finds it when already open. */
  async openNotebook(path: string, kernel?: string): Promise<NotebookHandle> {
    const id = await this.page.evaluate(
      async ([path, kernel]) => {
        const args: Record<string, unknown> = { path, factory: 'Notebook' };
        if (kernel) args.kernel = { name: kernel };
        const panel = (await window.chernelLab!.commands.execute('docmanager:open', args)) as PageNotebookPanel;
        return panel.id;
      },
      [path, kernel ?? ''] as const,
    );
    const notebook = new NotebookHandle(this, id, path);
    await notebook.waitForKernel();
    return notebook;
  }

  /** Saves a screenshot of the page, or of `element` when given, to test-artifacts/NAME.png and returns its path. */
  async screenshot(name: string, element?: Locator): Promise<string> {
    mkdirSync(artifactsDir, { recursive: true });
    const path = join(artifactsDir, `${name}.png`);
    await (element ?? this.page).screenshot({ path });
    return path;
  }

  /** Closes the browser and stops the server (ending its kernels). */
  async close(): Promise<void> {
    await this.context.close().catch(() => undefined);
    await this.server.stop();
    this.cleanup();
  }
}

export class NotebookHandle {
  constructor(
    readonly lab: LabSession,
    /** The DOM id of the notebook panel; locators are scoped to it. */
    readonly panelId: string,
    /** Path relative to the server root. */
    readonly path: string,
  ) {}

  /** The notebook panel in the page. */
  get locator(): Locator {
    return this.lab.page.locator(`[id="${this.panelId}"]`);
  }

  /** The cell at `index` in the page. */
  cell(index: number): Locator {
    return this.locator.locator('.jp-Notebook .jp-Cell').nth(index);
  }

  /** Waits until the kernel is started and idle; returns its name. */
  async waitForKernel(): Promise<string> {
    await this.lab.page.evaluate(async id => {
      for (const widget of window.chernelLab!.shell.widgets('main')) {
        if (widget.id === id) await (widget as unknown as PageNotebookPanel).sessionContext.ready;
      }
    }, this.panelId);
    const handle = await this.lab.page.waitForFunction(
      id => {
        for (const widget of window.chernelLab!.shell.widgets('main')) {
          if (widget.id !== id) continue;
          const kernel = (widget as unknown as PageNotebookPanel).sessionContext.session?.kernel;
          return kernel?.status === 'idle' ? kernel.name : null;
        }
        return null;
      },
      this.panelId,
      { timeout: 60_000 },
    );
    return (await handle.jsonValue()) as string;
  }

  /** The kernel's name (the kernelspec it was started from). */
  kernelName(): Promise<string> {
    return this.waitForKernel();
  }

  /**
   * Puts `source` into cell `index` (adding code cells below the last one when needed) and runs it
   * with `notebook:run-cell`; with `typed`, types it into the editor and presses Shift+Enter the way
   * a user does. Returns the cell's outputs once the kernel has replied.
   */
  async runCell(index: number, source: string, options: { typed?: boolean; timeout?: number } = {}): Promise<CellOutput[]> {
    const before = await this.lab.page.evaluate(
      ([id, index]) => {
        const lab = window.chernelLab!;
        for (const widget of lab.shell.widgets('main')) {
          if (widget.id !== id) continue;
          const panel = widget as unknown as PageNotebookPanel;
          lab.shell.activateById(id);
          const cells = panel.content.widgets;
          return { count: cells.length, previous: index < cells.length ? cells[index].model.executionCount : null };
        }
        throw new Error(`lab: no notebook panel with id ${id}`);
      },
      [this.panelId, index] as const,
    );
    // Missing cells are added one at a time with the command a user would use.
    for (let n = before.count; n <= index; n++) {
      await this.setActiveCell(n - 1);
      await this.lab.command('notebook:insert-cell-below');
    }
    await this.setActiveCell(index);
    if (options.typed) {
      const editor = this.cell(index).locator('.cm-content');
      await editor.click();
      await this.lab.page.keyboard.press('Control+A');
      await this.lab.page.keyboard.press('Delete');
      await editor.pressSequentially(source);
      await this.lab.page.keyboard.press('Shift+Enter');
    } else {
      await this.lab.page.evaluate(
        async ([id, index, source]) => {
          const lab = window.chernelLab!;
          for (const widget of lab.shell.widgets('main')) {
            if (widget.id !== id) continue;
            (widget as unknown as PageNotebookPanel).content.widgets[index].model.sharedModel.setSource(source);
            await lab.commands.execute('notebook:run-cell', { widgetId: id, activate: true });
          }
        },
        [this.panelId, index, source] as const,
      );
    }
    // Done when the cell has a new execution count and is no longer running.
    await this.lab.page.waitForFunction(
      ([id, index, previous]) => {
        for (const widget of window.chernelLab!.shell.widgets('main')) {
          if (widget.id !== id) continue;
          const model = (widget as unknown as PageNotebookPanel).content.widgets[index]?.model;
          return !!model && model.executionCount !== null && model.executionCount !== previous && model.executionState !== 'running';
        }
        return false;
      },
      [this.panelId, index, before.previous] as const,
      { timeout: options.timeout ?? 60_000 },
    );
    return this.outputs(index);
  }

  /** Makes cell `index` the active one (a click in an output would move it). */
  async setActiveCell(index: number): Promise<void> {
    await this.lab.page.evaluate(
      ([id, index]) => {
        for (const widget of window.chernelLab!.shell.widgets('main')) {
          if (widget.id === id) (widget as unknown as PageNotebookPanel).content.activeCellIndex = index;
        }
      },
      [this.panelId, index] as const,
    );
  }

  /** Cell `index`'s outputs as nbformat stores them. */
  outputs(index: number): Promise<CellOutput[]> {
    return this.lab.page.evaluate(
      ([id, index]) => {
        for (const widget of window.chernelLab!.shell.widgets('main')) {
          if (widget.id !== id) continue;
          const model = (widget as unknown as PageNotebookPanel).content.widgets[index]?.model;
          if (!model?.outputs) throw new Error(`lab: cell ${index} is not a code cell`);
          return model.outputs.toJSON();
        }
        throw new Error(`lab: no notebook panel with id ${id}`);
      },
      [this.panelId, index] as const,
    );
  }

  /** The text the page shows in cell `index`'s output area. */
  renderedOutput(index: number): Promise<string> {
    return this.cell(index).locator('.jp-OutputArea').innerText();
  }

  /** The number of cells. */
  cellCount(): Promise<number> {
    return this.locator.locator('.jp-Notebook .jp-Cell').count();
  }

  /**
   * Runs every cell with `notebook:run-all-cells` (the Run menu's command) and waits for the run to
   * end; it ends early when a cell fails and the kernel skips the rest. Returns each cell's outputs
   * (an empty list for a markdown cell).
   */
  async runAll(): Promise<CellOutput[][]> {
    await this.lab.page.evaluate(async id => {
      await window.chernelLab!.commands.execute('notebook:run-all-cells', { widgetId: id, activate: true });
    }, this.panelId);
    await this.lab.page.waitForFunction(
      id => {
        for (const widget of window.chernelLab!.shell.widgets('main')) {
          if (widget.id === id) return (widget as unknown as PageNotebookPanel).content.widgets.every(cell => cell.model.executionState !== 'running');
        }
        return false;
      },
      this.panelId,
      { timeout: 60_000 },
    );
    return this.lab.page.evaluate(id => {
      for (const widget of window.chernelLab!.shell.widgets('main')) {
        if (widget.id === id) return (widget as unknown as PageNotebookPanel).content.widgets.map(cell => cell.model.outputs?.toJSON() ?? []);
      }
      throw new Error(`lab: no notebook panel with id ${id}`);
    }, this.panelId);
  }

  /** Each cell's execution count (null for markdown cells and code cells not run). */
  executionCounts(): Promise<Array<number | null>> {
    return this.lab.page.evaluate(id => {
      for (const widget of window.chernelLab!.shell.widgets('main')) {
        if (widget.id === id) return (widget as unknown as PageNotebookPanel).content.widgets.map(cell => cell.model.executionCount ?? null);
      }
      throw new Error(`lab: no notebook panel with id ${id}`);
    }, this.panelId);
  }

  /** Shuts the notebook's kernel down and closes its panel (save first: unsaved changes are dropped). */
  async close(): Promise<void> {
    await this.lab.page.evaluate(async id => {
      for (const widget of window.chernelLab!.shell.widgets('main')) {
        if (widget.id !== id) continue;
        const panel = widget as unknown as PageNotebookPanel;
        await panel.sessionContext.shutdown();
        panel.context.model.dirty = false;
        panel.dispose();
      }
    }, this.panelId);
  }

  /**
   * Trusts the notebook the way a user does: the Edit menu's "Trust Notebook" command, then the
   * dialog's Trust button. Its outputs are then rendered with every renderer, scripts included.
   */
  async trust(): Promise<void> {
    await this.lab.page.evaluate(id => {
      window.chernelLab!.shell.activateById(id);
      // Not awaited: the command waits for the dialog below.
      void window.chernelLab!.commands.execute('notebook:trust');
    }, this.panelId);
    await this.lab.page.locator('.jp-Dialog .jp-Dialog-button.jp-mod-accept').click();
    await this.lab.page.locator('.jp-Dialog').waitFor({ state: 'detached' });
  }

  /**
   * For each output of cell `index`, in order: the size in CSS pixels of the largest picture it
   * shows (an <img>, a plotly SVG or a canvas), or null when it shows none (text only, or nothing).
   */
  outputPictures(index: number): Promise<Array<{ width: number; height: number } | null>> {
    return this.cell(index)
      .locator('.jp-OutputArea-child')
      .evaluateAll(children =>
        children.map(child => {
          let best: { width: number; height: number } | null = null;
          for (const element of Array.from(child.querySelectorAll('img, svg.main-svg, canvas'))) {
            const { width, height } = element.getBoundingClientRect();
            if (width * height > (best ? best.width * best.height : 0)) best = { width, height };
          }
          return best;
        }),
      );
  }

  /** Saves through the document context and waits until the model is clean. */
  async save(): Promise<void> {
    await this.lab.page.evaluate(async id => {
      for (const widget of window.chernelLab!.shell.widgets('main')) {
        if (widget.id !== id) continue;
        const panel = widget as unknown as PageNotebookPanel;
        await panel.context.save();
        if (panel.context.model.dirty) throw new Error(`lab: ${panel.context.path} is still dirty after saving`);
      }
    }, this.panelId);
  }
}
