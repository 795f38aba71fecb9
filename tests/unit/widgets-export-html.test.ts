// The standalone page writer and the widget state the kernel saves (nbformat 4 and the Jupyter
// widget state schema 2.0: metadata.widgets["application/vnd.jupyter.widget-state+json"];
// common practice).
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { exportHtmlCommand, markdownToHtml, NotebookFormatError, notebookToHtml } from '../../cli/export-html.js';
import { checkValues, savedStateEntry, widgetState } from '../../kernel/widget-state.js';
import { ModelError, qwz } from '../../src/index.js';
import { putBuffers, unpackArrays } from '../../contract/wire.js';

const dir = mkdtempSync(join(tmpdir(), 'chernel-export-test-'));
const runtime = join(dir, 'runtime.js');
writeFileSync(runtime, 'window.runtimeLoaded = "</script><!-- not the end";');

function notebook(cells: unknown[], metadata: Record<string, unknown> = {}) {
  return { nbformat: 4, nbformat_minor: 5, metadata, cells };
}

describe('export-html page', () => {
  it('keeps script contents from ending early and escapes code', () => {
    const html = notebookToHtml(
      notebook([{ cell_type: 'code', source: ['const s = "</script>";', '\n1 < 2'], outputs: [] }], {
        widgets: { 'application/vnd.jupyter.widget-state+json': { version_major: 2, version_minor: 0, state: { a: { note: '</script>' } } } },
      }),
      { runtime },
    );
    expect(html.match(/<\/script>/gi)).toHaveLength(2); // the state tag's and the runtime's own ends
    expect(html).toContain('const s = &quot;&lt;/script&gt;&quot;;\n1 &lt; 2');
    expect(html).toContain('"note":"<\\/script>"');
    expect(html).toContain('window.runtimeLoaded = "<\\/script><\\!-- not the end";');
  });

  it('writes widget views as view tags, plots as plotly tags with their static fallback', () => {
    const html = notebookToHtml(
      notebook([
        {
          cell_type: 'code',
          source: 'show(m)',
          outputs: [
            { output_type: 'display_data', data: { 'application/vnd.jupyter.widget-view+json': { model_id: 'abc', version_major: 2, version_minor: 0 }, 'image/png': 'iVBW', 'text/plain': 'w' } },
            { output_type: 'execute_result', data: { 'application/vnd.plotly.v1+json': { data: [] }, 'image/png': 'iVBOR', 'text/html': '<b>r</b>' } },
            { output_type: 'stream', name: 'stderr', text: 'warn <x>' },
            { output_type: 'error', ename: 'ModelError', evalue: 'bad', traceback: ['\u001b[31mModelError\u001b[0m: bad'] },
          ],
        },
      ], {
        widgets: { 'application/vnd.jupyter.widget-state+json': { version_major: 2, version_minor: 0, state: {
          abc: savedStateEntry(widgetState({ kind: 'curvature', spec: qwz(), options: {}, values: { u: -1 }, result: null, error: '', title: '' })),
        } } },
      }),
      { runtime },
    );
    expect(html).toContain('<script type="application/vnd.jupyter.widget-view+json">{"model_id":"abc","version_major":2,"version_minor":0}</script>');
    // A reader without JavaScript sees the widget's last picture.
    expect(html).toContain('<noscript><div class="output image"><img alt="figure" src="data:image/png;base64,iVBW"></div></noscript>');
    expect(html).toContain('<script type="application/vnd.plotly.v1+json">{"data":[]}</script><div class="plotly-fallback"><div class="output image"><img alt="figure" src="data:image/png;base64,iVBOR">');
    expect(html).toContain('<pre class="output stream stderr">warn &lt;x&gt;</pre>');
    expect(html).toContain('<pre class="output error">ModelError: bad</pre>');
  });

  it('renders a Markdown subset', () => {
    expect(markdownToHtml('# Title\nText with `code` and **bold**.\n\n- a\n- b')).toBe(
      '<h1>Title</h1>\n<p>Text with <code>code</code> and <strong>bold</strong>.</p>\n<ul><li>a</li><li>b</li></ul>',
    );
  });

  it('names the malformed part of a notebook', () => {
    expect(() => notebookToHtml({ cells: 'no' }, { runtime })).toThrow(new NotebookFormatError('cells', 'expected a list. Value: "no"'));
    expect(() => notebookToHtml({ cells: [3] }, { runtime })).toThrow('cells[0]: expected an object');
    expect(() => notebookToHtml(notebook([]), { runtime: join(dir, 'missing.js') })).toThrow(/widget runtime .*missing\.js is missing/);
  });

  it('the command reports unreadable input and usage errors with exit codes', () => {
    const lines: string[] = [];
    expect(exportHtmlCommand([], (l) => lines.push(l))).toBe(2);
    expect(exportHtmlCommand(['a.ipynb', 'b.ipynb'], (l) => lines.push(l))).toBe(2);
    const bad = join(dir, 'bad.ipynb');
    writeFileSync(bad, '{not json');
    expect(exportHtmlCommand([bad, '-o', join(dir, 'bad.html')], (l) => lines.push(l))).toBe(1);
    expect(lines.at(-1)).toMatch(/^export-html: .*bad\.ipynb: not a readable notebook \(JSON\)/);
  });
});

describe('saved widget state', () => {
  it('round-trips the result through base64 buffers as a notebook stores them', () => {
    const spec = qwz();
    const result = { kind: 'curvature', values: new Float64Array([0.5, -1.25]), total: 1, checks: { minGap: 2, warnings: [] } };
    const entry = savedStateEntry(widgetState({ kind: 'curvature', spec, options: { grid: 2 }, values: { u: -1 }, result, error: '', title: '' })) as {
      model_name: string;
      state: Record<string, unknown>;
      buffers: { path: (string | number)[]; data: string; encoding: string }[];
    };
    expect(entry.model_name).toBe('DiagnosticModel');
    expect(entry.buffers.map((b) => b.path)).toEqual([['result', 'values', 'buffer']]);
    const state = JSON.parse(JSON.stringify(entry.state)) as Record<string, unknown>;
    putBuffers(state, entry.buffers.map((b) => b.path), entry.buffers.map((b) => new Uint8Array(Buffer.from(b.data, 'base64'))));
    const back = unpackArrays(state.result) as typeof result;
    expect(Array.from(back.values)).toEqual([0.5, -1.25]);
    expect(state.result_values).toEqual({ u: -1 });
    expect(state._model_module).toBe('chernel-widgets');
  });

  it('checks values against the model, naming the field and value', () => {
    const spec = qwz();
    expect(checkValues(spec, { u: 1.5 })).toEqual({ u: 1.5 });
    expect(() => checkValues(spec, { v: 1 })).toThrow(new ModelError('values.v', `model "${spec.name}" has no parameter "v" (it has: u)`));
    expect(() => checkValues(spec, { u: 'a' })).toThrow('values.u: must be a finite number. Value: "a"');
    expect(() => checkValues(spec, { u: 9 }, 'setValues')).toThrow('setValues.u: outside its declared range [-4, 4]. Value: 9');
    expect(() => checkValues(spec, [1])).toThrow('values: expected an object of parameter values. Value: [1]');
  });
});
