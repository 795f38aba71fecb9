/**
 * ZeroMQ transport: binds the five channels from the connection file, echoes heartbeats, checks
 * every incoming message (see wire.ts) and hands verified ones to the protocol layer. Bad
 * messages are logged and dropped; nothing here ever throws into the event loop.
 */
import * as zmq from 'zeromq';
import { log } from '../log.js';
import { endpoint } from './connection.js';
import { decode, encode, ReplayGuard, Signer } from './wire.js';
/** zeromq allows one pending send per socket: chain them. */
class SendQueue {
    socket;
    tail = Promise.resolve();
    constructor(socket) {
        this.socket = socket;
    }
    push(frames) {
        this.tail = this.tail
            .then(() => this.socket.send(frames))
            .catch((error) => log(`send failed: ${error.message}`));
    }
    drain() {
        return this.tail;
    }
}
export class ZmqTransport {
    info;
    signer;
    replay = new ReplayGuard();
    routers;
    iopub = new zmq.Publisher();
    heartbeat = new zmq.Router();
    queues;
    handler = () => { };
    closed = false;
    constructor(info) {
        this.info = info;
        this.signer = new Signer(info.key, info.signature_scheme);
        this.routers = { shell: new zmq.Router(), control: new zmq.Router(), stdin: new zmq.Router() };
        this.queues = {
            shell: new SendQueue(this.routers.shell),
            control: new SendQueue(this.routers.control),
            stdin: new SendQueue(this.routers.stdin),
            iopub: new SendQueue(this.iopub),
        };
    }
    static async bind(info) {
        const transport = new ZmqTransport(info);
        await transport.bindAll();
        return transport;
    }
    async bindAll() {
        const { info } = this;
        await Promise.all([
            this.routers.shell.bind(endpoint(info, info.shell_port)),
            this.routers.control.bind(endpoint(info, info.control_port)),
            this.routers.stdin.bind(endpoint(info, info.stdin_port)),
            this.iopub.bind(endpoint(info, info.iopub_port)),
            this.heartbeat.bind(endpoint(info, info.hb_port)),
        ]);
        void this.echoHeartbeats();
        for (const channel of ['shell', 'control', 'stdin'])
            void this.receive(channel);
    }
    async echoHeartbeats() {
        try {
            for await (const frames of this.heartbeat)
                await this.heartbeat.send(frames);
        }
        catch (error) {
            if (!this.closed)
                log(`heartbeat stopped: ${error.message}`);
        }
    }
    async receive(channel) {
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
                }
                catch (error) {
                    log(`handler failed on ${channel} ${decoded.message.header.msg_type}: ${error.stack}`);
                }
            }
        }
        catch (error) {
            if (!this.closed)
                log(`${channel} receive loop stopped: ${error.message}`);
        }
    }
    onMessage(handler) {
        this.handler = handler;
    }
    send(channel, message) {
        if (this.closed)
            return;
        this.queues[channel].push(encode(message, this.signer));
    }
    async close() {
        await Promise.all(Object.values(this.queues).map((q) => q.drain()));
        this.closed = true;
        for (const socket of [...Object.values(this.routers), this.iopub, this.heartbeat])
            socket.close();
    }
}
//# sourceMappingURL=zmq.js.map