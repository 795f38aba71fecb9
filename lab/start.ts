// `npm start`: the chernel lab on the demo notebooks (trusted, so that they open live). Builds what
// is stale (scripts/setup.sh --no-build ran first and installed what is missing), registers the
// chernel kernel, starts the server on 127.0.0.1 and prints its URL.
// Options: --port N (default 8888, or the next free one above it), --root DIR (default notebooks-demo/),
// --prepare (install, build and register only; what CI runs before the browser tests).
// Run: node --import ./scripts/register-ts.js lab/start.ts
import { parseArgs } from 'node:util';
import { readdirSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { ensureLabBuilt, projectDir, registerChernelKernel, startLabServer } from './launch.js';

const { values } = parseArgs({
  options: {
    port: { type: 'string', default: '8888' },
    root: { type: 'string', default: join(projectDir, 'notebooks-demo') },
    prepare: { type: 'boolean', default: false },
  },
});
const port = Number(values.port);
if (!Number.isInteger(port) || port < 0 || port > 65535) {
  console.error(`lab: --port: expected a port number, got "${values.port}"`);
  process.exit(2);
}

ensureLabBuilt();
registerChernelKernel();
if (values.prepare) process.exit(0);
/**
 * The server's log, minus its own banner (its address lines, with the token masked, and its Ctrl-C
 * advice would stand before the one address to open, printed below) and minus the page's polling
 * of APIs this server version lacks (harmless: /work/shared/JUPYTERLAB.md), which would bury the
 * lines that matter.
 */
const banner = /is running at:$|^\[I [^\]]*\] +(or )?https?:\/\/\S+$|Use Control-C to stop this server/;
const harmless = /404 GET \/api\/(me|events\/subscribe)\b|Could not open static file ''/;
let partial = '';
function serverLog(text: string): void {
  const lines = (partial + text).split('\n');
  partial = lines.pop() ?? '';
  for (const line of lines) if (!banner.test(line) && !harmless.test(line)) process.stderr.write(`${line}\n`);
}
// The project's own demos open live (their widgets and figures run); anything else a user opens is
// untrusted until they say so, as in any JupyterLab.
const demoDir = join(projectDir, 'notebooks-demo');
const demos = readdirSync(demoDir).filter(name => name.endsWith('.ipynb')).map(name => join(demoDir, name));
const server = await startLabServer({ rootDir: resolve(values.root), port, onOutput: serverLog, trust: demos });
console.log(`\nchernel lab is running on ${resolve(values.root)}\n\n    ${server.labUrl}\n\nPress Ctrl-C to stop.`);

let stopping = false;
for (const signal of ['SIGINT', 'SIGTERM'] as const) {
  process.once(signal, () => {
    stopping = true;
    void server.stop().then(() => process.exit(0));
  });
}
server.process.once('exit', code => {
  if (stopping) return;
  console.error(`lab: server exited (${code})`);
  process.exit(1);
});
