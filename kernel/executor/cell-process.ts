/**
 * The process that runs cells, one step away from the kernel's own process. A cell can do what
 * V8 treats as fatal (an array past its largest size aborts the whole process, whatever the
 * worker's heap limit), so cells run in a worker thread inside this child process: whatever a cell
 * does, the process that talks to the front end survives and starts a fresh one.
 *
 * This process relays messages between the kernel (IPC) and the worker, owns the interrupt flag
 * the engine's loops read, bounds the cell's memory (the worker's heap through `resourceLimits`,
 * everything else, typed arrays included, through the process's resident size, polled), and caps
 * how much output one cell may send.
 */

import { createWriteStream, mkdirSync, type WriteStream } from 'node:fs';
import { join } from 'node:path';
import { Worker } from 'node:worker_threads';
import type { HostToWorker, WorkerToHost } from './channel.js';
import { cellLimits } from './limits.js';

/** What the cell process tells the kernel besides the worker's own messages. */
export type CellProcessNotice = { type: 'fatal'; reason: string };

const send = (message: WorkerToHost | CellProcessNotice): void => {
  process.send?.(message);
};
if (!process.send) throw new Error('kernel/executor/cell-process.js must be started by the kernel (with an IPC channel)');

const limits = cellLimits(process.env);
const flag = new Int32Array(new SharedArrayBuffer(4));
const worker = new Worker(new URL('./worker.js', import.meta.url), {
  workerData: { interrupt: flag.buffer },
  stdout: false,
  stderr: false,
  resourceLimits: { maxOldGenerationSizeMb: limits.heapMb },
});

let dying = false;
/** Tells the kernel why the cells' state is gone, then exits (the kernel starts a fresh process). */
function die(reason: string): void {
  if (dying) return;
  dying = true;
  send({ type: 'fatal', reason });
  void worker.terminate().finally(() => process.exit(3));
  setTimeout(() => process.exit(3), 1000).unref();
}

worker.on('error', (error: Error & { code?: string }) => {
  if (error.code === 'ERR_WORKER_OUT_OF_MEMORY') die(`out of memory: the cell's JavaScript heap passed ${limits.heapMb} MB (${limits.source})`);
  else die(`the worker running your code failed: ${error.message}`);
});
worker.on('exit', (code) => die(`the worker running your code stopped (exit code ${code})`));

// --- memory: the resident size covers the heap, typed arrays and native buffers alike -----------
const MEMORY_POLL_MS = 50;
setInterval(() => {
  const rss = process.memoryUsage.rss();
  if (rss > limits.totalMb * 2 ** 20) {
    die(`out of memory: the cell's process reached ${Math.round(rss / 2 ** 20)} MB, over its limit of ${limits.totalMb} MB (${limits.source}); typed arrays count toward it`);
  }
}, MEMORY_POLL_MS);

// --- output cap: past it, streams go to a file and displays are dropped, and the cell is told ----
class OutputCap {
  private sent = 0;
  private overflow: WriteStream | null = null;
  private overflowPath = '';
  private dropped = 0;
  private droppedDisplays = 0;

  constructor(private readonly label: string) {}

  /** True if the message may go to the kernel; otherwise it is kept aside here. */
  admit(message: WorkerToHost): boolean {
    if (message.type !== 'stream' && message.type !== 'display') return true;
    const size = message.type === 'stream' ? message.text.length : JSON.stringify(message.output).length;
    if (this.sent + size <= limits.outputBytes) {
      this.sent += size;
      return true;
    }
    if (message.type === 'display') {
      this.droppedDisplays++;
      return false;
    }
    if (!this.overflow) {
      const dir = 'chernel-output';
      mkdirSync(dir, { recursive: true });
      this.overflowPath = join(dir, `${this.label}-${process.pid}.txt`);
      this.overflow = createWriteStream(this.overflowPath);
    }
    this.overflow.write(message.text);
    this.dropped += message.text.length;
    return false;
  }

  /** The note that ends a capped cell's output, or null if nothing was held back. */
  close(): string | null {
    this.overflow?.end();
    if (!this.dropped && !this.droppedDisplays) return null;
    const parts: string[] = [];
    if (this.dropped) parts.push(`${(this.dropped / 1e6).toFixed(1)} MB more text went to ${this.overflowPath} (relative to the kernel's folder)`);
    if (this.droppedDisplays) parts.push(`${this.droppedDisplays} more displays were dropped`);
    return `\n[output capped at ${(limits.outputBytes / 1e6).toFixed(0)} MB per cell (CHERNEL_OUTPUT_MB): ${parts.join('; ')}]\n`;
  }
}
let cap: OutputCap | null = null;

worker.on('message', (message: WorkerToHost) => {
  if (message.type === 'done') {
    Atomics.store(flag, 0, 0);
    const note = cap?.close();
    cap = null;
    if (note) send({ type: 'stream', name: 'stderr', text: note });
  } else if (cap && !cap.admit(message)) {
    return;
  }
  send(message);
});

process.on('message', (message: HostToWorker) => {
  if (message.type === 'execute') {
    Atomics.store(flag, 0, 0);
    cap = new OutputCap(message.filename.replace(/\.ts$/, ''));
  }
  if (message.type === 'interrupt') Atomics.store(flag, 0, 1);
  worker.postMessage(message);
});
// The kernel went away: so do the cells.
process.on('disconnect', () => process.exit(0));
// A client that interrupts by signal may signal the kernel's whole process group: the kernel turns
// SIGINT into an interrupt of the cell; here it must not end the process that holds the state.
process.on('SIGINT', () => undefined);
