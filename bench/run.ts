/**
 * `npm run bench`: every speed and memory target, each as a ratio against a reference measured in
 * the same run (numpy via Debian's /usr/bin/python3, Debian's ipykernel, a one-worker run).
 * `npm run bench -- linalg scan` runs only the named sections.
 */
import { formatTable, type BenchRow } from './table.js';

const sections: Record<string, () => Promise<BenchRow[]>> = {
  linalg: async () => (await import('./linalg.js')).benchLinalg(),
  topology: async () => (await import('./topology.js')).benchTopology(),
  scan: async () => (await import('./scan.js')).benchScan(),
  kernel: async () => (await import('./kernel.js')).benchKernel(),
  widgets: async () => (await import('./widgets.js')).benchWidgets(),
  realspace: async () => (await import('./realspace.js')).benchRealspace(),
  surface: async () => (await import('./surface.js')).benchSurface(),
};

const chosen = process.argv.slice(2).filter((a) => !a.startsWith('-'));
const rows: BenchRow[] = [];
let failed = false;
for (const [name, run] of Object.entries(sections)) {
  if (chosen.length > 0 && !chosen.includes(name)) continue;
  process.stderr.write(`bench: ${name}...\n`);
  try {
    const got = await run();
    rows.push(...got);
    process.stderr.write(formatTable(got) + '\n');
  } catch (err) {
    failed = true;
    process.stderr.write(`bench: ${name} failed: ${(err as Error).stack ?? err}\n`);
  }
}
console.log(formatTable(rows));
if (failed) process.exitCode = 1;
