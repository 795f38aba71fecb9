/**
 * Kernel section of `npm run bench`: start to first kernel_info_reply and the round trip of a
 * trivial execute_request (median of 200), against Debian's python3-ipykernel driven by the same
 * client in the same run (bench/kernel_bench.py). Needs `npm run build` (the kernel runs from dist/).
 */
import { execFile } from 'node:child_process';
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { promisify } from 'node:util';
import type { BenchRow } from './table.js';

interface Figures {
  start_s: number;
  execute_ms: number;
}

export async function benchKernel(): Promise<BenchRow[]> {
  if (!existsSync(fileURLToPath(new URL('../dist/cli/main.js', import.meta.url)))) {
    throw new Error('bench kernel: dist/cli/main.js is missing; run `npm run build` first');
  }
  const script = fileURLToPath(new URL('./kernel_bench.py', import.meta.url));
  const { stdout } = await promisify(execFile)('/usr/bin/python3', [script], { maxBuffer: 1 << 20, timeout: 15 * 60_000 });
  const got = JSON.parse(stdout.trim().split('\n').at(-1) ?? '{}') as { chernel: Figures; ipykernel: Figures | null };
  const ref = got.ipykernel;
  const row = (name: string, ours: number, reference: number | null, unit: string): BenchRow => ({
    name,
    ours,
    reference,
    unit,
    ratio: reference === null ? null : reference / ours,
    target: '>= 1x python3-ipykernel',
  });
  return [
    row('kernel start to first kernel_info_reply', got.chernel.start_s, ref?.start_s ?? null, 's'),
    row('trivial execute_request round trip (median of 200)', got.chernel.execute_ms, ref?.execute_ms ?? null, 'ms'),
  ];
}
