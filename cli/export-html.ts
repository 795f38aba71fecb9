/**
 * `chernel export-html notebook.ipynb -o out.html`: one standalone page with the notebook's cells,
 * its outputs, and its saved widget state. The page carries the widget runtime
 * (widgets/dist/embed.js: html-manager, chernel's views, the engine worker), so the widgets draw
 * and their controls recompute with no kernel, also when the page is opened from a file.
 */

import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { basename, dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { validateModel } from '../src/model/validate.js';
import { PLOTLY_MIME, SAVED_WIDGET_MIME, WIDGET_MODULE, WIDGET_STATE_MIME, WIDGET_VIEW_MIME } from '../contract/protocol.js';
import { diagnosticStateProblem } from '../contract/state-check.js';

/** Where the page runtime is found: built by `npm run build` in widgets/. */
export function defaultRuntimePath(): string {
  const here = dirname(fileURLToPath(import.meta.url));
  // From cli/ (sources) or dist/cli/ (compiled).
  for (const up of ['..', '../..']) {
    const candidate = resolve(here, up, 'widgets', 'dist', 'embed.js');
    if (existsSync(candidate)) return candidate;
  }
  return resolve(here, '..', 'widgets', 'dist', 'embed.js');
}

export class NotebookFormatError extends Error {
  constructor(field: string, message: string) {
    super(`${field}: ${message}`);
    this.name = 'NotebookFormatError';
  }
}

type Json = Record<string, unknown>;

interface Cell {
  cell_type: string;
  source: string;
  outputs: Json[];
}

function text(value: unknown): string {
  if (Array.isArray(value)) return value.join('');
  return typeof value === 'string' ? value : '';
}

function escapeHtml(value: string): string {
  return value.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

/** Text that is safe inside <script>: no closing tag or comment opener can end it early. */
function scriptSafe(value: string): string {
  return value.replace(/<\/(script)/gi, '<\\/$1').replace(/<!--/g, '<\\!--');
}

function stripAnsi(value: string): string {
  // eslint-disable-next-line no-control-regex
  return value.replace(/\u001b\[[0-9;]*[A-Za-z]/g, '');
}

function cellsOf(notebook: Json): Cell[] {
  if (!Array.isArray(notebook.cells)) throw new NotebookFormatError('cells', `expected a list. Value: ${JSON.stringify(notebook.cells)}`);
  return notebook.cells.map((raw: unknown, i: number) => {
    if (raw === null || typeof raw !== 'object') throw new NotebookFormatError(`cells[${i}]`, 'expected an object');
    const cell = raw as Json;
    return {
      cell_type: String(cell.cell_type),
      source: text(cell.source),
      outputs: Array.isArray(cell.outputs) ? (cell.outputs as Json[]) : [],
    };
  });
}

/** A small Markdown subset: headings, paragraphs, lists, code spans and blocks, emphasis. */
export function markdownToHtml(source: string): string {
  const inline = (line: string) =>
    escapeHtml(line)
      .replace(/`([^`]+)`/g, '<code>$1</code>')
      .replace(/\*\*([^*]+)\*\*/g, '<strong>$1</strong>')
      .replace(/(^|[^*])\*([^*]+)\*/g, '$1<em>$2</em>');
  const out: string[] = [];
  for (const block of source.split(/\n{2,}/)) {
    const trimmed = block.trim();
    if (!trimmed) continue;
    const fence = /^```[^\n]*\n([\s\S]*?)\n?```$/.exec(trimmed);
    if (fence) {
      out.push(`<pre><code>${escapeHtml(fence[1])}</code></pre>`);
      continue;
    }
    // Line by line: headings stand alone, list items group into a list, the rest into paragraphs.
    let paragraph: string[] = [];
    let items: string[] = [];
    const flush = () => {
      if (paragraph.length) out.push(`<p>${paragraph.map(inline).join('<br>')}</p>`);
      if (items.length) out.push(`<ul>${items.map((i) => `<li>${inline(i)}</li>`).join('')}</ul>`);
      paragraph = [];
      items = [];
    };
    for (const line of trimmed.split('\n')) {
      const heading = /^(#{1,6})\s+(.*)$/.exec(line);
      const item = /^\s*[-*]\s+(.*)$/.exec(line);
      if (heading) {
        flush();
        out.push(`<h${heading[1].length}>${inline(heading[2])}</h${heading[1].length}>`);
      } else if (item) {
        if (paragraph.length) flush();
        items.push(item[1]);
      } else {
        if (items.length) flush();
        paragraph.push(line);
      }
    }
    flush();
  }
  return out.join('\n');
}

/** A widget that cannot be embedded: where it is and why. */
export interface WidgetProblem {
  /** 1-based, as a notebook's cells are counted by a reader. */
  cell: number;
  modelId: string;
  problem: string;
}

const SAVED_STATE_VERSION = 2;
const isObject = (x: unknown): x is Json => x !== null && typeof x === 'object' && !Array.isArray(x);

/** Lays each saved base64 buffer at its path in the state, as the widget manager would. */
function placeBuffers(state: Json, buffers: unknown): string | null {
  if (buffers === undefined) return null;
  if (!Array.isArray(buffers)) return 'buffers: expected a list';
  for (const [i, b] of buffers.entries()) {
    if (!isObject(b) || !Array.isArray(b.path) || b.path.length === 0) return `buffers[${i}]: expected {path, encoding, data}`;
    if (b.encoding !== 'base64') return `buffers[${i}].encoding: expected "base64". Value: ${JSON.stringify(b.encoding)}`;
    if (typeof b.data !== 'string' || !/^[A-Za-z0-9+/]*={0,2}$/.test(b.data) || b.data.length % 4 !== 0) return `buffers[${i}].data: not valid base64 (truncated?)`;
    let parent: unknown = state;
    for (const key of b.path.slice(0, -1)) parent = isObject(parent) || Array.isArray(parent) ? (parent as Json)[key as string] : undefined;
    if (!isObject(parent) && !Array.isArray(parent)) return `buffers[${i}].path: ${b.path.join('.')} leads nowhere in the state`;
    const bytes = Buffer.from(b.data, 'base64');
    (parent as Json)[b.path[b.path.length - 1] as string] = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  }
  return null;
}

/** The problem of one saved widget model, or null if the page can show it. */
function savedModelProblem(entry: unknown): string | null {
  if (!isObject(entry)) return 'its saved entry is not an object';
  if (!isObject(entry.state)) return 'its saved entry has no state';
  if (entry.model_module !== WIDGET_MODULE) return null; // another library's widget: its own runtime checks it
  const state = structuredClone(entry.state);
  const placed = placeBuffers(state, entry.buffers);
  if (placed) return placed;
  const problem = diagnosticStateProblem(state);
  if (problem) return problem;
  try {
    validateModel(state.spec);
  } catch (err) {
    return `spec.${(err as Error).message}`;
  }
  return null;
}

/**
 * Every widget view in the notebook whose state the page cannot embed: the saved state missing
 * (the notebook was saved without it), of another version, or damaged.
 */
export function widgetProblems(notebook: unknown): WidgetProblem[] {
  if (!isObject(notebook)) return [];
  const cells = cellsOf(notebook);
  const widgets = isObject(notebook.metadata) && isObject(notebook.metadata.widgets) ? notebook.metadata.widgets : {};
  const saved = widgets[WIDGET_STATE_MIME];
  // The states the outputs carry count as saved (a notebook saved with the lab's default settings has no other).
  const carried = (withOutputStates(undefined, cells)?.state ?? {}) as Json;
  let all: string | null = null;
  if (saved === undefined) {
    if (Object.keys(carried).length === 0) all = 'the notebook carries no saved widget state (neither in its outputs nor in its metadata); re-run it and save';
  } else if (!isObject(saved)) all = 'the saved widget state is not an object';
  else if (saved.version_major !== SAVED_STATE_VERSION) all = `the saved widget state has version ${JSON.stringify(saved.version_major)}.${JSON.stringify(saved.version_minor)}; this page reads ${SAVED_STATE_VERSION}.x`;
  else if (!isObject(saved.state)) all = 'the saved widget state has no models (metadata "state" is missing)';
  const models = { ...(isObject(saved) && isObject(saved.state) ? saved.state : {}), ...carried };
  const problems: WidgetProblem[] = [];
  cells.forEach((cell, i) => {
    for (const output of cell.outputs) {
      const view = isObject(output) && isObject(output.data) ? output.data[WIDGET_VIEW_MIME] : undefined;
      if (view === undefined) continue;
      const modelId = isObject(view) && typeof view.model_id === 'string' ? view.model_id : '';
      let problem = all;
      if (problem === null) {
        if (!modelId) problem = 'its output names no widget (model_id missing)';
        else if (!Object.hasOwn(models, modelId)) problem = 'its state was not saved with the notebook';
        else problem = savedModelProblem(models[modelId]);
      }
      if (problem !== null) problems.push({ cell: i + 1, modelId: modelId || '(none)', problem });
    }
  });
  return problems;
}

function staticPicture(data: Json): string {
  if (data['image/svg+xml']) return `<div class="output svg">${text(data['image/svg+xml'])}</div>`;
  if (data['image/png']) return `<div class="output image"><img alt="figure" src="data:image/png;base64,${text(data['image/png']).trim()}"></div>`;
  return '';
}

function outputHtml(output: Json, broken: ReadonlyMap<string, WidgetProblem>): string {
  const type = output.output_type;
  if (type === 'stream') return `<pre class="output stream ${escapeHtml(String(output.name))}">${escapeHtml(text(output.text))}</pre>`;
  if (type === 'error') {
    const trace = Array.isArray(output.traceback) ? (output.traceback as string[]).join('\n') : `${output.ename}: ${output.evalue}`;
    return `<pre class="output error">${escapeHtml(stripAnsi(trace))}</pre>`;
  }
  if (type !== 'display_data' && type !== 'execute_result') return '';
  const data = (output.data ?? {}) as Json;
  if (data[WIDGET_VIEW_MIME]) {
    const modelId = String((data[WIDGET_VIEW_MIME] as Json).model_id ?? '(none)');
    const problem = broken.get(modelId);
    if (problem) {
      // Said on the page where the widget would be, with its last picture when the output has one.
      const message = `Widget ${modelId} (cell ${problem.cell}) is not live in this page: ${problem.problem}.`;
      return `<div class="output widget broken"><div class="chernel-message" data-level="error">${escapeHtml(message)}</div>${staticPicture(data)}</div>`;
    }
    // The view tag; the runtime replaces it by the live widget. Without JavaScript, its last picture.
    const still = staticPicture(data) || (data['text/plain'] ? `<pre>${escapeHtml(text(data['text/plain']))}</pre>` : '');
    const fallback = still ? `<noscript>${still}</noscript>` : '';
    return `<div class="output widget">${fallback}<script type="${WIDGET_VIEW_MIME}">${scriptSafe(JSON.stringify(data[WIDGET_VIEW_MIME]))}</script></div>`;
  }
  const image = staticPicture(data);
  // Notebook outputs are the author's own HTML, shown as JupyterLab shows a trusted notebook.
  const html = data['text/html'] ? `<div class="output html">${text(data['text/html'])}</div>` : '';
  if (data[PLOTLY_MIME]) {
    // Drawn by the page runtime's plotly; the static picture (or HTML) stays if it cannot be.
    const figure = `<script type="${PLOTLY_MIME}">${scriptSafe(JSON.stringify(data[PLOTLY_MIME]))}</script>`;
    return `<div class="output plotly">${figure}<div class="plotly-fallback">${image || html}</div></div>`;
  }
  if (html) return html;
  if (image) return image;
  if (data['text/plain']) return `<pre class="output text">${escapeHtml(stripAnsi(text(data['text/plain'])))}</pre>`;
  return '';
}

const PAGE_CSS = `
body { font: 14px/1.45 system-ui, -apple-system, "Segoe UI", sans-serif; margin: 0 auto; max-width: 960px; padding: 24px; color: #222; }
.cell { margin: 14px 0; }
.cell pre.input { background: #f5f6f8; border-left: 3px solid #9aa8c0; padding: 8px 10px; overflow-x: auto; margin: 0 0 6px; }
pre.output { margin: 4px 0; padding: 4px 10px; overflow-x: auto; }
pre.output.error, pre.output.stderr { background: #fdecea; }
.chernel-message[data-level="error"] { background: #fdecea; border-left: 3px solid #c62828; padding: 8px 10px; margin: 4px 0; }
.output.image img { max-width: 100%; }
footer { margin-top: 32px; color: #777; font-size: 12px; }
`;

export interface ExportOptions {
  /** The page runtime script (default: widgets/dist/embed.js). */
  runtime?: string;
  title?: string;
}

/**
 * The notebook's saved widget state, with the states chernel's widget outputs carry themselves
 * (SAVED_WIDGET_MIME: a notebook saved with the lab's default settings has no other); an output's
 * copy wins, as in the lab. Undefined when there is neither.
 */
function withOutputStates(saved: Json | undefined, cells: Cell[]): Json | undefined {
  const state: Json = { ...((saved?.state as Json | undefined) ?? {}) };
  for (const output of cells.flatMap((c) => c.outputs)) {
    const data = (output.data ?? {}) as Json;
    const entry = data[SAVED_WIDGET_MIME] as Json | undefined;
    const modelId = (data[WIDGET_VIEW_MIME] as Json | undefined)?.model_id;
    if (entry === undefined || typeof modelId !== 'string') continue;
    const { model_id: _id, ...rest } = entry;
    state[modelId] = rest;
  }
  if (saved === undefined && Object.keys(state).length === 0) return undefined;
  return { version_major: 2, version_minor: 0, ...(saved ?? {}), state };
}

/** The page for a parsed notebook. Throws NotebookFormatError naming the malformed field. */
export function notebookToHtml(notebook: unknown, options: ExportOptions = {}): string {
  return renderNotebook(notebook, options).html;
}

/**
 * The page, and the widgets it could not embed live (each shown on the page as a message in place
 * of the widget, with its static picture when the output carries one).
 */
export function renderNotebook(notebook: unknown, options: ExportOptions = {}): { html: string; problems: WidgetProblem[] } {
  if (notebook === null || typeof notebook !== 'object') throw new NotebookFormatError('notebook', 'expected a JSON object');
  const nb = notebook as Json;
  const cells = cellsOf(nb);
  const metadata = (nb.metadata ?? {}) as Json;
  const widgets = (metadata.widgets ?? {}) as Json;
  const widgetState = withOutputStates(widgets[WIDGET_STATE_MIME] as Json | undefined, cells);
  const runtimePath = options.runtime ?? defaultRuntimePath();
  if (!existsSync(runtimePath)) {
    throw new Error(`export-html: the widget runtime ${runtimePath} is missing; run \`npm run build\` in widgets/`);
  }
  const runtime = readFileSync(runtimePath, 'utf8');
  const title = options.title ?? 'chernel notebook';
  const problems = widgetProblems(nb);
  const broken = new Map(problems.map((p) => [p.modelId, p]));

  const body = cells
    .map((cell) => {
      if (cell.cell_type === 'markdown') return `<div class="cell markdown">${markdownToHtml(cell.source)}</div>`;
      if (cell.cell_type === 'raw') return `<div class="cell raw"><pre>${escapeHtml(cell.source)}</pre></div>`;
      const input = cell.source.trim() ? `<pre class="input"><code>${escapeHtml(cell.source)}</code></pre>` : '';
      return `<div class="cell code">${input}${cell.outputs.map((o) => outputHtml(o, broken)).join('')}</div>`;
    })
    .join('\n');

  const stateTag = widgetState
    ? `<script type="${WIDGET_STATE_MIME}">${scriptSafe(JSON.stringify(widgetState))}</script>`
    : '';
  const html = `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="generator" content="chernel export-html">
<title>${escapeHtml(title)}</title>
<style>${PAGE_CSS}</style>
${stateTag}
</head>
<body>
<main>
${body}
</main>
<footer>Exported by chernel. Widgets recompute in this page; no kernel is running.</footer>
<script>${scriptSafe(runtime)}</script>
</body>
</html>
`;
  return { html, problems };
}

/** Reads a notebook file and writes the page; returns the widgets it could not embed live. */
export function exportHtml(input: string, output: string, options: ExportOptions = {}): WidgetProblem[] {
  let notebook: unknown;
  try {
    notebook = JSON.parse(readFileSync(input, 'utf8'));
  } catch (err) {
    throw new NotebookFormatError(input, `not a readable notebook (JSON): ${(err as Error).message}`);
  }
  const { html, problems } = renderNotebook(notebook, { title: basename(input, '.ipynb'), ...options });
  writeFileSync(output, html);
  return problems;
}

export const USAGE =
  'usage: chernel export-html NOTEBOOK.ipynb [-o OUT.html]\n' +
  '  A widget whose saved state is missing or damaged is shown as a message (with its static picture)\n' +
  '  in place of the live widget; each is reported here and the exit status is 1.';

/** The CLI subcommand: `chernel export-html nb.ipynb -o out.html`. Returns the exit code. */
export function exportHtmlCommand(argv: string[], stderr: (line: string) => void = (l) => process.stderr.write(l + '\n')): number {
  let input: string | undefined;
  let output: string | undefined;
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i];
    if (arg === '-o' || arg === '--output') output = argv[++i];
    else if (arg === '-h' || arg === '--help') {
      stderr(USAGE);
      return 0;
    } else if (input === undefined) input = arg;
    else {
      stderr(`export-html: unexpected argument "${arg}"\n${USAGE}`);
      return 2;
    }
  }
  if (input === undefined) {
    stderr(USAGE);
    return 2;
  }
  output ??= input.replace(/\.ipynb$/, '') + '.html';
  let problems: WidgetProblem[];
  try {
    problems = exportHtml(input, output);
  } catch (err) {
    stderr(`export-html: ${(err as Error).message}`);
    return 1;
  }
  for (const p of problems) stderr(`export-html: ${input}, cell ${p.cell}: widget ${p.modelId} is not live in the page: ${p.problem}`);
  if (problems.length > 0) {
    stderr(`export-html: wrote ${output}, with ${problems.length} widget(s) shown as a message instead (see above)`);
    return 1;
  }
  stderr(`export-html: wrote ${output}`);
  return 0;
}
