/** The messages between a view and its engine workers (compute-client.ts, worker.ts). */
import type { ViewRequest, ViewResult } from '../../contract/protocol.js';

/** Main thread -> worker. */
export interface ComputeMessage {
  id: number;
  request: ViewRequest;
}

/** Worker -> main thread, while a long request (a phase map) computes: points done of those planned. */
export interface ComputeProgress {
  id: number;
  progress: { done: number; total: number };
}

/** Worker -> main thread. */
export type ComputeReply =
  | { id: number; ok: true; result: ViewResult; ms: number }
  | { id: number; ok: false; error: { name: string; message: string } };
