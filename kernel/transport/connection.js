/** The connection file a Jupyter client writes before starting the kernel. */
import { readFileSync } from 'node:fs';
const PORTS = ['shell_port', 'iopub_port', 'stdin_port', 'control_port', 'hb_port'];
export function readConnectionFile(path) {
    let raw;
    try {
        raw = JSON.parse(readFileSync(path, 'utf8'));
    }
    catch (error) {
        throw new Error(`connection file ${path}: ${error.message}`);
    }
    if (typeof raw !== 'object' || raw === null)
        throw new Error(`connection file ${path}: expected a JSON object`);
    const info = raw;
    const transport = info.transport ?? 'tcp';
    if (transport !== 'tcp' && transport !== 'ipc')
        throw new Error(`connection file: transport: unsupported value ${JSON.stringify(transport)}`);
    for (const port of PORTS) {
        const value = info[port];
        if (typeof value !== 'number' || !Number.isInteger(value) || value < 0 || value > 65535) {
            throw new Error(`connection file: ${port}: expected a port number, got ${JSON.stringify(value)}`);
        }
    }
    const key = info.key ?? '';
    if (typeof key !== 'string')
        throw new Error(`connection file: key: expected a string, got ${JSON.stringify(key)}`);
    const ip = info.ip ?? '127.0.0.1';
    if (typeof ip !== 'string')
        throw new Error(`connection file: ip: expected a string, got ${JSON.stringify(ip)}`);
    const scheme = info.signature_scheme ?? 'hmac-sha256';
    if (typeof scheme !== 'string')
        throw new Error(`connection file: signature_scheme: expected a string, got ${JSON.stringify(scheme)}`);
    return { ...info, transport, ip, key, signature_scheme: scheme };
}
export function endpoint(info, port) {
    return info.transport === 'tcp' ? `tcp://${info.ip}:${port}` : `ipc://${info.ip}-${port}`;
}
//# sourceMappingURL=connection.js.map