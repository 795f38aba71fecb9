/**
 * Node host for sweeps: an executor on worker threads (all cores by default) and checkpoint files.
 * This file is also the worker's entry point. A host adapter beside its users (the sweep command,
 * the bench), outside the pure engine: it imports node:*.
 */
import { closeSync, existsSync, fsyncSync, openSync, readFileSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { open, readFile, rename } from 'node:fs/promises';
import { availableParallelism, hostname } from 'node:os';
import { dirname } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { Worker, isMainThread, parentPort, workerData } from 'node:worker_threads';
import type { PointFunctionFactory } from '../src/scan/executor.js';
import { WorkerPoolExecutor, serveSweepWorker, type FromSweepWorker, type ToSweepWorker, type WorkerPort } from '../src/scan/pool.js';
import { runPhaseMap, type RunPhaseMapOptions, type SweepCheckpoint } from '../src/scan/run.js';
import type { PhaseMapRequest, PhaseMapResult } from '../src/scan/sweep.js';

const ROLE = 'chernel-sweep-worker';

export interface NodeWorkerOptions {
  /** Number of threads (default: every core). */
  workers?: number;
  /** An ES module (path or URL) exporting `pointFunction(target)`, instead of the engine's diagnostics. */
  pointModule?: string | URL;
}

/** Run TypeScript sources in a worker the way the parent runs them (see scripts/register-ts.js). */
function workerExecArgv(): string[] {
  if (!import.meta.url.endsWith('.ts')) return [];
  const hooks = new URL('../scripts/register-ts.js', import.meta.url);
  return existsSync(fileURLToPath(hooks)) ? ['--import', hooks.href] : [];
}

function startNodeWorker(): WorkerPort {
  const worker = new Worker(new URL(import.meta.url), { workerData: { role: ROLE }, execArgv: workerExecArgv() });
  let onMessage: (m: FromSweepWorker) => void = () => {};
  let onCrash: (e: Error) => void = () => {};
  worker.on('message', (m: FromSweepWorker) => onMessage(m));
  worker.on('error', (e) => onCrash(e));
  worker.on('exit', (code) => {
    if (code !== 0) onCrash(new Error(`worker thread exited with code ${code}`));
  });
  worker.unref(); // an idle pool must not keep the process alive
  return {
    post: (m: ToSweepWorker) => worker.postMessage(m),
    listen: (message, crash) => {
      onMessage = message;
      onCrash = crash;
    },
    terminate: async () => {
      onCrash = () => {};
      await worker.terminate();
    },
    hold: (busy) => (busy ? worker.ref() : worker.unref()),
  };
}

/** Computes sweep points on Node worker threads. */
export class NodeWorkerExecutor extends WorkerPoolExecutor {
  constructor(options: NodeWorkerOptions = {}) {
    const module = options.pointModule;
    super({
      workers: options.workers ?? availableParallelism(),
      start: startNodeWorker,
      pointModule: module === undefined ? undefined : module instanceof URL ? module.href : /^[a-z]+:/.test(module) ? module : pathToFileURL(module).href,
    });
  }
}

/**
 * Write a file so that readers see the old or the new content, never a torn one, and so that the
 * new content survives a crash of the machine once this returns: the data is flushed (fsync)
 * before the rename, and the folder after it.
 */
export async function writeFileAtomic(path: string, text: string): Promise<void> {
  const temporary = `${path}.${process.pid}.tmp`;
  const handle = await open(temporary, 'w');
  try {
    await handle.writeFile(text);
    await handle.sync();
  } finally {
    await handle.close();
  }
  await rename(temporary, path);
  syncFolder(dirname(path));
}

/** The same, synchronously: lands even when the caller's loop keeps the event loop busy. */
export function writeFileAtomicSync(path: string, text: string): void {
  const temporary = `${path}.${process.pid}.tmp`;
  const fd = openSync(temporary, 'w');
  try {
    writeFileSync(fd, text);
    fsyncSync(fd);
  } finally {
    closeSync(fd);
  }
  renameSync(temporary, path);
  syncFolder(dirname(path));
}

/** Makes a rename in `folder` durable (POSIX); where folders cannot be opened, the rename stands alone. */
function syncFolder(folder: string): void {
  let fd: number | null = null;
  try {
    fd = openSync(folder, 'r');
    fsyncSync(fd);
  } catch {
    // Windows cannot open a folder for fsync; its renames are metadata-journalled.
  } finally {
    if (fd !== null) closeSync(fd);
  }
}

interface LockOwner {
  pid: number;
  host: string;
  started: string;
  /** The scheduler's job and array task, so a requeued task takes over its own lock. */
  job: string | null;
}

export class ShardLockedError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'ShardLockedError';
  }
}

/**
 * Claims `path.lock` for this process, so a second runner of the same shard cannot overwrite the
 * first one's output: created exclusively, holding who owns it. A lock whose owner is gone (a dead
 * process on this host, or the same scheduler task requeued) is taken over; any other is refused,
 * naming the owner. Returns the function that releases it.
 */
export function lockFile(path: string, env: NodeJS.ProcessEnv = process.env): () => void {
  const lock = `${path}.lock`;
  const job = env.SLURM_JOB_ID ? `${env.SLURM_ARRAY_JOB_ID ?? env.SLURM_JOB_ID}:${env.SLURM_ARRAY_TASK_ID ?? ''}` : null;
  const me: LockOwner = { pid: process.pid, host: hostname(), started: new Date().toISOString(), job };
  for (let attempt = 0; attempt < 2; attempt++) {
    try {
      writeFileSync(lock, JSON.stringify(me) + '\n', { flag: 'wx' });
      return () => rmSync(lock, { force: true });
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code !== 'EEXIST') throw err;
    }
    let owner: Partial<LockOwner> = {};
    try {
      owner = JSON.parse(readFileSync(lock, 'utf8')) as Partial<LockOwner>;
    } catch {
      // Unreadable: written by a runner that died while writing it (it is a few bytes): stale.
    }
    const alive = owner.host === me.host && typeof owner.pid === 'number' ? processAlive(owner.pid) : owner.host === undefined ? false : null;
    const requeued = job !== null && owner.job === job;
    if (alive === false || requeued) {
      rmSync(lock, { force: true });
      continue;
    }
    throw new ShardLockedError(
      `${path} is being written by another runner (pid ${owner.pid} on ${owner.host}, since ${owner.started}${owner.job ? `, job ${owner.job}` : ''}); ` +
        `a second runner would overwrite its points. If that run is gone, remove ${lock}`,
    );
  }
  throw new ShardLockedError(`could not claim ${lock}: another runner claims it at the same time`);
}

function processAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/** The checkpoint saved at `path`, or undefined when there is none yet. */
export async function readCheckpointFile(path: string): Promise<SweepCheckpoint | undefined> {
  let text: string;
  try {
    text = await readFile(path, 'utf8');
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return undefined;
    throw err;
  }
  try {
    return JSON.parse(text) as SweepCheckpoint;
  } catch (err) {
    throw new Error(`checkpoint file ${path} is not valid JSON (${(err as Error).message}); remove it to start over`);
  }
}

/**
 * `runPhaseMap` with its checkpoint kept in a file: resumed from it when present, rewritten
 * atomically as points finish and when the sweep stops.
 */
export async function runPhaseMapWithCheckpointFile(
  request: PhaseMapRequest,
  path: string,
  options: Omit<RunPhaseMapOptions, 'checkpoint'> = {},
): Promise<PhaseMapResult> {
  const checkpoint = await readCheckpointFile(path);
  let writing: Promise<void> = Promise.resolve();
  try {
    return await runPhaseMap(request, {
      ...options,
      checkpoint,
      onCheckpoint: (c) => {
        options.onCheckpoint?.(c);
        const text = JSON.stringify(c);
        writing = writing.then(() => writeFileAtomic(path, text));
      },
    });
  } finally {
    await writing;
  }
}

if (!isMainThread && (workerData as { role?: string } | null)?.role === ROLE && parentPort !== null) {
  const port = parentPort;
  const engine = async (): Promise<PointFunctionFactory> => (await import('../src/scan/point.js')).pointFunction;
  const handle = serveSweepWorker(
    (m) => port.postMessage(m),
    engine,
    (url) => import(url) as Promise<{ pointFunction?: PointFunctionFactory }>,
  );
  // Chunks are handled one at a time, in order.
  let queue: Promise<void> = Promise.resolve();
  port.on('message', (m: ToSweepWorker) => {
    queue = queue.then(() => handle(m));
  });
}
