/** The connection file a Jupyter client writes before starting the kernel. */
export interface ConnectionInfo {
    transport: 'tcp' | 'ipc';
    ip: string;
    key: string;
    signature_scheme: string;
    shell_port: number;
    iopub_port: number;
    stdin_port: number;
    control_port: number;
    hb_port: number;
}
export declare function readConnectionFile(path: string): ConnectionInfo;
export declare function endpoint(info: ConnectionInfo, port: number): string;
