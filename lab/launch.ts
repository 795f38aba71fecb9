// Everything needed to run the chernel lab, shared by `npm start` (lab/start.ts) and the browser
// tests (tests/browser/lab-harness.ts): install and build what is missing or stale, register the
// chernel kernelspec in a project-local Jupyter data folder, start and stop the server.
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { createHash, randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { dirname, join, relative, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { ensureNpmDeps } from '../scripts/npm-deps.js';

export const labDir = dirname(fileURLToPath(import.meta.url));
export const projectDir = resolve(labDir, '..');
/** Prefix given to `chernel install --prefix`; its share/jupyter goes on JUPYTER_PATH. */
export const jupyterPrefix = join(projectDir, '.jupyter-local');
export const jupyterDataPath = join(jupyterPrefix, 'share', 'jupyter');
/** Debian's interpreter: it has jupyter_server and jupyterlab_server (the first python3 on PATH may not). */
export const debianPython = '/usr/bin/python3';

const widgetsDir = join(projectDir, 'widgets');
const kernelCli = join(projectDir, 'bin', 'chernel.js');

type Log = (message: string) => void;

function run(command: string, args: string[], cwd: string, log: Log): void {
  log(`${relative(projectDir, cwd) || '.'}$ ${command} ${args.join(' ')}`);
  const result = spawnSync(command, args, { cwd, encoding: 'utf8', maxBuffer: 64 << 20 });
  if (result.status !== 0) {
    const output = `${result.stdout ?? ''}${result.stderr ?? ''}`.trim().split('\n').slice(-40).join('\n');
    throw new Error(`lab: \`${command} ${args.join(' ')}\` in ${cwd} failed (${result.status ?? result.signal ?? result.error?.message}):\n${output}`);
  }
}

/** Files under `dir` (skipping node_modules, build outputs and dot folders), for the input fingerprint. */
function listFiles(dir: string, skip: ReadonlySet<string>): string[] {
  if (!existsSync(dir)) return [];
  if (statSync(dir).isFile()) return [dir];
  return readdirSync(dir, { withFileTypes: true }).flatMap(entry => {
    if (entry.name.startsWith('.') || skip.has(entry.name)) return [];
    const path = join(dir, entry.name);
    return entry.isDirectory() ? listFiles(path, skip) : [path];
  });
}

/** A hash of the paths, sizes and mtimes of the inputs: catches edits, additions and deletions. */
function fingerprint(files: string[]): string {
  const hash = createHash('sha256');
  for (const file of files) {
    const { size, mtimeMs } = statSync(file);
    hash.update(`${file}\0${size}\0${mtimeMs}\n`);
  }
  return hash.digest('hex');
}

function builtAfter(output: string, inputs: string[]): boolean {
  if (!existsSync(output)) return false;
  const built = statSync(output).mtimeMs;
  return inputs.every(file => statSync(file).mtimeMs < built);
}

/** One build: its input files, the file it makes, where it keeps the fingerprint of its inputs. */
interface BuildStep {
  dir: string;
  inputs: () => string[];
  output: string;
  stamp: string;
}

const skipOutputs = new Set(['node_modules', 'build', 'dist', 'lib', 'labextension']);
const inputsUnder = (dir: string, names: string[]) => names.flatMap(name => listFiles(join(dir, name), skipOutputs));

/** The widgets' prebuilt (federated) extension, which bundles the engine into its Web Worker. */
const widgetsBuild: BuildStep = {
  dir: widgetsDir,
  inputs: () => [
    ...inputsUnder(widgetsDir, ['package.json', 'package-lock.json', 'build.mjs', 'tsconfig.json', 'src', 'labextension-core']),
    ...inputsUnder(projectDir, ['src', 'contract', 'figures']),
  ].sort(),
  output: join(widgetsDir, 'labextension', 'package.json'),
  stamp: join(widgetsDir, 'dist', '.inputs-stamp'),
};

/** The lab page's bundle. */
const labBuild: BuildStep = {
  dir: labDir,
  inputs: () => inputsUnder(labDir, ['package.json', 'package-lock.json', 'webpack.config.cjs', 'src']).sort(),
  output: join(labDir, 'build', 'bundle.js'),
  stamp: join(labDir, 'build', '.inputs-stamp'),
};

/** Runs `npm run build` in the step's folder when any input changed since its last build. */
function ensureStepBuilt(step: BuildStep, log: Log): void {
  const files = step.inputs();
  // Without a stamp (e.g. after `npm run setup`), up to date when the output is newer than every input.
  if (existsSync(step.stamp) ? readFileSync(step.stamp, 'utf8') === fingerprint(files) : builtAfter(step.output, files)) {
    if (!existsSync(step.stamp)) writeFileSync(step.stamp, fingerprint(files));
    return;
  }
  // Neither the stamp nor the output survives a build that is interrupted, so the next run builds again.
  rmSync(step.stamp, { force: true });
  rmSync(step.output, { force: true });
  run('npm', ['run', 'build', '--silent'], step.dir, log);
  // Taken after the build, so that its own outputs count as seen.
  writeFileSync(step.stamp, fingerprint(step.inputs()));
}

/**
 * Installs the npm dependencies of widgets/ and lab/ where they are missing or incomplete
 * (scripts/npm-deps.js), then rebuilds the widgets' prebuilt extension and the lab's bundle when
 * any of their inputs changed since their last build.
 */
export function ensureLabBuilt(log: Log = console.log): void {
  ensureNpmDeps([widgetsDir, labDir], log);
  ensureStepBuilt(widgetsBuild, log);
  ensureStepBuilt(labBuild, log);
}

export interface KernelRegistration {
  registered: boolean;
  /** Why not, when not. */
  reason?: string;
}

/** The newest modification time of any file under the folders (0 when there are none). */
function newestMtime(dirs: string[]): number {
  const skip = new Set(['node_modules']);
  return Math.max(0, ...dirs.flatMap(dir => listFiles(dir, skip)).map(file => statSync(file).mtimeMs));
}

/**
 * Writes the chernel kernelspec under .jupyter-local/share/jupyter/kernels/chernel through the
 * kernel's own `chernel install --prefix`, compiling the kernel first (`npm run build` at the
 * root) when dist/ is missing or older than the parts it is built from. Does not throw: a missing or
 * broken kernel leaves the lab usable with the other kernels, so it is reported and skipped.
 */
export function registerChernelKernel(log: Log = console.log): KernelRegistration {
  const skip = (reason: string): KernelRegistration => {
    log(`lab: warning: ${reason}; starting without the chernel kernel`);
    return { registered: false, reason };
  };
  if (!existsSync(kernelCli)) return skip(`${relative(projectDir, kernelCli)} not found`);
  const compiled = join(projectDir, 'dist', 'cli', 'main.js');
  if (!existsSync(compiled) || newestMtime(['src', 'contract', 'figures', 'kernel', 'cluster', 'cli'].map(part => join(projectDir, part))) > statSync(compiled).mtimeMs) {
    try {
      run('npm', ['run', 'build', '--silent'], projectDir, log);
    } catch (error) {
      // tsc still writes JavaScript for code with type errors; go on if the kernel is there.
      if (!existsSync(compiled)) return skip(`the kernel did not compile: ${(error as Error).message}`);
      log(`lab: warning: the project build reported errors; using the kernel it wrote anyway:\n${(error as Error).message}`);
    }
  }
  try {
    run(process.execPath, [kernelCli, 'install', '--prefix', jupyterPrefix], projectDir, log);
  } catch (error) {
    return skip((error as Error).message);
  }
  if (!existsSync(join(jupyterDataPath, 'kernels', 'chernel', 'kernel.json'))) {
    return skip(`\`chernel install --prefix ${jupyterPrefix}\` wrote no kernels/chernel/kernel.json`);
  }
  return { registered: true };
}

/**
 * A TCP port free on 127.0.0.1 right now: `preferred` or the next free one above it (as Jupyter's
 * own servers do), or one the OS picks when `preferred` is 0 or the 50 ports from it are taken.
 */
export async function freePort(preferred = 0): Promise<number> {
  const tryPort = (port: number) =>
    new Promise<number | null>(done => {
      const server = createServer();
      server.once('error', () => done(null));
      server.listen(port, '127.0.0.1', () => {
        const address = server.address();
        const chosen = typeof address === 'object' && address ? address.port : null;
        server.close(() => done(chosen));
      });
    });
  for (let port = preferred; preferred > 0 && port < Math.min(preferred + 50, 65536); port++) {
    const free = await tryPort(port);
    if (free !== null) return free;
  }
  return (await tryPort(0)) ?? Promise.reject(new Error('lab: no free port on 127.0.0.1'));
}

export interface LabServerOptions {
  /** The folder the lab shows and saves notebooks in. */
  rootDir: string;
  /** 0 (default) lets the OS choose. */
  port?: number;
  /** Extra kernelspec folders ahead of the project's .jupyter-local (each holds kernels/NAME/kernel.json). */
  jupyterPath?: string[];
  /** Server output goes here as it arrives (default: kept only in `output()`). */
  onOutput?: (text: string) => void;
  /** Notebooks to sign as trusted for this server (its trust database starts empty each time). */
  trust?: string[];
}

export interface LabServer {
  readonly port: number;
  readonly token: string;
  /** The base URL, ending in '/'. */
  readonly baseUrl: string;
  /** The lab page, token included. */
  readonly labUrl: string;
  readonly process: ChildProcess;
  /** Everything the server (and its kernels) printed so far. */
  output(): string;
  /** Shuts down kernels and the server; safe to call twice. */
  stop(): Promise<void>;
}

/**
 * Starts lab/server.py on 127.0.0.1 with a random token and a private Jupyter runtime, data and
 * config folder (so nothing in ~/.jupyter or ~/.local/share/jupyter changes what it sees), and
 * waits until it answers.
 */
export async function startLabServer(options: LabServerOptions): Promise<LabServer> {
  const port = await freePort(options.port ?? 0);
  const token = randomBytes(24).toString('hex');
  const home = mkdtempSync(join(tmpdir(), 'chernel-lab-home-'));
  const env = {
    ...process.env,
    JUPYTER_PATH: [...(options.jupyterPath ?? []), jupyterDataPath].join(':'),
    JUPYTER_DATA_DIR: join(home, 'data'),
    JUPYTER_RUNTIME_DIR: join(home, 'runtime'),
    JUPYTER_CONFIG_DIR: join(home, 'config'),
    IPYTHONDIR: join(home, 'ipython'),
    PYDEVD_DISABLE_FILE_VALIDATION: '1',
  };
  mkdirSync(options.rootDir, { recursive: true });
  if (options.trust?.length) {
    // nbformat's own signing, with the key and database of this server's data folder.
    const signer = 'from nbformat.sign import TrustNotebookApp; TrustNotebookApp.launch_instance()';
    const signed = spawnSync(debianPython, ['-c', signer, '--log-level=WARN', ...options.trust], { env, encoding: 'utf8' });
    if (signed.status !== 0) throw new Error(`lab: could not sign ${options.trust.join(', ')} as trusted:\n${signed.stderr}`);
  }
  const args = [
    join(labDir, 'server.py'),
    '--ServerApp.ip=127.0.0.1',
    `--ServerApp.port=${port}`,
    '--ServerApp.port_retries=0',
    `--ServerApp.token=${token}`,
    '--ServerApp.open_browser=False',
    '--ServerApp.allow_root=True',
    `--ServerApp.root_dir=${resolve(options.rootDir)}`,
  ];
  // The default kernel comes first in the launcher and is what a new notebook starts with.
  if (existsSync(join(jupyterDataPath, 'kernels', 'chernel', 'kernel.json'))) args.push('--MappingKernelManager.default_kernel_name=chernel');
  // Its own process group, so that stop() can also end kernels the server failed to end.
  const child = spawn(debianPython, args, { env, cwd: projectDir, stdio: ['ignore', 'pipe', 'pipe'], detached: true });
  let output = '';
  const collect = (chunk: Buffer) => {
    const text = chunk.toString();
    output += text;
    options.onOutput?.(text);
  };
  child.stdout.on('data', collect);
  child.stderr.on('data', collect);
  const exited = new Promise<void>(done => child.once('exit', () => done()));

  const baseUrl = `http://127.0.0.1:${port}/`;
  let stopped = false;
  const stop = async () => {
    if (stopped) return;
    stopped = true;
    if (child.exitCode === null && child.signalCode === null) {
      // The shutdown API ends the kernels first; SIGKILL of the group is the fallback.
      await fetch(`${baseUrl}api/shutdown`, { method: 'POST', headers: { Authorization: `token ${token}` } }).catch(() => undefined);
      const timer = setTimeout(() => killGroup(child), 10_000);
      await exited;
      clearTimeout(timer);
    }
    killGroup(child);
    rmSync(home, { recursive: true, force: true });
  };

  const deadline = Date.now() + 60_000;
  for (;;) {
    if (child.exitCode !== null || child.signalCode !== null) {
      await stop();
      throw new Error(`lab: server exited (${child.exitCode ?? child.signalCode}) before answering:\n${output}`);
    }
    const status = await fetch(`${baseUrl}api/status`, { headers: { Authorization: `token ${token}` } }).catch(() => null);
    if (status?.ok) break;
    if (Date.now() > deadline) {
      await stop();
      throw new Error(`lab: server did not answer on ${baseUrl} within 60 s:\n${output}`);
    }
    await new Promise(done => setTimeout(done, 200));
  }
  return { port, token, baseUrl, labUrl: `${baseUrl}lab?token=${token}`, process: child, output: () => output, stop };
}

function killGroup(child: ChildProcess): void {
  if (child.pid === undefined) return;
  try {
    process.kill(-child.pid, 'SIGKILL');
  } catch {
    // Already gone.
  }
}
