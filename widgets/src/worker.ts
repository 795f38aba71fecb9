/** How often a long request reports its progress. */
const PROGRESS_MS = 100;

/**
 * The engine in a Web Worker: one request in, one result (or error) out; a phase map also reports
 * its progress on the way. Bundled by build.mjs with
 * the engine from ../../src and inlined into the widget bundle as a blob URL, so it also runs from
 * a file:// page.
 */
import { computeView } from '../../src/views.js';
import type { ViewResult } from '../../contract/protocol.js';
import type { ComputeMessage, ComputeProgress, ComputeReply } from './worker-messages.js';
import { transferablesOf } from '../../contract/wire.js';

interface WorkerScope {
  onmessage: ((event: MessageEvent<ComputeMessage>) => void) | null;
  postMessage(message: ComputeReply | ComputeProgress, transfer?: ArrayBuffer[]): void;
}

const scope = self as unknown as WorkerScope;

scope.onmessage = (event) => {
  const { id, request } = event.data;
  const started = performance.now();
  let reply: ComputeReply;
  try {
    let reported = started;
    const onPoints = (done: number, total: number) => {
      const now = performance.now();
      if (now - reported < PROGRESS_MS) return;
      reported = now;
      scope.postMessage({ id, progress: { done, total } });
    };
    // Every engine result carries the checks the contract's result shape names.
    const result = computeView(request, onPoints) as ViewResult;
    reply = { id, ok: true, result, ms: performance.now() - started };
  } catch (err) {
    const error = err instanceof Error ? { name: err.name, message: err.message } : { name: 'Error', message: String(err) };
    reply = { id, ok: false, error };
  }
  scope.postMessage(reply, reply.ok ? transferablesOf(reply.result) : []);
};
