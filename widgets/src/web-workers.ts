/**
 * Browser host for sweeps: an executor on Web Workers. A host adapter of the page, outside the
 * pure engine: it uses the DOM's Worker.
 *
 * The page makes the workers (bundlers each have their own way to name a worker script), e.g.
 *
 *   const executor = new WebWorkerExecutor({
 *     create: () => new Worker(new URL('./sweep-worker.js', import.meta.url), { type: 'module' }),
 *   });
 *
 * and the worker script is one line: `serveWebSweepWorker(self)` (imported from this module).
 * Stopping uses a shared interrupt flag when the page is cross-origin isolated, and otherwise
 * terminates the workers and starts new ones.
 */
import type { PointFunctionFactory } from '../../src/scan/executor.js';
import { WorkerPoolExecutor, serveSweepWorker, type FromSweepWorker, type ToSweepWorker, type WorkerPort } from '../../src/scan/pool.js';

// The parts of the DOM's Worker used here, typed structurally so this file needs no DOM library.
interface BrowserWorker {
  postMessage(message: unknown): void;
  terminate(): void;
  onmessage: ((event: { data: unknown }) => void) | null;
  onerror: ((event: { message?: string; preventDefault(): void }) => void) | null;
}
interface WorkerScope {
  postMessage(message: unknown): void;
  onmessage: ((event: { data: unknown }) => void) | null;
}

export interface WebWorkerOptions {
  /** Starts one worker running `serveWebSweepWorker`. */
  create: () => BrowserWorker;
  /** Number of workers (default: navigator.hardwareConcurrency). */
  workers?: number;
  /** URL of an ES module exporting `pointFunction(target)`, instead of the engine's diagnostics. */
  pointModule?: string;
}

function webPort(worker: BrowserWorker): WorkerPort {
  let onMessage: (m: FromSweepWorker) => void = () => {};
  let onCrash: (e: Error) => void = () => {};
  worker.onmessage = (event) => onMessage(event.data as FromSweepWorker);
  worker.onerror = (event) => {
    event.preventDefault();
    onCrash(new Error(event.message || 'worker error'));
  };
  return {
    post: (m: ToSweepWorker) => worker.postMessage(m),
    listen: (message, crash) => {
      onMessage = message;
      onCrash = crash;
    },
    terminate: async () => worker.terminate(),
  };
}

/** Computes sweep points on Web Workers. */
export class WebWorkerExecutor extends WorkerPoolExecutor {
  constructor(options: WebWorkerOptions) {
    super({
      workers: options.workers ?? Math.max(1, (globalThis as { navigator?: { hardwareConcurrency?: number } }).navigator?.hardwareConcurrency ?? 2),
      start: () => webPort(options.create()),
      pointModule: options.pointModule,
    });
  }
}

/** Inside a worker: answer the executor's messages (chunks are handled one at a time, in order). */
export function serveWebSweepWorker(scope: WorkerScope): void {
  const handle = serveSweepWorker(
    (m) => scope.postMessage(m),
    async (): Promise<PointFunctionFactory> => (await import('../../src/scan/point.js')).pointFunction,
    (url) => import(/* webpackIgnore: true */ /* @vite-ignore */ url) as Promise<{ pointFunction?: PointFunctionFactory }>,
  );
  let queue: Promise<void> = Promise.resolve();
  scope.onmessage = (event) => {
    const message = event.data as ToSweepWorker;
    queue = queue.then(() => handle(message));
  };
}
