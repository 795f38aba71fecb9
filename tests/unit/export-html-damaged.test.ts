// Corrupted saved widget state through `chernel export-html`: every variant is reported naming the
// cell and the problem, shown on the page in place of the widget, and the command exits 1. The
// state format is the Jupyter widget state schema 2.0 (metadata.widgets[...widget-state+json];
// common practice); the undamaged notebook exports with exit 0 and no message.
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { exportHtmlCommand, renderNotebook } from '../../cli/export-html.js';
import { savedStateEntry, widgetState } from '../../kernel/widget-state.js';
import { compute, qwz } from '../../src/index.js';

const dir = mkdtempSync(join(tmpdir(), 'chernel-damaged-'));
const runtime = join(dir, 'runtime.js');
writeFileSync(runtime, 'window.runtimeLoaded = true;');
const STATE_MIME = 'application/vnd.jupyter.widget-state+json';
const VIEW_MIME = 'application/vnd.jupyter.widget-view+json';

type Json = Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any -- test fixtures are edited freely

function goodNotebook(): Json {
  const spec = qwz();
  const result = compute({ kind: 'curvature', model: spec, grid: 6, params: { u: -1 } }) as unknown as Record<string, unknown> & { kind: string };
  const entry = savedStateEntry(widgetState({ kind: 'curvature', spec, options: { grid: 6 }, values: { u: -1 }, result, error: '', title: '' }));
  return {
    nbformat: 4, nbformat_minor: 5,
    metadata: { widgets: { [STATE_MIME]: { version_major: 2, version_minor: 0, state: { w1: entry } } } },
    cells: [
      { cell_type: 'markdown', source: '# A widget', metadata: {} },
      { cell_type: 'code', source: 'show(qwz())', metadata: {}, outputs: [
        { output_type: 'display_data', metadata: {}, data: { [VIEW_MIME]: { model_id: 'w1', version_major: 2, version_minor: 0 }, 'text/plain': 'curvature widget', 'image/png': 'iVBORw0KGgo=' } },
      ] },
    ],
  };
}

/** Each damage a saved notebook can suffer (edits, truncation, other versions, lost metadata). */
const DAMAGE: [string, (nb: Json) => void][] = [
  ['no widget metadata', (nb) => delete nb.metadata.widgets],
  ['no metadata at all', (nb) => delete nb.metadata],
  ['state mime missing', (nb) => (nb.metadata.widgets = {})],
  ['state is a string', (nb) => (nb.metadata.widgets[STATE_MIME] = 'truncated')],
  ['wrong major version', (nb) => (nb.metadata.widgets[STATE_MIME].version_major = 1)],
  ['version missing', (nb) => delete nb.metadata.widgets[STATE_MIME].version_major],
  ['models missing', (nb) => delete nb.metadata.widgets[STATE_MIME].state],
  ['model of the view missing', (nb) => delete nb.metadata.widgets[STATE_MIME].state.w1],
  ['view names no model', (nb) => delete nb.cells[1].outputs[0].data[VIEW_MIME].model_id],
  ['entry not an object', (nb) => (nb.metadata.widgets[STATE_MIME].state.w1 = 7)],
  ['entry without state', (nb) => delete nb.metadata.widgets[STATE_MIME].state.w1.state],
  ['unknown kind', (nb) => (nb.metadata.widgets[STATE_MIME].state.w1.state.kind = 'chrn')],
  ['spec missing', (nb) => delete nb.metadata.widgets[STATE_MIME].state.w1.state.spec],
  ['spec of another format', (nb) => (nb.metadata.widgets[STATE_MIME].state.w1.state.spec.format = 'other')],
  ['spec orbitals emptied', (nb) => (nb.metadata.widgets[STATE_MIME].state.w1.state.spec.orbitals = [])],
  ['spec term to an unknown orbital', (nb) => (nb.metadata.widgets[STATE_MIME].state.w1.state.spec.terms[0].to = 'zz')],
  ['spec amplitude calling config', (nb) => (nb.metadata.widgets[STATE_MIME].state.w1.state.spec.terms[0].amplitude = 'config({predictable: true})')],
  ['spec field misspelt', (nb) => (nb.metadata.widgets[STATE_MIME].state.w1.state.spec.term = [])],
  ['values not an object', (nb) => (nb.metadata.widgets[STATE_MIME].state.w1.state.values = 3)],
  ['value not a number', (nb) => (nb.metadata.widgets[STATE_MIME].state.w1.state.values.u = 'x')],
  ['value of an unknown parameter', (nb) => (nb.metadata.widgets[STATE_MIME].state.w1.state.values.v = 1)],
  ['options not an object', (nb) => (nb.metadata.widgets[STATE_MIME].state.w1.state.options = 3)],
  ['result without kind', (nb) => delete nb.metadata.widgets[STATE_MIME].state.w1.state.result.kind],
  ['buffers dropped', (nb) => (nb.metadata.widgets[STATE_MIME].state.w1.buffers = [])],
  ['buffer truncated', (nb) => { const b = nb.metadata.widgets[STATE_MIME].state.w1.buffers[0]; b.data = b.data.slice(0, 16); }],
  ['buffer not base64', (nb) => (nb.metadata.widgets[STATE_MIME].state.w1.buffers[0].data = '@@@@')],
  ['buffer base64 cut mid-quad', (nb) => { const b = nb.metadata.widgets[STATE_MIME].state.w1.buffers[0]; b.data = b.data.slice(0, -3); }],
  ['buffer encoding changed', (nb) => (nb.metadata.widgets[STATE_MIME].state.w1.buffers[0].encoding = 'hex')],
  ['buffer path leads nowhere', (nb) => (nb.metadata.widgets[STATE_MIME].state.w1.buffers[0].path = ['result', 'nothing', 'here', 'buffer'])],
  ['buffers not a list', (nb) => (nb.metadata.widgets[STATE_MIME].state.w1.buffers = {})],
  ['array shape edited', (nb) => { const s = nb.metadata.widgets[STATE_MIME].state.w1.state; const key = nb.metadata.widgets[STATE_MIME].state.w1.buffers[0].path[1]; s.result[key].shape = [999]; }],
  ['array dtype edited', (nb) => { const s = nb.metadata.widgets[STATE_MIME].state.w1.state; const key = nb.metadata.widgets[STATE_MIME].state.w1.buffers[0].path[1]; s.result[key].dtype = 'complex128'; }],
];

describe('export-html with damaged widget state', () => {
  it('the undamaged notebook exports with no problem and a live view tag', () => {
    const { html, problems } = renderNotebook(goodNotebook(), { runtime });
    expect(problems).toEqual([]);
    expect(html).toContain(`<script type="${VIEW_MIME}">`);
    expect(html).not.toContain('class="chernel-message"');
  });

  it('a state saved without its default fields (as widget managers save it: drop_defaults) is whole', () => {
    const nb = goodNotebook();
    const state = nb.metadata.widgets[STATE_MIME].state.w1.state;
    for (const key of ['kind', 'options', 'title', 'error', '_dom_classes']) delete state[key];
    expect(renderNotebook(nb, { runtime }).problems).toEqual([]);
  });

  it.each(DAMAGE)('%s: reported naming the cell, shown as a message with the picture, exit 1', (name, damage) => {
    const nb = goodNotebook();
    damage(nb);
    const { html, problems } = renderNotebook(nb, { runtime });
    expect(problems, name).toHaveLength(1);
    expect(problems[0].cell).toBe(2);
    expect(problems[0].problem.length).toBeGreaterThan(10);
    expect(html).toContain('class="chernel-message" data-level="error"');
    expect(html).toContain('data:image/png;base64,iVBORw0KGgo=');
    expect(html).not.toContain(`<script type="${VIEW_MIME}">`);
    const input = join(dir, 'damaged.ipynb');
    writeFileSync(input, JSON.stringify(nb));
    const lines: string[] = [];
    expect(exportHtmlCommand([input, '-o', join(dir, 'damaged.html')], (l) => lines.push(l))).toBe(1);
    expect(lines.join('\n')).toContain(`cell 2: widget ${problems[0].modelId} is not live in the page: ${problems[0].problem}`);
    expect(readFileSync(join(dir, 'damaged.html'), 'utf8')).toContain(problems[0].problem.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;'));
  });
});
