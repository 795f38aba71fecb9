/** Documentation of engine exports for inspect_request, built once on first use (see worker.ts). */

import { Worker } from 'node:worker_threads';
import { log } from '../log.js';

let pending: Promise<Record<string, string>> | null = null;

export function engineDocs(): Promise<Record<string, string>> {
  pending ??= new Promise((resolve) => {
    const worker = new Worker(new URL('./worker.js', import.meta.url));
    worker.once('message', (message: { index?: Record<string, string>; error?: string }) => {
      if (message.error) log(`engine documentation unavailable: ${message.error}`);
      resolve(message.index ?? {});
      void worker.terminate();
    });
    worker.once('error', (error) => {
      log(`engine documentation unavailable: ${error.message}`);
      resolve({});
    });
  });
  return pending;
}
