/**
 * ZeroMQ transport: binds the five channels from the connection file, echoes heartbeats, checks
 * every incoming message (see wire.ts) and hands verified ones to the protocol layer. Bad
 * messages are logged and dropped; nothing here ever throws into the event loop.
 */

import * as zmq from 'zeromq';
import { log } from '../log.js';
import type { Channel, Message, Outgoing, Transport } from '../protocol/messages.js';
import { endpoint, type ConnectionInfo } from './connection.js';
import { decode, encode, ReplayGuard, Signer } from './wire.js';

type Sendable = zmq.Router | zmq.Publisher;

/** zeromq allows one pending send per socket: chain them. */
class SendQueue {
  private tail: Promise<void> = Promise.resolve();
  constructor(private readonly socket: Sendable) {}
  push(frames: Buffer[]): void {
    this.tail = this.tail
      .then(() => this.socket.send(frames))
      .catch((error: unknown) => log(`send failed: ${(error as Error).message}`));
  }
  drain(): Promise<void> {
    return this.tail;
  }
}

export class ZmqTransport implements Transport {
  private readonly signer: Signer;
  private readonly replay = new ReplayGuard();
  private readonly routers: Record<'shell' | 'control' | 'stdin', zmq.Router>;
  private readonly iopub = new zmq.Publisher();
  private readonly heartbeat = new zmq.Router();
  private readonly queues: Record<Channel, SendQueue>;
  private handler: (channel: Channel, message: Message) => void = () => {};
  private closed = false;

  private constructor(private readonly info: ConnectionInfo) {
    this.signer = new Signer(info.key, info.signature_scheme);
    this.routers = { shell: new zmq.Router(), control: new zmq.Router(), stdin: new zmq.Router() };
    this.queues = {
      shell: new SendQueue(this.routers.shell),
      control: new SendQueue(this.routers.control),
      stdin: new SendQueue(this.routers.stdin),
      iopub: new SendQueue(this.iopub),
    };
  }

  static async bind(info: ConnectionInfo): Promise<ZmqTransport> {
    const transport = new ZmqTransport(info);
    await transport.bindAll();
    return transport;
  }

  private async bindAll(): Promise<void> {
    const { info } = this;
    await Promise.all([
      this.routers.shell.bind(endpoint(info, info.shell_port)),
      this.routers.control.bind(endpoint(info, info.control_port)),
      this.routers.stdin.bind(endpoint(info, info.stdin_port)),
      this.iopub.bind(endpoint(info, info.iopub_port)),
      this.heartbeat.bind(endpoint(info, info.hb_port)),
    ]);
    void this.echoHeartbeats();
    for (const channel of ['shell', 'control', 'stdin'] as const) void this.receive(channel);
  }

  private async echoHeartbeats(): Promise<void> {
    try {
      for await (const frames of this.heartbeat) await this.heartbeat.send(frames);
    } catch (error) {
      if (!this.closed) log(`heartbeat stopped: ${(error as Error).message}`);
    }
  }

  private async receive(channel: 'shell' | 'control' | 'stdin'): Promise<void> {
    const socket = this.routers[channel];
    try {
      for await (const frames of socket) {
        const decoded = decode(frames, this.signer, this.replay);
        if (!decoded.ok) {
          log(`dropped a message on ${channel}: ${decoded.reason}`);
          continue;
        }
        try {
          this.handler(channel, decoded.message);
        } catch (error) {
          log(`handler failed on ${channel} ${decoded.message.header.msg_type}: ${(error as Error).stack}`);
        }
      }
    } catch (error) {
      if (!this.closed) log(`${channel} receive loop stopped: ${(error as Error).message}`);
    }
  }

  onMessage(handler: (channel: Channel, message: Message) => void): void {
    this.handler = handler;
  }

  send(channel: Channel, message: Outgoing): void {
    if (this.closed) return;
    this.queues[channel].push(encode(message, this.signer));
  }

  async close(): Promise<void> {
    await Promise.all(Object.values(this.queues).map((q) => q.drain()));
    this.closed = true;
    for (const socket of [...Object.values(this.routers), this.iopub, this.heartbeat]) socket.close();
  }
}
