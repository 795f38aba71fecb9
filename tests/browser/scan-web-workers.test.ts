// The Web Worker sweep executor in real Chromium: a phase map on 2 workers equals the one computed
// in the page, and stopping a run (shared interrupt flag, the page being cross-origin isolated)
// leaves the executor usable. The engine is bundled with esbuild, served from 127.0.0.1.
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { createServer, type Server } from 'node:http';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { build } from 'esbuild';
import { chromium, type Browser } from 'playwright-core';
import { CHROMIUM_ARGS, CHROMIUM_PATH } from './chromium.js';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

const dir = mkdtempSync(join(tmpdir(), 'chernel-scan-web-'));
let server: Server;
let browser: Browser;
let base = '';

beforeAll(async () => {
  await build({
    entryPoints: { 'scan-page': 'tests/browser/fixtures/scan-page.ts', 'scan-worker': 'tests/browser/fixtures/scan-worker.ts' },
    bundle: true, format: 'esm', target: 'es2022', outdir: dir, logLevel: 'error',
  });
  writeFileSync(join(dir, 'index.html'), '<!doctype html><meta charset="utf-8"><script type="module" src="./scan-page.js"></script>');
  server = createServer((req, res) => {
    // Under /plain/ the page is not cross-origin isolated: no SharedArrayBuffer, so stopping
    // terminates the workers; elsewhere it is, and stopping raises the shared interrupt flag.
    const url = (req.url ?? '/').split('?')[0];
    const plain = url.startsWith('/plain/');
    const name = url.replace(/^\/plain\//, '/').replace(/^\/$/, '/index.html').slice(1);
    try {
      const body = readFileSync(join(dir, name.replace(/\.\./g, '')));
      res.writeHead(200, {
        'content-type': name.endsWith('.js') ? 'text/javascript' : 'text/html',
        ...(plain ? {} : { 'cross-origin-opener-policy': 'same-origin', 'cross-origin-embedder-policy': 'require-corp' }),
      });
      res.end(body);
    } catch {
      res.writeHead(404).end();
    }
  });
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
  const address = server.address();
  base = `http://127.0.0.1:${typeof address === 'object' && address ? address.port : 0}`;
  browser = await chromium.launch({
    executablePath: CHROMIUM_PATH,
    args: CHROMIUM_ARGS,
  });
});

afterAll(async () => {
  await browser?.close();
  await new Promise((r) => server?.close(r));
  rmSync(dir, { recursive: true, force: true });
});

describe('WebWorkerExecutor in Chromium', () => {
  it.each([
    ['isolated (shared interrupt flag)', '/', true],
    ['not isolated (workers terminated)', '/plain/', false],
  ])('%s: gives the in-page phase map, stops on abort and runs again', async (_name, path, isolated) => {
    const context = await browser.newContext();
    const page = await context.newPage();
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(String(e)));
    // Exposed before the page loads: its script reports as soon as it is done.
    let resolveResult: (r: Record<string, unknown>) => void = () => {};
    const result = new Promise<Record<string, unknown>>((resolve) => { resolveResult = resolve; });
    await page.exposeFunction('report', (r: Record<string, unknown>) => resolveResult(r));
    await page.goto(`${base}${path}`);
    const r = await result;
    await context.close();
    expect(r.error, String(r.error)).toBeUndefined();
    expect(errors).toEqual([]);
    expect(r.isolated).toBe(isolated);
    expect(r.equal).toBe(true);
    // QWZ (Qi, Wu, Zhang, PRB 74, 085308 (2006)), C(lower) in the shared/references.md convention.
    const values = r.values as number[];
    expect(values).toEqual([0, 0, 0, 1, 1, 1, 1, 1, -1, -1, -1, -1, -1, 0, 0, 0, 0]);
    // Boundaries at the gap closings u = -2, 0, 2 (a midpoint landing on one gives a bracket each side).
    const at = r.boundaries as number[];
    expect(at.length).toBeGreaterThanOrEqual(3);
    for (const u of at) expect(Math.min(...[-2, 0, 2].map((c) => Math.abs(u - c)))).toBeLessThanOrEqual(1e-3);
    for (const c of [-2, 0, 2]) expect(at.some((u) => Math.abs(u - c) <= 1e-3)).toBe(true);
    expect(r.progressCalls as number).toBeGreaterThan(17);
    expect(r.stopError).toBe('InterruptedError');
    expect(r.stoppedAfter as number).toBeLessThan(400);
    expect(r.againEqual).toBe(true);
  });
});
