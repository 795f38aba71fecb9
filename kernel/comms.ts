/**
 * Comms, on the side of user code (the worker): kernel-side objects such as widget models open
 * comms, send state and receive updates from the front end through this module.
 *
 *   registerCommTarget('jupyter.widget', (comm, open) => { ... })   // front end opens
 *   const comm = openComm('jupyter.widget', {state, buffer_paths}, {metadata: {version: '2.1.0'}})
 *   comm.send({method: 'update', state}); comm.onMessage((msg) => ...); comm.close()
 *
 * The host routes comm_open / comm_msg / comm_close between the sockets and this registry; when the
 * worker is restarted every comm is closed for the front end.
 */

import { randomUUID } from 'node:crypto';
import type { CommPayload, WorkerToHost } from './executor/channel.js';

export interface CommMessage {
  data: Record<string, unknown>;
  metadata: Record<string, unknown>;
  buffers: Uint8Array[];
}

export interface SendOptions {
  metadata?: Record<string, unknown>;
  /** Binary parts (e.g. Float64Array views); sent as raw frames, byteOffset respected. */
  buffers?: ArrayBufferView[];
}

type Post = (message: WorkerToHost) => void;

let post: Post = () => {
  throw new Error('comms: not connected to a kernel (comms work only inside a chernel cell)');
};
const comms = new Map<string, Comm>();
const targets = new Map<string, (comm: Comm, open: CommMessage) => void>();

function toBytes(buffers: readonly ArrayBufferView[] | undefined): Uint8Array[] {
  return (buffers ?? []).map((b) => new Uint8Array(b.buffer, b.byteOffset, b.byteLength).slice());
}

function payload(commId: string, data: Record<string, unknown>, options: SendOptions): CommPayload {
  return { commId, data, metadata: options.metadata ?? {}, buffers: toBytes(options.buffers) };
}

export class Comm {
  private messageHandlers: ((msg: CommMessage) => void)[] = [];
  private closeHandlers: ((msg: CommMessage) => void)[] = [];
  private isClosed = false;

  constructor(
    readonly id: string,
    readonly targetName: string,
  ) {}

  get closed(): boolean {
    return this.isClosed;
  }

  send(data: Record<string, unknown>, options: SendOptions = {}): void {
    if (this.isClosed) throw new Error(`comm ${this.id} (${this.targetName}): send after close`);
    post({ type: 'comm_msg', ...payload(this.id, data, options) });
  }

  close(data: Record<string, unknown> = {}, options: SendOptions = {}): void {
    if (this.isClosed) return;
    post({ type: 'comm_close', ...payload(this.id, data, options) });
    this.closed_({ data, metadata: options.metadata ?? {}, buffers: [] });
  }

  onMessage(handler: (msg: CommMessage) => void): void {
    this.messageHandlers.push(handler);
  }

  onClose(handler: (msg: CommMessage) => void): void {
    this.closeHandlers.push(handler);
  }

  /** @internal the front end sent a message. */
  deliver(msg: CommMessage): void {
    for (const handler of this.messageHandlers) handler(msg);
  }

  /** @internal the comm is gone (closed by either side). */
  closed_(msg: CommMessage): void {
    this.isClosed = true;
    comms.delete(this.id);
    for (const handler of this.closeHandlers) handler(msg);
  }
}

/** Called when the front end opens a comm on `name`. Registering again replaces the handler. */
export function registerCommTarget(name: string, handler: (comm: Comm, open: CommMessage) => void): void {
  targets.set(name, handler);
}

export function unregisterCommTarget(name: string): void {
  targets.delete(name);
}

/** Opens a comm from the kernel side. */
export function openComm(targetName: string, data: Record<string, unknown> = {}, options: SendOptions & { commId?: string } = {}): Comm {
  const comm = new Comm(options.commId ?? randomUUID().replaceAll('-', ''), targetName);
  comms.set(comm.id, comm);
  post({ type: 'comm_open', targetName, ...payload(comm.id, data, options) });
  return comm;
}

/** @internal wiring done by the worker. */
export function connectComms(sink: Post): void {
  post = sink;
}

/** @internal the host forwards front-end comm messages here; a handler's errors go to the caller (stderr). */
export function handleFrontendComm(message: Extract<import('./executor/channel.js').HostToWorker, { type: `comm_${string}` }>): void {
  const msg: CommMessage = { data: message.data, metadata: message.metadata, buffers: message.buffers };
  if (message.type === 'comm_open') {
    const handler = targets.get(message.targetName);
    if (!handler) {
      // The messaging spec's answer to an unknown target: close the comm, say nothing else (front
      // ends probe targets, e.g. the widget manager's "jupyter.widget.control").
      post({ type: 'comm_close', commId: message.commId, data: {}, metadata: {}, buffers: [] });
      return;
    }
    const comm = new Comm(message.commId, message.targetName);
    comms.set(comm.id, comm);
    handler(comm, msg);
    return;
  }
  const comm = comms.get(message.commId);
  // Messages for a comm that is closed or never opened here are ignored, as the spec asks.
  if (!comm) return;
  if (message.type === 'comm_msg') comm.deliver(msg);
  else comm.closed_(msg);
}
