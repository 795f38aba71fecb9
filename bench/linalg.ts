/**
 * Eigensolver throughput (solves per CPU second) against numpy's batched eigh/eigvalsh on the same
 * matrices, single-threaded (OPENBLAS_NUM_THREADS=1), measured in the same run, rounds alternating,
 * both sides on the same CPU (see `sameCpu`).
 * Standalone: `node --import ./scripts/register-ts.js bench/linalg.ts`.
 */
import { spawn, spawnSync, type ChildProcessWithoutNullStreams } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createInterface } from 'node:readline';
import { pathToFileURL } from 'node:url';
import { HermitianEigensolver } from '../src/linalg/eigh.js';
import { randomHermitian, uniform } from '../tests/unit/linalg-fixtures.js';
import { formatTable, type BenchRow } from './table.js';

const PYTHON = '/usr/bin/python3';
/** Sizes, batch sizes (distinct matrices) and targets: ours / numpy throughput must reach `min`. */
const CASES = [
  { n: 2, batch: 100_000, min: 2 },
  { n: 4, batch: 50_000, min: 2 },
  { n: 8, batch: 20_000, min: 2 },
  { n: 16, batch: 4_000, min: 1 },
  { n: 64, batch: 200, min: 0.5 },
  { n: 256, batch: 6, min: 1 / 3 },
];
/**
 * Each timing is the best of ROUNDS rounds of about ROUND_SECONDS, ours and numpy's alternating.
 * Both sides count CPU time (process time), not wall time: on a shared machine, time spent waiting
 * for a core would otherwise land on whichever side happened to be running. Many short rounds
 * rather than a few long ones: a burst of load on the other core (which slows CPU time too, through
 * the shared cache) then spoils some rounds of a side, not all of them.
 */
const ROUNDS = 12;
const ROUND_SECONDS = 0.05;

/** `batch` random Hermitian n x n matrices, back to back (the layout of numpy complex128). */
function randomHermitianBatch(n: number, batch: number, seed: number): Float64Array {
  const next = uniform(seed);
  const out = new Float64Array(batch * 2 * n * n);
  for (let b = 0; b < batch; b++) out.set(randomHermitian(n, next), b * 2 * n * n);
  return out;
}

/** A timer for our solver over the whole batch: CPU seconds per pass, averaged over `reps` passes. */
function oursTimer(n: number, batch: number, h: Float64Array, w: Float64Array, vecs: Float64Array | null): (reps: number) => number {
  const solver = new HermitianEigensolver(n);
  const stride = 2 * n * n;
  return (reps) => {
    let sink = 0;
    const t0 = process.cpuUsage();
    for (let r = 0; r < reps; r++) {
      for (let b = 0; b < batch; b++) {
        solver.solveAt(h, b * stride, w, b * n, vecs, 0);
        if (vecs !== null) sink += vecs[0];
      }
    }
    const used = process.cpuUsage(t0);
    const seconds = (used.user + used.system) / 1e6 / reps;
    if (Number.isNaN(sink)) throw new Error('eigensolver produced NaN');
    return seconds;
  };
}

/**
 * numpy side: one long-lived process answering one JSON command per line, so that its rounds can
 * alternate with ours (the machine is shared; alternating exposes both to the same load).
 */
const NUMPY_WORKER = String.raw`
import json, sys, time
import numpy as np
h = None
for line in sys.stdin:
    cmd = json.loads(line)
    if cmd['op'] == 'load':
        n, batch = cmd['n'], cmd['batch']
        h = np.fromfile(cmd['file'], dtype=np.complex128).reshape(batch, n, n)
        np.linalg.eigh(h)
        out = np.linalg.eigvalsh(h[0]).tolist()
    else:
        f = np.linalg.eigh if cmd['op'] == 'eigh' else np.linalg.eigvalsh
        t0 = time.process_time()
        for _ in range(cmd['reps']):
            f(h)
        out = (time.process_time() - t0) / cmd['reps']
    print(json.dumps(out), flush=True)
`;

class NumpyWorker {
  private readonly proc: ChildProcessWithoutNullStreams;
  private readonly replies: string[] = [];
  private waiting: { resolve: (line: string) => void; reject: (err: Error) => void } | null = null;
  private failure = '';
  private exited = false;

  constructor(cpu: string | null) {
    const env = { ...process.env, OPENBLAS_NUM_THREADS: '1', OMP_NUM_THREADS: '1', MKL_NUM_THREADS: '1' };
    const command = [PYTHON, '-c', NUMPY_WORKER];
    this.proc = cpu === null ? spawn(PYTHON, command.slice(1), { env }) : spawn(TASKSET, ['-c', cpu, ...command], { env });
    this.proc.stderr.on('data', (chunk: Buffer) => (this.failure += chunk.toString()));
    this.proc.on('exit', () => {
      this.exited = true;
      this.waiting?.reject(new Error(`numpy worker exited: ${this.failure.trim()}`));
      this.waiting = null;
    });
    createInterface({ input: this.proc.stdout }).on('line', (line) => {
      const waiting = this.waiting;
      this.waiting = null;
      if (waiting !== null) waiting.resolve(line);
      else this.replies.push(line);
    });
  }

  async call<T>(command: object): Promise<T> {
    if (this.exited) throw new Error(`numpy worker exited: ${this.failure.trim()}`);
    this.proc.stdin.write(JSON.stringify(command) + '\n');
    const line = this.replies.shift() ?? (await new Promise<string>((resolve, reject) => (this.waiting = { resolve, reject })));
    return JSON.parse(line) as T;
  }

  close(): void {
    this.proc.stdin.end();
  }
}

const TASKSET = '/usr/bin/taskset';

/**
 * Puts our main thread on one CPU (the first it may use) for the duration of `run`, and returns
 * that CPU for the numpy worker. On a shared virtual machine one CPU can be much slower than the
 * other for minutes (measured here: 1.6x, for plain JavaScript and numpy alike); with the two
 * sides on different CPUs the ratio would measure that instead of the solvers. Without Linux's
 * taskset, nothing is pinned.
 */
export async function sameCpu<T>(run: (cpu: string | null) => Promise<T>): Promise<T> {
  const pid = String(process.pid);
  const current = existsSync(TASKSET) ? spawnSync(TASKSET, ['-pc', pid], { encoding: 'utf8' }) : null;
  const allowed = current?.status === 0 ? current.stdout.split(':').pop()?.trim() ?? '' : '';
  const cpu = allowed.split(/[,-]/)[0];
  if (cpu === '' || spawnSync(TASKSET, ['-pc', cpu, pid]).status !== 0) return run(null);
  try {
    return await run(cpu);
  } finally {
    spawnSync(TASKSET, ['-pc', allowed, pid]);
  }
}

/** Alternate rounds of ours and numpy's; best CPU time per solve of each, as solves per CPU second. */
async function compare(
  ours: (reps: number) => number,
  numpy: ((reps: number) => Promise<number>) | null,
  batch: number,
): Promise<{ ours: number; numpy: number | null }> {
  const first = ours(1);
  const oursReps = Math.max(1, Math.ceil(ROUND_SECONDS / Math.max(first, 1e-4)));
  let oursBest = first;
  let numpyBest = Infinity;
  let numpyReps = 1;
  if (numpy !== null) {
    const t = await numpy(1);
    numpyBest = t;
    numpyReps = Math.max(1, Math.ceil(ROUND_SECONDS / Math.max(t, 1e-4)));
  }
  for (let round = 0; round < ROUNDS; round++) {
    oursBest = Math.min(oursBest, ours(oursReps));
    if (numpy !== null) numpyBest = Math.min(numpyBest, await numpy(numpyReps));
  }
  return { ours: batch / oursBest, numpy: numpy === null ? null : batch / numpyBest };
}

export function benchLinalg(): Promise<BenchRow[]> {
  return sameCpu(benchOnCpu);
}

async function benchOnCpu(cpu: string | null): Promise<BenchRow[]> {
  const rows: BenchRow[] = [];
  const dir = mkdtempSync(join(tmpdir(), 'chernel-bench-linalg-'));
  const worker = existsSync(PYTHON) ? new NumpyWorker(cpu) : null;
  try {
    for (const { n, batch, min } of CASES) {
      const h = randomHermitianBatch(n, batch, 1000 + n);
      const w = new Float64Array(batch * n);
      const vecs = new Float64Array(2 * n * n);
      let numpyFirst: number[] | null = null;
      if (worker !== null) {
        const file = join(dir, `h${n}.bin`);
        writeFileSync(file, new Uint8Array(h.buffer, h.byteOffset, h.byteLength));
        numpyFirst = await worker.call<number[]>({ op: 'load', file, n, batch });
      }
      const numpyTimer = (op: string) => (worker === null ? null : (reps: number) => worker.call<number>({ op, reps }));
      const full = await compare(oursTimer(n, batch, h, w, vecs), numpyTimer('eigh'), batch);
      const values = await compare(oursTimer(n, batch, h, w, null), numpyTimer('eigvalsh'), batch);
      if (numpyFirst !== null) {
        // Same matrices, same spectrum: a bench that compared different work would be meaningless.
        const gap = Math.max(...numpyFirst.map((x, i) => Math.abs(x - w[i])));
        if (!(gap < 1e-8 * n)) throw new Error(`bench linalg: n = ${n}: eigenvalues differ from numpy by ${gap}`);
      }
      const row = (name: string, ours: number, reference: number | null, target: string): BenchRow => ({
        name,
        ours,
        reference,
        unit: 'solves per CPU-s',
        ratio: reference === null ? null : ours / reference,
        target,
      });
      const words = min >= 1 ? `>= ${min}x numpy eigh` : `>= 1/${Math.round(1 / min)}x numpy eigh (time within ${Math.round(1 / min)}x)`;
      rows.push(row(`eigh n=${n} (values + vectors)`, full.ours, full.numpy, words));
      rows.push(row(`eigvalsh n=${n} (values only)`, values.ours, values.numpy, 'none (for information)'));
    }
  } finally {
    worker?.close();
    rmSync(dir, { recursive: true, force: true });
  }
  return rows;
}

if (import.meta.url === pathToFileURL(process.argv[1]).href) {
  console.log(formatTable(await benchLinalg()));
}
