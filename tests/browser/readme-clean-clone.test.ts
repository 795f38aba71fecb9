// The README's "Two commands", followed literally in a fresh clone of the committed HEAD in a
// scratch folder: the setup command installs and builds, `npm start` prints the lab's address and
// serves the lab page with the demo notebooks and the chernel kernel, and the test command runs
// there (one fast layer, picked with CHERNEL_LAYERS, so that this test does not recurse into the
// whole suite). Takes 2-4 minutes, mostly `npm ci` from the warm npm cache and the builds.
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { createWriteStream, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { projectDir } from '../../lab/launch.js';
import { artifactsDir } from './lab-harness.js';

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

/** The environment of a user's shell: nothing inherited from the npm script or vitest running this test. */
function userEnv(extra: Record<string, string> = {}): NodeJS.ProcessEnv {
  const env: NodeJS.ProcessEnv = {};
  for (const [key, value] of Object.entries(process.env)) {
    if (/^(npm_|VITEST|CHERNEL_|INIT_CWD$|NODE_ENV$|NODE_OPTIONS$|TEST$)/.test(key)) continue;
    env[key] = value;
  }
  return { ...env, ...extra };
}

const logPath = join(artifactsDir, 'readme-clean-clone.log');

/** Runs a README command in the clone through bash, as a user types it; output goes to the log. */
function runCommand(command: string, cwd: string, env: NodeJS.ProcessEnv, timeoutMs: number): { status: number | null; output: string } {
  const started = Date.now();
  const result = spawnSync('bash', ['-c', command], { cwd, env, encoding: 'utf8', timeout: timeoutMs, maxBuffer: 256 << 20 });
  const output = `${result.stdout ?? ''}${result.stderr ?? ''}`;
  log(`$ ${command}   (${((Date.now() - started) / 1000).toFixed(0)} s, exit ${result.status ?? result.signal})\n${output}`);
  return { status: result.status, output };
}

let logStream: ReturnType<typeof createWriteStream> | undefined;
function log(text: string): void {
  logStream?.write(`[${new Date().toISOString()}] ${text}\n`);
}

const tail = (text: string) => text.trim().split('\n').slice(-30).join('\n');

describe('the README followed from a clean clone', () => {
  const [startCommand, testCommand] = readmeCommands();
  let scratch: string;
  let clone: string;

  beforeAll(() => {
    mkdirSync(artifactsDir, { recursive: true });
    logStream = createWriteStream(logPath);
    scratch = mkdtempSync(join(tmpdir(), 'chernel-clean-clone-'));
    clone = join(scratch, 'chernel');
    const cloned = spawnSync('git', ['clone', '--quiet', projectDir, clone], { encoding: 'utf8' });
    if (cloned.status !== 0) throw new Error(`git clone failed: ${cloned.stderr}`);
    log(`cloned ${projectDir} at ${spawnSync('git', ['rev-parse', 'HEAD'], { cwd: clone, encoding: 'utf8' }).stdout.trim()} into ${clone}`);
  });

  afterAll(async () => {
    if (scratch) rmSync(scratch, { recursive: true, force: true });
    log('scratch folder removed');
    await new Promise(done => (logStream ? logStream.end(done) : done(undefined)));
  });

  it('names the two commands', () => {
    expect([startCommand, testCommand]).toEqual(['npm start', 'npm run setup && npm test']);
  });

  it('sets everything up with the setup command', () => {
    const setup = testCommand.split('&&')[0].trim();
    const { status, output } = runCommand(setup, clone, userEnv(), 8 * 60_000);
    expect(status, tail(output)).toBe(0);
    expect(output).toContain('setup: done');
  }, 9 * 60_000);

  it('starts the lab on the demo notebooks with `npm start`, and stops on Ctrl-C', async () => {
    const server = spawn('bash', ['-c', startCommand], { cwd: clone, env: userEnv(), detached: true, stdio: ['ignore', 'pipe', 'pipe'] });
    let output = '';
    server.stdout.on('data', (chunk: Buffer) => (output += chunk.toString()));
    server.stderr.on('data', (chunk: Buffer) => (output += chunk.toString()));
    const exited = new Promise<number | null>(done => server.once('exit', code => done(code)));
    let labUrl: URL | undefined;
    try {
      const deadline = Date.now() + 4 * 60_000;
      while (labUrl === undefined) {
        const found = output.match(/http:\/\/127\.0\.0\.1:\d+\/lab\?token=[0-9a-f]+/);
        if (found) labUrl = new URL(found[0]);
        else if (server.exitCode !== null) throw new Error(`npm start exited (${server.exitCode}) before printing the address:\n${tail(output)}`);
        else if (Date.now() > deadline) throw new Error(`npm start printed no address within 4 minutes:\n${tail(output)}`);
        else await new Promise(done => setTimeout(done, 250));
      }
      const token = labUrl.searchParams.get('token')!;
      const base = `${labUrl.origin}/`;
      const auth = { headers: { Authorization: `token ${token}` } };

      // The address as printed opens the lab page, and the bundle it loads is served.
      const page = await fetch(labUrl);
      expect(page.status).toBe(200);
      const html = await page.text();
      expect(html).toContain('id="jupyter-config-data"');
      const bundle = html.match(/<script src="([^"]+\/bundle\.js)"/)?.[1];
      expect(bundle).toBeDefined();
      expect((await fetch(new URL(bundle!, base), auth)).status).toBe(200);

      // The file browser's listing: the demo notebooks of the clone.
      const listing = (await (await fetch(`${base}api/contents`, auth)).json()) as { content: Array<{ name: string; type: string }> };
      const shown = listing.content.filter(item => item.type === 'notebook').map(item => item.name).sort();
      const demos = readdirSync(join(clone, 'notebooks-demo')).filter(name => name.endsWith('.ipynb')).sort();
      expect(demos.length).toBeGreaterThan(0);
      expect(shown).toEqual(demos);
      // And the chernel kernel they are written for.
      const specs = (await (await fetch(`${base}api/kernelspecs`, auth)).json()) as { kernelspecs: Record<string, unknown> };
      expect(Object.keys(specs.kernelspecs)).toContain('chernel');

      // Ctrl-C (SIGINT to the foreground process group) stops it, server included.
      process.kill(-server.pid!, 'SIGINT');
      const stopped = await Promise.race([exited.then(() => true), new Promise<boolean>(done => setTimeout(() => done(false), 30_000))]);
      expect(stopped, tail(output)).toBe(true);
      // npm may exit a moment before the server it started has shut down.
      await expect.poll(() => fetch(`${base}api/status`, auth).then(() => 'answering', () => 'gone'), { timeout: 15_000 }).toBe('gone');
    } finally {
      log(`$ ${startCommand}\n${output}`);
      if (server.exitCode === null && server.signalCode === null) killGroup(server);
      // The server runs in its own process group; if npm start did not stop it, its API can.
      if (labUrl) {
        await fetch(`${labUrl.origin}/api/shutdown`, { method: 'POST', headers: { Authorization: `token ${labUrl.searchParams.get('token')}` } }).catch(() => undefined);
      }
    }
  }, 5 * 60_000);

  it('runs the test command (one fast layer, chosen with CHERNEL_LAYERS)', () => {
    const test = testCommand.split('&&')[1].trim();
    const { status, output } = runCommand(test, clone, userEnv({ CHERNEL_LAYERS: 'engine-purity' }), 3 * 60_000);
    expect(status, tail(output)).toBe(0);
    expect(output).toMatch(/=== engine-purity passed in \d+ s/);
    // Only that layer ran.
    expect(output.match(/^=== \S+:/gm)).toEqual(['=== engine-purity:']);
  }, 4 * 60_000);
});

function killGroup(child: ChildProcess): void {
  try {
    process.kill(-child.pid!, 'SIGKILL');
  } catch {
    // Already gone.
  }
}
