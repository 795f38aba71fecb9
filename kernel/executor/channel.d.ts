/**
 * Messages between the kernel's main thread (the host) and the worker that runs user code.
 * Plain structured-clone data; binary comm buffers travel as Uint8Array.
 */
import type { CommPayload, DisplayOutput } from '../protocol/executor.js';
export type { CommPayload, DisplayOutput };
export type MimeBundle = Record<string, unknown>;
export interface SerializedError {
    name: string;
    message: string;
    stack: string;
}
/** What to describe for `inspect` / complete after a dot: a dotted path from the global scope. */
export interface Description {
    found: boolean;
    /** The value is the engine's own export of that name (documented in its type declarations). */
    engineExport: boolean;
    summary: string;
}
export type HostToWorker = {
    type: 'execute';
    id: number;
    code: string;
    filename: string;
    hasValue: boolean;
    silent: boolean;
} | {
    type: 'interrupt';
} | {
    type: 'names';
    id: number;
    path: string[];
} | {
    type: 'describe';
    id: number;
    path: string[];
} | {
    type: 'input_reply';
    id: number;
    value: string | null;
    error?: string;
} | ({
    type: 'comm_open';
    id: number;
    targetName: string;
} & CommPayload) | ({
    type: 'comm_msg';
    id: number;
} & CommPayload) | ({
    type: 'comm_close';
    id: number;
} & CommPayload);
export type WorkerToHost = {
    type: 'ready';
    engineNames: string[];
    engineError: string | null;
} | {
    type: 'stream';
    name: 'stdout' | 'stderr';
    text: string;
} | {
    type: 'display';
    output: DisplayOutput;
    displayId: string | null;
    update: boolean;
} | {
    type: 'clear_output';
    wait: boolean;
} | {
    type: 'done';
    id: number;
    result: DisplayOutput | null;
    error: SerializedError | null;
} | {
    type: 'answer';
    id: number;
    names?: string[];
    description?: Description;
} | {
    type: 'input_request';
    id: number;
    prompt: string;
    password: boolean;
} | ({
    type: 'comm_open';
    targetName: string;
} & CommPayload) | ({
    type: 'comm_msg';
} & CommPayload) | ({
    type: 'comm_close';
} & CommPayload);
