/**
 * ZeroMQ transport: binds the five channels from the connection file, echoes heartbeats, checks
 * every incoming message (see wire.ts) and hands verified ones to the protocol layer. Bad
 * messages are logged and dropped; nothing here ever throws into the event loop.
 */
import type { Channel, Message, Outgoing, Transport } from '../protocol/messages.js';
import { type ConnectionInfo } from './connection.js';
export declare class ZmqTransport implements Transport {
    private readonly info;
    private readonly signer;
    private readonly replay;
    private readonly routers;
    private readonly iopub;
    private readonly heartbeat;
    private readonly queues;
    private handler;
    private closed;
    private constructor();
    static bind(info: ConnectionInfo): Promise<ZmqTransport>;
    private bindAll;
    private echoHeartbeats;
    private receive;
    onMessage(handler: (channel: Channel, message: Message) => void): void;
    send(channel: Channel, message: Outgoing): void;
    close(): Promise<void>;
}
