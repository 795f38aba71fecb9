/** Documentation of engine exports for inspect_request, built once on first use (see worker.ts). */
export declare function engineDocs(): Promise<Record<string, string>>;
