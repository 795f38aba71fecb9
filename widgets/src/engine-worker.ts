/** Starts the engine worker from the bundled source text (a blob URL works from file:// too). */
import workerSource from 'chernel:worker-source';
import type { WorkerLike } from './compute-client.js';

let workerUrl: string | null = null;

export function spawnEngineWorker(): WorkerLike {
  workerUrl ??= URL.createObjectURL(new Blob([workerSource], { type: 'text/javascript' }));
  return new Worker(workerUrl, { name: 'chernel-engine' }) as unknown as WorkerLike;
}
