/** Starts a kernel from a connection file: transport, protocol, executor. */
export declare function startKernel(connectionFile: string): Promise<void>;
