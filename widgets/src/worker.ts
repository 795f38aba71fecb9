/**
 * The engine in a Web Worker: one request in, one result (or error) out. Bundled by build.mjs with
 * the engine from ../../src and inlined into the widget bundle as a blob URL, so it also runs from
 * a file:// page.
 */
import { diagnose } from './diagnose.js';
import type { ComputeMessage, ComputeReply, DiagnosticResult } from './protocol.js';
import { transferablesOf } from './wire.js';

interface WorkerScope {
  onmessage: ((event: MessageEvent<ComputeMessage>) => void) | null;
  postMessage(message: ComputeReply, transfer: ArrayBuffer[]): void;
}

const scope = self as unknown as WorkerScope;

scope.onmessage = (event) => {
  const { id, request } = event.data;
  const started = performance.now();
  let reply: ComputeReply;
  try {
    const result: DiagnosticResult = diagnose(request);
    reply = { id, ok: true, result, ms: performance.now() - started };
  } catch (err) {
    const error = err instanceof Error ? { name: err.name, message: err.message } : { name: 'Error', message: String(err) };
    reply = { id, ok: false, error };
  }
  scope.postMessage(reply, reply.ok ? transferablesOf(reply.result) : []);
};
