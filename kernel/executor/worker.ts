/**
 * The worker thread that runs user code. Its global object is the notebook's scope: the engine's
 * exports, the kernel helpers (scope.ts) and everything cells declare live there. The main thread
 * stays free for heartbeats, control and interrupts.
 */

import { Console } from 'node:console';
import { Writable } from 'node:stream';
import { fileURLToPath } from 'node:url';
import vm from 'node:vm';
import { parentPort, workerData } from 'node:worker_threads';
import { setComputeBudget } from '../../src/cost.js';
import { InterruptedError, installInterruptFlag } from '../../src/interrupt.js';
import { connectComms, handleFrontendComm } from '../comms.js';
import { displayOutputs, plainText } from '../display/index.js';
import type { Description, HostToWorker, SerializedError, WorkerToHost } from './channel.js';
import { cellLimits } from './limits.js';
import { importFromCwd } from './resolve.js';
import { cellCompute, type Engine } from './cell-compute.js';
import { createScope, DisplayHandle } from './scope.js';
import { CellRegistry } from './traceback.js';
import { RUNTIME } from './transpile.js';

const port = parentPort;
if (!port) throw new Error('kernel/executor/worker.js must run as a worker thread');
const post = (message: WorkerToHost): void => port.postMessage(message);

installInterruptFlag(new Int32Array(workerData.interrupt as SharedArrayBuffer));
connectComms(post);

// --- output capture: console and process streams go to the notebook -----------------------------
function streamTo(name: 'stdout' | 'stderr'): Writable {
  return new Writable({
    decodeStrings: false,
    write(chunk: string | Buffer, _encoding, callback) {
      post({ type: 'stream', name, text: typeof chunk === 'string' ? chunk : chunk.toString('utf8') });
      callback();
    },
  });
}
const stdout = streamTo('stdout');
const stderr = streamTo('stderr');
globalThis.console = new Console({ stdout, stderr });
for (const [stream, target] of [[process.stdout, stdout], [process.stderr, stderr]] as const) {
  Object.defineProperty(stream, 'write', { value: target.write.bind(target), configurable: true, writable: true });
}
/** Background errors print their stack with this machine's paths shortened (traceback.ts). */
const paths = new CellRegistry(fileURLToPath(new URL('..', import.meta.url)));
const reportBackground = (what: string) => (error: unknown) => {
  const text = error instanceof Error ? (error.stack ?? String(error)) : plainText(error);
  post({ type: 'stream', name: 'stderr', text: `${what}: ${paths.scrub(text)}\n` });
};
process.on('uncaughtException', reportBackground('Uncaught error in background code'));
process.on('unhandledRejection', reportBackground('Unhandled promise rejection'));

// --- the scope ------------------------------------------------------------------------------------
function define(name: string, value: unknown, enumerable: boolean): void {
  Object.defineProperty(globalThis, name, { value, writable: true, configurable: true, enumerable });
}

let nextInputId = 1;
const pendingInputs = new Map<number, { resolve: (v: string) => void; reject: (e: Error) => void }>();
const helpers = createScope({
  post,
  requestInput(prompt, password) {
    const id = nextInputId++;
    post({ type: 'input_request', id, prompt, password });
    return new Promise((resolve, reject) => pendingInputs.set(id, { resolve, reject }));
  },
});

/** The runtime that rewritten cells call (see transpile.ts). */
const runtime = {
  declare(names: string[]): void {
    for (const name of names) if (!Object.prototype.hasOwnProperty.call(globalThis, name)) define(name, undefined, true);
  },
  hoist(functions: Record<string, unknown>): void {
    for (const [name, fn] of Object.entries(functions)) define(name, fn, true);
  },
  import: importFromCwd,
};
define(RUNTIME, runtime, false);

/**
 * Modules whose exports are in cell scope, all of them, so new exports appear without changes
 * here: the engine's public API, then kernel-side modules for cells (the widgets).
 */
const SCOPE_MODULES = ['../../src/index.js', '../widgets.js'];

async function load(relative: string): Promise<Record<string, unknown>> {
  return (await import(new URL(relative, import.meta.url).href)) as Record<string, unknown>;
}

let engine: Record<string, unknown> = {};
const loadErrors: string[] = [];
for (const [i, relative] of SCOPE_MODULES.entries()) {
  let exports: Record<string, unknown> = {};
  try {
    exports = await load(relative);
  } catch (error) {
    loadErrors.push(`${relative} failed to load: ${(error as Error).stack ?? String(error)}`);
  }
  if (i === 0) engine = exports;
  for (const [name, value] of Object.entries(exports)) if (name !== 'default') define(name, value, false);
}
const engineError = loadErrors.length ? loadErrors.join('\n') : null;
for (const [name, value] of Object.entries(helpers)) define(name, value, false);
/** The engine functions a cell sees in the kernel's own version (documented as the engine's). */
const wrapped = new Map<string, unknown>();
if (typeof engine.compute === 'function') {
  for (const [name, value] of Object.entries(cellCompute(engine as unknown as Engine, post))) {
    define(name, value, false);
    wrapped.set(name, value);
  }
}

// --- execution ------------------------------------------------------------------------------------
let interruptCurrent: ((error: Error) => void) | null = null;

const memoryLimit = cellLimits(process.env);
// Requests are refused before they run when their estimate exceeds what the cell may allocate
// (src/cost.ts): the limit less what the engine and the notebook's own values already hold.
setComputeBudget({ memoryBytes: Math.max(128, (memoryLimit.totalMb - 384) * 0.8) * 2 ** 20 });

function serializeError(error: unknown): SerializedError {
  if (error instanceof RangeError && /allocation failed/.test(error.message)) {
    // The address-space bound of the cell process (host.ts): say which limit, and that state is kept.
    const message = `${error.message}: the cell's memory limit is ${memoryLimit.totalMb} MB (${memoryLimit.source}); the kernel kept all variables`;
    return { name: error.name, message, stack: (error.stack ?? '').replace(error.message, message) };
  }
  if (error instanceof Error) return { name: error.name, message: error.message, stack: error.stack ?? '' };
  return { name: 'Thrown value', message: plainText(error), stack: '' };
}

async function execute(message: Extract<HostToWorker, { type: 'execute' }>): Promise<void> {
  let outcome: WorkerToHost;
  try {
    const running = vm.runInThisContext(message.code, { filename: message.filename }) as Promise<unknown>;
    const interrupted = new Promise<never>((_, reject) => (interruptCurrent = reject));
    const value = await Promise.race([running, interrupted]);
    const show = message.hasValue && value !== undefined && !(value instanceof DisplayHandle) && !message.silent;
    // An engine result with a figure shows as two outputs: its summary first, the figure as the result.
    const outputs = show ? displayOutputs(value) : [];
    for (const output of outputs.slice(0, -1)) post({ type: 'display', output, displayId: null, update: false });
    outcome = { type: 'done', id: message.id, result: outputs.at(-1) ?? null, error: null };
  } catch (error) {
    outcome = { type: 'done', id: message.id, result: null, error: serializeError(error) };
  } finally {
    interruptCurrent = null;
  }
  post(outcome);
}

// --- completion and inspection -------------------------------------------------------------------
function resolvePath(path: string[]): { found: boolean; value: unknown } {
  let value: unknown = globalThis;
  for (const part of path) {
    if (value === null || value === undefined) return { found: false, value: undefined };
    const holder = Object(value) as Record<string, unknown>;
    if (!(part in holder)) return { found: false, value: undefined };
    value = holder[part];
  }
  return { found: true, value };
}

function memberNames(value: unknown): string[] {
  const names = new Set<string>();
  for (let o: object | null = Object(value) as object; o && o !== Object.prototype; o = Object.getPrototypeOf(o)) {
    for (const name of Object.getOwnPropertyNames(o)) if (name !== 'constructor' && !name.startsWith('__')) names.add(name);
  }
  return [...names];
}

function describe(path: string[]): Description {
  const { found, value } = resolvePath(path);
  if (!found) return { found: false, engineExport: false, summary: '' };
  const engineExport = path.length === 1 && Object.prototype.hasOwnProperty.call(engine, path[0]) && (engine[path[0]] === value || wrapped.get(path[0]) === value);
  let summary: string;
  if (typeof value === 'function') {
    const source = Function.prototype.toString.call(value);
    const head = source.startsWith('class') ? source.slice(0, source.indexOf('{')).trim() : source.slice(0, Math.max(source.indexOf('{'), 0) || 200).trim();
    summary = `${head || path.join('.')}\n\n${source.length > 2000 ? source.slice(0, 2000) + '\n...' : source}`;
  } else {
    const type = value === null ? 'null' : typeof value === 'object' ? (value.constructor?.name ?? 'object') : typeof value;
    summary = `type: ${type}\nvalue: ${plainText(value).slice(0, 3000)}`;
  }
  return { found: true, engineExport, summary };
}

port.on('message', (message: HostToWorker) => {
  switch (message.type) {
    case 'execute':
      void execute(message);
      break;
    case 'interrupt':
      interruptCurrent?.(new InterruptedError());
      break;
    case 'names': {
      const names = message.path.length === 0
        ? Object.getOwnPropertyNames(globalThis).filter((n) => n !== RUNTIME)
        : memberNames(resolvePath(message.path).value);
      post({ type: 'answer', id: message.id, names });
      break;
    }
    case 'describe':
      post({ type: 'answer', id: message.id, description: describe(message.path) });
      break;
    case 'input_reply': {
      const pending = pendingInputs.get(message.id);
      pendingInputs.delete(message.id);
      if (message.error !== undefined) pending?.reject(new Error(message.error));
      else pending?.resolve(message.value ?? '');
      break;
    }
    default:
      try {
        handleFrontendComm(message);
      } catch (error) {
        post({ type: 'stream', name: 'stderr', text: `${(error as Error).message}\n` });
      }
      // Acknowledged once its handlers ran, so their output comes before the request's idle status.
      post({ type: 'answer', id: message.id });
  }
});

post({ type: 'ready', engineNames: Object.keys(engine).filter((n) => n !== 'default'), engineError });
