/** The connection file a Jupyter client writes before starting the kernel. */

import { readFileSync } from 'node:fs';

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

const PORTS = ['shell_port', 'iopub_port', 'stdin_port', 'control_port', 'hb_port'] as const;

export function readConnectionFile(path: string): ConnectionInfo {
  let raw: unknown;
  try {
    raw = JSON.parse(readFileSync(path, 'utf8'));
  } catch (error) {
    throw new Error(`connection file ${path}: ${(error as Error).message}`);
  }
  if (typeof raw !== 'object' || raw === null) throw new Error(`connection file ${path}: expected a JSON object`);
  const info = raw as Record<string, unknown>;
  const transport = info.transport ?? 'tcp';
  if (transport !== 'tcp' && transport !== 'ipc') throw new Error(`connection file: transport: unsupported value ${JSON.stringify(transport)}`);
  for (const port of PORTS) {
    const value = info[port];
    if (typeof value !== 'number' || !Number.isInteger(value) || value < 0 || value > 65535) {
      throw new Error(`connection file: ${port}: expected a port number, got ${JSON.stringify(value)}`);
    }
  }
  const key = info.key ?? '';
  if (typeof key !== 'string') throw new Error(`connection file: key: expected a string, got ${JSON.stringify(key)}`);
  const ip = info.ip ?? '127.0.0.1';
  if (typeof ip !== 'string') throw new Error(`connection file: ip: expected a string, got ${JSON.stringify(ip)}`);
  const scheme = info.signature_scheme ?? 'hmac-sha256';
  if (typeof scheme !== 'string') throw new Error(`connection file: signature_scheme: expected a string, got ${JSON.stringify(scheme)}`);
  return { ...(info as unknown as ConnectionInfo), transport, ip, key, signature_scheme: scheme };
}

export function endpoint(info: ConnectionInfo, port: number): string {
  return info.transport === 'tcp' ? `tcp://${info.ip}:${port}` : `ipc://${info.ip}-${port}`;
}
