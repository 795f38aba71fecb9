/** Starts a kernel from a connection file: transport, protocol, executor. */
import { ExecutionHost } from './executor/host.js';
import { log } from './log.js';
import { Kernel } from './protocol/kernel.js';
import { readConnectionFile } from './transport/connection.js';
import { ZmqTransport } from './transport/zmq.js';
export async function startKernel(connectionFile) {
    const info = readConnectionFile(connectionFile);
    const transport = await ZmqTransport.bind(info);
    let kernel = null;
    const stop = async () => {
        await transport.close();
        process.exit(0);
    };
    kernel = new Kernel(transport, (events) => new ExecutionHost(events), () => void stop());
    // Clients that use interrupt_mode "signal" send SIGINT: treat it as an interrupt request.
    process.on('SIGINT', () => kernel?.interruptFromSignal());
    process.on('SIGTERM', () => void stop());
    process.on('uncaughtException', (error) => log(`uncaught: ${error.stack ?? error.message}`));
    process.on('unhandledRejection', (error) => log(`unhandled rejection: ${error?.stack ?? String(error)}`));
}
//# sourceMappingURL=main.js.map