/** Documentation of engine exports for inspect_request, built once on first use (see worker.ts). */
import { Worker } from 'node:worker_threads';
import { log } from '../log.js';
let pending = null;
export function engineDocs() {
    pending ??= new Promise((resolve) => {
        const worker = new Worker(new URL('./worker.js', import.meta.url));
        worker.once('message', (message) => {
            if (message.error)
                log(`engine documentation unavailable: ${message.error}`);
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
//# sourceMappingURL=index.js.map