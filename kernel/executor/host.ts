/**
 * The kernel-side of the executor: compiles cells, runs them in a child process (cell-process.ts,
 * whose worker thread holds the notebook's state), relays what they print and display, and handles
 * interrupts and deaths:
 *
 *   - an interrupt sets the cell process's shared flag (engine loops stop at their next
 *     `checkInterrupt()`) and rejects an awaiting cell; the worker and its state stay;
 *   - a cell that still runs GRACE_MS later ignores interrupts (a plain `while (true) {}`): the
 *     cell process is killed and a fresh one started, and the cell's error says that state was reset;
 *   - a cell process that dies (out of memory, a fatal V8 error) is replaced the same way, and the
 *     error names the cause. The kernel's own process never runs user code, so it never dies of it.
 */

import { spawn, type ChildProcess } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { engineDocs } from '../docs/index.js';
import { log } from '../log.js';
import type { CellExecutor, CommEvent, ExecuteOutcome, ExecutorEvents } from '../protocol/executor.js';
import { cellLimits } from './limits.js';
import type { CellProcessNotice } from './cell-process.js';
import type { HostToWorker, WorkerToHost } from './channel.js';
import { CellRegistry } from './traceback.js';
import { CellSyntaxError, compileCell } from './transpile.js';

/** How long a cell may ignore an interrupt before its worker is replaced. */
export const GRACE_MS = 2000;
/**
 * Address space a cell process reserves beyond what its cell allocates: the code, the engine, V8's
 * heap reservations (about 1.1 GB on Linux x64 with Node 20) and above all WebAssembly memories,
 * for which V8 reserves 10 GB each (guard regions; the engine's linear algebra holds one, two
 * while it replaces it). Reserved, not used: the resident size is what the poll bounds.
 */
const ADDRESS_SPACE_OVERHEAD_MB = 24 * 1024;
/** Printed text is gathered this long before it is published. */
const STREAM_FLUSH_MS = 20;
const QUERY_TIMEOUT_MS = 1500;

interface Running {
  id: number;
  resolve: (outcome: ExecuteOutcome) => void;
}

const KERNEL_DIR = fileURLToPath(new URL('..', import.meta.url));

export class ExecutionHost implements CellExecutor {
  private worker!: ChildProcess;
  private ready!: Promise<void>;
  /** Why the current cell process is dying, when it said so before exiting. */
  private fatalReason: string | null = null;
  /** Why the cells' state was lost while no cell ran, until the next cell is told. */
  private lostBetweenCells: string | null = null;
  private readonly cells = new CellRegistry(KERNEL_DIR);
  private running: Running | null = null;
  private killTimer: NodeJS.Timeout | null = null;
  private nextId = 1;
  private serial = 0;
  private readonly answers = new Map<number, (message: Extract<WorkerToHost, { type: 'answer' }>) => void>();
  private readonly openComms = new Map<string, string>();
  private streamBuffer: { name: 'stdout' | 'stderr'; text: string } | null = null;
  private streamTimer: NodeJS.Timeout | null = null;
  private stopping = false;
  /** Names the engine exports (for completion); filled when the worker is ready. */
  engineNames: string[] = [];

  constructor(private readonly events: ExecutorEvents) {
    const warnings: string[] = [];
    cellLimits(process.env, warnings);
    for (const warning of warnings) log(warning);
    this.spawn();
  }

  private spawn(): void {
    const worker = startCellProcess();
    this.worker = worker;
    this.fatalReason = null;
    // The tail of the cell process's stderr: V8 writes its fatal errors there before aborting.
    let stderrTail = '';
    worker.stderr?.setEncoding('utf8').on('data', (text: string) => (stderrTail = (stderrTail + text).slice(-8192)));
    this.ready = new Promise((resolve) => {
      const onReady = (message: WorkerToHost): void => {
        if (message.type !== 'ready') return;
        worker.off('message', onReady);
        this.engineNames = message.engineNames;
        if (message.engineError) log(message.engineError);
        resolve();
      };
      worker.on('message', onReady);
    });
    worker.on('message', (message: WorkerToHost | CellProcessNotice) => {
      if (worker !== this.worker) return;
      if (message.type === 'fatal') this.fatalReason = message.reason;
      else this.receive(message);
    });
    worker.on('error', (error) => log(`cell process error: ${error.stack ?? error.message}`));
    worker.on('exit', (code, signal) => {
      if (worker !== this.worker || this.stopping) return;
      if (stderrTail) log(`cell process stderr (end): ${stderrTail.slice(-1000)}`);
      this.replaceWorker(this.fatalReason ?? deathCause(code, signal, stderrTail));
    });
  }

  /** Ends the current worker and starts a fresh one; a running cell fails with `reason`. */
  private replaceWorker(reason: string): void {
    const old = this.worker;
    this.clearKillTimer();
    this.flushStream();
    for (const [commId] of this.openComms) this.events.comm({ type: 'comm_close', commId, data: {}, metadata: {}, buffers: [] });
    this.openComms.clear();
    for (const [, answer] of this.answers) answer({ type: 'answer', id: -1 });
    this.answers.clear();
    this.cells.clear();
    this.spawn();
    old.kill('SIGKILL');
    const running = this.running;
    this.running = null;
    // Between cells (background code ran out of memory): the next cell is told before it runs.
    if (!running) this.lostBetweenCells = reason;
    running?.resolve({
      status: 'error',
      ename: 'StateReset',
      evalue: `${reason}; it was restarted and all state was reset`,
      traceback: [
        `\x1b[31mStateReset\x1b[0m: ${reason}.`,
        'The kernel restarted the worker that runs cells: all variables, functions and imports',
        'from earlier cells are gone. Re-run the cells you need.',
      ],
    });
  }

  private receive(message: WorkerToHost): void {
    if (message.type !== 'stream') this.flushStream();
    switch (message.type) {
      case 'ready':
        break;
      case 'stream':
        this.bufferStream(message.name, message.text);
        break;
      case 'display':
        this.events.display(message.output, message.displayId, message.update);
        break;
      case 'clear_output':
        this.events.clearOutput(message.wait);
        break;
      case 'done':
        this.finish(message);
        break;
      case 'answer': {
        const answer = this.answers.get(message.id);
        this.answers.delete(message.id);
        answer?.(message);
        break;
      }
      case 'input_request':
        this.events.input(message.prompt, message.password).then(
          (value) => this.post({ type: 'input_reply', id: message.id, value }),
          (error: Error) => this.post({ type: 'input_reply', id: message.id, value: null, error: error.message }),
        );
        break;
      default:
        if (message.type === 'comm_open') this.openComms.set(message.commId, message.targetName);
        if (message.type === 'comm_close') this.openComms.delete(message.commId);
        this.events.comm(message);
    }
  }

  private bufferStream(name: 'stdout' | 'stderr', text: string): void {
    if (this.streamBuffer && this.streamBuffer.name !== name) this.flushStream();
    if (this.streamBuffer) this.streamBuffer.text += text;
    else this.streamBuffer = { name, text };
    this.streamTimer ??= setTimeout(() => this.flushStream(), STREAM_FLUSH_MS);
  }

  private flushStream(): void {
    if (this.streamTimer) clearTimeout(this.streamTimer);
    this.streamTimer = null;
    const buffered = this.streamBuffer;
    this.streamBuffer = null;
    if (buffered) this.events.stream(buffered.name, buffered.text);
  }

  private finish(message: Extract<WorkerToHost, { type: 'done' }>): void {
    if (!this.running || this.running.id !== message.id) return;
    const { resolve } = this.running;
    this.running = null;
    this.clearKillTimer();
    if (!message.error) {
      resolve({ status: 'ok', result: message.result });
      return;
    }
    const note = message.error.name === 'InterruptedError' ? '(interrupted; the kernel kept all variables)' : undefined;
    resolve({ status: 'error', ...this.cells.format(message.error, note) });
  }

  private clearKillTimer(): void {
    if (this.killTimer) clearTimeout(this.killTimer);
    this.killTimer = null;
  }

  private post(message: HostToWorker): void {
    if (this.worker.connected) this.worker.send(message);
  }

  /** Runs one cell. `label` names it in tracebacks (e.g. `In [3]`). */
  async execute(source: string, options: { silent: boolean; label: string }): Promise<ExecuteOutcome> {
    if (this.running) throw new Error('execute: a cell is already running');
    if (this.lostBetweenCells !== null) {
      this.events.stream('stderr', `StateReset: between cells, ${this.lostBetweenCells}; the kernel restarted the worker that runs cells, and all variables from earlier cells are gone.\n`);
      this.lostBetweenCells = null;
    }
    const filename = `cell-${++this.serial}.ts`;
    let compiled;
    try {
      compiled = await compileCell(source, filename);
    } catch (error) {
      if (!(error instanceof CellSyntaxError)) throw error;
      return { status: 'error', ...this.cells.syntaxError(options.label, source, error.message, error.line, error.column) };
    }
    await this.ready;
    this.cells.add(filename, options.label, source, compiled.map);
    const id = this.nextId++;
    return new Promise<ExecuteOutcome>((resolve) => {
      this.running = { id, resolve };
      this.post({ type: 'execute', id, code: compiled.code, filename, hasValue: compiled.hasValue, silent: options.silent });
    });
  }

  /** True if a cell was running and has been asked to stop. */
  interrupt(): boolean {
    if (!this.running) return false;
    this.post({ type: 'interrupt' });
    this.killTimer ??= setTimeout(() => this.replaceWorker(`the cell did not stop within ${GRACE_MS / 1000} s of the interrupt`), GRACE_MS);
    return true;
  }

  private async ask(message: Extract<HostToWorker, { id: number }>): Promise<Extract<WorkerToHost, { type: 'answer' }> | null> {
    await Promise.race([this.ready, new Promise((r) => setTimeout(r, QUERY_TIMEOUT_MS))]);
    return new Promise((resolve) => {
      const timer = setTimeout(() => {
        this.answers.delete(message.id);
        resolve(null);
      }, QUERY_TIMEOUT_MS);
      this.answers.set(message.id, (answer) => {
        clearTimeout(timer);
        resolve(answer.id === message.id ? answer : null);
      });
      this.post(message);
    });
  }

  /** Names in scope (empty path) or members of a dotted path; null if the worker is busy. */
  async names(path: string[]): Promise<string[] | null> {
    const answer = await this.ask({ type: 'names', id: this.nextId++, path });
    return answer?.names ?? null;
  }

  /** An engine export shows its documentation (from the engine's type declarations), a user's value its summary. */
  async inspect(path: string[]): Promise<string | null> {
    const answer = await this.ask({ type: 'describe', id: this.nextId++, path });
    const description = answer?.description;
    if (!description?.found) return null;
    if (description.engineExport) return (await engineDocs())[path[0]] || description.summary;
    return description.summary;
  }

  /** A comm message from the front end, for the worker's comm registry; resolves once handled. */
  async comm(event: CommEvent): Promise<void> {
    if (event.type === 'comm_open') this.openComms.set(event.commId, event.targetName);
    if (event.type === 'comm_close') this.openComms.delete(event.commId);
    await this.ask({ ...event, id: this.nextId++ });
  }

  /** Open comms by id, with their target names (for comm_info). */
  comms(): ReadonlyMap<string, string> {
    return this.openComms;
  }

  async shutdown(): Promise<void> {
    this.stopping = true;
    this.clearKillTimer();
    this.flushStream();
    const worker = this.worker;
    if (worker.exitCode !== null || worker.signalCode !== null) return;
    const exited = new Promise((resolve) => worker.once('exit', resolve));
    worker.kill('SIGKILL');
    await exited;
  }
}

/**
 * Starts the cell process with its address space bounded (`ulimit -v`), on systems with a POSIX
 * shell: typed arrays live outside the JavaScript heap, and zero-filled ones take no resident
 * memory until written, so only the address space bounds them at the moment they are allocated (a
 * cell then gets a RangeError it can catch, and keeps its state). The resident size is also polled
 * (cell-process.ts), which is what bounds memory where `ulimit -v` is not enforced.
 */
function startCellProcess(): ChildProcess {
  const script = fileURLToPath(new URL('./cell-process.js', import.meta.url));
  const options = { serialization: 'advanced' as const, stdio: ['ignore', 'ignore', 'pipe', 'ipc'] as ('ignore' | 'pipe' | 'ipc')[] };
  const args = [...process.execArgv, script];
  if (process.platform === 'win32') return spawn(process.execPath, args, options);
  const limitKb = (cellLimits(process.env).totalMb + ADDRESS_SPACE_OVERHEAD_MB) * 1024;
  return spawn('/bin/sh', ['-c', `ulimit -v ${limitKb} && exec "$0" "$@"`, process.execPath, ...args], options);
}

/** The cause of a cell process's death that it could not report itself (V8 aborts at once). */
export function deathCause(code: number | null, signal: NodeJS.Signals | null, stderr: string): string {
  const fatal = /^#?\s*(Fatal JavaScript [^\n(]*|FATAL ERROR: [^\n]*)/m.exec(stderr);
  if (fatal) {
    const what = fatal[1].trim();
    if (/invalid size/.test(what)) return `out of memory: the cell made an array or string larger than JavaScript allows (${what.replace(/\s+\d+$/, '')})`;
    const memory = /heap|memory|allocation/i.test(what);
    return `${memory ? 'out of memory' : 'fatal error'}: the JavaScript engine stopped the cell's process (${what.replace(/\s+\d+$/, '')})`;
  }
  if (signal === 'SIGKILL') return 'the cell\'s process was killed (SIGKILL; the system may have run out of memory)';
  return `the cell's process stopped (${signal ? `signal ${signal}` : `exit code ${code}`})`;
}
