/**
 * Eigensolver throughput (solves per second) against numpy's batched eigh/eigvalsh on the same
 * matrices, single-threaded (OPENBLAS_NUM_THREADS=1), measured in the same run.
 * Standalone: `node --import ./scripts/register-ts.js bench/linalg.ts`.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { HermitianEigensolver } from '../src/linalg/eigh.js';
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
/** Each timing is the best of ROUNDS rounds of at least ROUND_SECONDS. */
const ROUNDS = 3;
const ROUND_SECONDS = 0.25;

/** Deterministic uniform numbers in [-1, 1) (mulberry32). */
function uniform(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 2 ** 31 - 1;
  };
}

/** `batch` random Hermitian n x n matrices, back to back (the layout of numpy complex128). */
function randomHermitianBatch(n: number, batch: number, seed: number): Float64Array {
  const next = uniform(seed);
  const out = new Float64Array(batch * 2 * n * n);
  for (let b = 0; b < batch; b++) {
    const o = b * 2 * n * n;
    for (let i = 0; i < n; i++) {
      for (let j = i; j < n; j++) {
        const re = next();
        const im = i === j ? 0 : next();
        out[o + 2 * (i * n + j)] = re;
        out[o + 2 * (i * n + j) + 1] = im;
        out[o + 2 * (j * n + i)] = re;
        out[o + 2 * (j * n + i) + 1] = -im;
      }
    }
  }
  return out;
}

/** Solves per second over the whole batch, repeated to fill a round; best of ROUNDS. */
function timeOurs(n: number, batch: number, h: Float64Array, w: Float64Array, vecs: Float64Array | null): number {
  const solver = new HermitianEigensolver(n);
  const stride = 2 * n * n;
  let sink = 0;
  const pass = (): void => {
    for (let b = 0; b < batch; b++) {
      solver.solveAt(h, b * stride, w, b * n, vecs, 0);
      if (vecs !== null) sink += vecs[0];
    }
  };
  pass();
  let best = Infinity;
  let reps = 1;
  for (let round = 0; round < ROUNDS; round++) {
    const t0 = performance.now();
    for (let r = 0; r < reps; r++) pass();
    const seconds = (performance.now() - t0) / 1000;
    best = Math.min(best, seconds / reps);
    if (round === 0) reps = Math.max(1, Math.ceil(ROUND_SECONDS / seconds));
  }
  if (Number.isNaN(sink)) throw new Error('eigensolver produced NaN');
  return batch / best;
}

const NUMPY_SCRIPT = String.raw`
import json, sys, time
import numpy as np
path, n, batch, rounds, round_seconds = sys.argv[1], int(sys.argv[2]), int(sys.argv[3]), int(sys.argv[4]), float(sys.argv[5])
h = np.fromfile(path, dtype=np.complex128).reshape(batch, n, n)
def rate(f):
    f(h)
    best, reps = float('inf'), 1
    for r in range(rounds):
        t0 = time.perf_counter()
        for _ in range(reps):
            f(h)
        s = time.perf_counter() - t0
        best = min(best, s / reps)
        if r == 0:
            reps = max(1, int(np.ceil(round_seconds / s)))
    return batch / best
out = {'eigh': rate(np.linalg.eigh), 'eigvalsh': rate(np.linalg.eigvalsh),
       'first': np.linalg.eigvalsh(h[0]).tolist()}
print(json.dumps(out))
`;

interface NumpyRates {
  eigh: number;
  eigvalsh: number;
  first: number[];
}

function timeNumpy(dir: string, n: number, batch: number, h: Float64Array): NumpyRates | null {
  if (!existsSync(PYTHON)) return null;
  const file = join(dir, `h${n}.bin`);
  writeFileSync(file, new Uint8Array(h.buffer, h.byteOffset, h.byteLength));
  const env = { ...process.env, OPENBLAS_NUM_THREADS: '1', OMP_NUM_THREADS: '1', MKL_NUM_THREADS: '1' };
  const run = spawnSync(PYTHON, ['-c', NUMPY_SCRIPT, file, String(n), String(batch), String(ROUNDS), String(ROUND_SECONDS)], { env, encoding: 'utf8' });
  if (run.status !== 0) {
    process.stderr.write(`bench linalg: numpy unavailable (${run.stderr.trim().split('\n').pop() ?? run.status})\n`);
    return null;
  }
  return JSON.parse(run.stdout) as NumpyRates;
}

export async function benchLinalg(): Promise<BenchRow[]> {
  const rows: BenchRow[] = [];
  const dir = mkdtempSync(join(tmpdir(), 'chernel-bench-linalg-'));
  try {
    for (const { n, batch, min } of CASES) {
      const h = randomHermitianBatch(n, batch, 1000 + n);
      const w = new Float64Array(batch * n);
      const vecs = new Float64Array(2 * n * n);
      const oursVectors = timeOurs(n, batch, h, w, vecs);
      const oursValues = timeOurs(n, batch, h, w, null);
      const numpy = timeNumpy(dir, n, batch, h);
      if (numpy !== null) {
        // Same matrices, same spectrum: a bench that compared different work would be meaningless.
        const gap = Math.max(...numpy.first.map((x, i) => Math.abs(x - w[i])));
        if (!(gap < 1e-8 * n)) throw new Error(`bench linalg: n = ${n}: eigenvalues differ from numpy by ${gap}`);
      }
      const row = (name: string, ours: number, reference: number | null, target: string): BenchRow => ({
        name,
        ours,
        reference,
        unit: 'solves/s',
        ratio: reference === null ? null : ours / reference,
        target,
      });
      const words = min >= 1 ? `>= ${min}x numpy eigh` : `>= 1/${Math.round(1 / min)}x numpy eigh (time within ${Math.round(1 / min)}x)`;
      rows.push(row(`eigh n=${n} (values + vectors)`, oursVectors, numpy?.eigh ?? null, words));
      rows.push(row(`eigvalsh n=${n} (values only)`, oursValues, numpy?.eigvalsh ?? null, 'none (for information)'));
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
  return rows;
}

if (import.meta.url === pathToFileURL(process.argv[1]).href) {
  console.log(formatTable(await benchLinalg()));
}
