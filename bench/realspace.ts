/**
 * Real-space invariants against numpy/scipy (Debian's /usr/bin/python3) running the same algorithms
 * on the same data in the same run, single-threaded (OPENBLAS_NUM_THREADS=1), both sides pinned to
 * the same CPU (`sameCpu`, bench/linalg.ts), CPU time on both sides, best of the rounds:
 * - the dense Hermitian eigensolver with vectors at n = 512, 1024, 2048 vs numpy.linalg.eigh;
 * - the Bott index of a clean 30x30 Qi–Wu–Zhang flake (1800 orbitals): dense H, eigh, compressed
 *   position unitaries, eigenvalues of v u v^dagger u^dagger (numpy: eigvals);
 * - the local Chern marker by the Chebyshev recursion at the centre of a 300x300 QWZ sample
 *   (180 000 orbitals, order 1000) vs the same recursion with scipy.sparse, and the memory held.
 * Standalone: `node --import ./scripts/register-ts.js bench/realspace.ts`.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { blochHamiltonian } from '../src/bloch/hamiltonian.js';
import { HermitianEigensolver } from '../src/linalg/eigh.js';
import { qwz } from '../src/model/catalogue.js';
import { bottOfSample } from '../src/realspace/bott.js';
import { ChebyshevBatch, chebyshevScaling } from '../src/realspace/kpm.js';
import { chebyshevMarkerOfSample } from '../src/realspace/kpm-marker.js';
import { buildSample, type Sample } from '../src/realspace/sample.js';
import { randomHermitian, uniform } from '../tests/unit/linalg-fixtures.js';
import { sameCpu } from './linalg.js';
import { formatTable, type BenchRow } from './table.js';

const PYTHON = '/usr/bin/python3';
const TASKSET = '/usr/bin/taskset';
const EIGH_SIZES = [512, 1024, 2048];
const ROUNDS = 2;
const ORDER = 1000;

const REFERENCE = String.raw`
import json, sys, time
import numpy as np
import scipy.sparse as sp
job = json.load(open(sys.argv[1]))
out = {}
def best(f, rounds):
    t = float('inf'); r = None
    for _ in range(rounds):
        t0 = time.process_time(); r = f(); t = min(t, time.process_time() - t0)
    return t, r
for n in job['eigh']:
    h = np.fromfile(job['dir'] + f'/h{n}.bin', dtype=np.complex128).reshape(n, n)
    out[f'eigh{n}'], _ = best(lambda: np.linalg.eigh(h), job['rounds'])
def csr(prefix, n):
    data = np.fromfile(prefix + 'values.bin', dtype=np.complex128)
    cols = np.fromfile(prefix + 'columns.bin', dtype=np.int32)
    rows = np.fromfile(prefix + 'rows.bin', dtype=np.int32)
    return sp.csr_matrix((data, cols, rows), shape=(n, n))
b = job['bott']
H = csr(job['dir'] + '/bott-', b['n']); pos = np.fromfile(job['dir'] + '/bott-pos.bin').reshape(b['n'], 2)
def bott():
    E, W = np.linalg.eigh(H.toarray())
    m = b['n'] // 2
    psi = W[:, :m]
    eu = np.exp(2j * np.pi * pos[:, 0] / b['L1']); ev = np.exp(2j * np.pi * pos[:, 1] / b['L2'])
    u = psi.conj().T @ (eu[:, None] * psi); v = psi.conj().T @ (ev[:, None] * psi)
    lam = np.linalg.eigvals(v @ u @ v.conj().T @ u.conj().T)
    return float(np.sum(np.angle(lam)) / (2 * np.pi))
out['bott'], out['bottValue'] = best(bott, job['rounds'])
k = job['kpm']
n = k['n']
H = csr(job['dir'] + '/kpm-', n); pos = np.fromfile(job['dir'] + '/kpm-pos.bin').reshape(n, 2)
c, a, N = k['centre'], k['halfWidth'], k['order']
Hs = ((H - c * sp.identity(n, dtype=complex, format='csr')) / a).tocsr()
def jackson(N):
    q = np.pi / (N + 1); nn = np.arange(N)
    return ((N - nn + 1) * np.cos(q * nn) + np.sin(q * nn) / np.tan(q)) / (N + 1)
def step(xF, N):
    phi = np.arccos(xF); nn = np.arange(1, N)
    co = np.empty(N); co[0] = 1 - phi / np.pi; co[1:] = -2 * np.sin(nn * phi) / (nn * np.pi)
    return co * jackson(N)
def apply(sets, v):
    order = max(len(s) for s in sets)
    outs = [s[0] * v for s in sets]
    prev = v; cur = Hs @ v
    for o, s in zip(outs, sets): o += s[1] * cur
    for m in range(2, order):
        nxt = 2 * (Hs @ cur) - prev
        for o, s in zip(outs, sets):
            if m < len(s): o += s[m] * nxt
        prev, cur = cur, nxt
    return outs
x, y = pos[:, 0], pos[:, 1]
def marker_of(av, co):
    ya = y * av
    pya, = apply([co], ya)
    return -4 * np.pi * np.imag(np.vdot(x * av, ya - pya))
def marker():
    xF = (k['fermiEnergy'] - c) / a
    full, half = step(xF, N), step(xF, max(2, N // 2))
    total = 0.0
    for r in k['orbitals']:
        e = np.zeros(n, complex); e[r] = 1
        af, ah = apply([full, half], e)
        total += marker_of(af, full); marker_of(ah, half)
    return float(total)
out['kpm'], out['kpmValue'] = best(marker, 1)
out['kpmBytes'] = int(H.data.nbytes + H.indices.nbytes + H.indptr.nbytes + pos.nbytes + 8 * 16 * n)
print(json.dumps(out))
`;

function cpuSeconds<T>(f: () => T): { seconds: number; value: T } {
  const t0 = process.cpuUsage();
  const value = f();
  const used = process.cpuUsage(t0);
  return { seconds: (used.user + used.system) / 1e6, value };
}

function bestOf<T>(rounds: number, f: () => T): { seconds: number; value: T } {
  let best = cpuSeconds(f);
  for (let r = 1; r < rounds; r++) {
    const next = cpuSeconds(f);
    if (next.seconds < best.seconds) best = next;
  }
  return best;
}

function writeSample(dir: string, prefix: string, s: Sample): void {
  const h = s.hamiltonian;
  const bytes = (a: Float64Array | Int32Array) => new Uint8Array(a.buffer, a.byteOffset, a.byteLength);
  writeFileSync(join(dir, `${prefix}values.bin`), bytes(h.values));
  writeFileSync(join(dir, `${prefix}columns.bin`), bytes(h.columns));
  writeFileSync(join(dir, `${prefix}rows.bin`), bytes(h.rowStart));
  writeFileSync(join(dir, `${prefix}pos.bin`), bytes(s.positions));
}

/**
 * Bytes our Chebyshev marker holds: the CSR matrix, positions, cells, its eight vectors and the
 * batch's memory (a copy of the matrix and sixteen vectors, src/realspace/kpm.ts).
 */
function kpmBytes(s: Sample): number {
  const h = s.hamiltonian;
  return h.values.byteLength + h.columns.byteLength + h.rowStart.byteLength + s.positions.byteLength + s.cells.byteLength + s.orbitals.byteLength + s.spin.byteLength + 8 * 16 * s.size + ChebyshevBatch.bytes(s.size, h.rowStart[s.size]);
}

export function benchRealspace(): Promise<BenchRow[]> {
  return sameCpu(async (cpu) => run(cpu));
}

async function run(cpu: string | null): Promise<BenchRow[]> {
  const dir = mkdtempSync(join(tmpdir(), 'chernel-bench-realspace-'));
  const rows: BenchRow[] = [];
  try {
    const ours: Record<string, number> = {};
    for (const n of EIGH_SIZES) {
      const h = randomHermitian(n, uniform(5000 + n));
      writeFileSync(join(dir, `h${n}.bin`), new Uint8Array(h.buffer, h.byteOffset, h.byteLength));
      const solver = new HermitianEigensolver(n);
      const w = new Float64Array(n), v = new Float64Array(2 * n * n);
      ours[`eigh${n}`] = bestOf(ROUNDS, () => solver.solve(h, w, v)).seconds;
    }
    const model = blochHamiltonian(qwz(), { u: -1 });
    const flake = buildSample(model, { sizes: [30, 30] });
    writeSample(dir, 'bott-', flake);
    const bott = bestOf(ROUNDS, () => bottOfSample(flake));
    ours.bott = bott.seconds;
    const built = cpuSeconds(() => buildSample(model, { sizes: [300, 300] }));
    const big = built.value;
    writeSample(dir, 'kpm-', big);
    const centre = [150, 150];
    const orbitals: number[] = [];
    for (let i = 0; i < big.size; i++) if (big.cells[2 * i] === centre[0] && big.cells[2 * i + 1] === centre[1]) orbitals.push(i);
    const marker = cpuSeconds(() => chebyshevMarkerOfSample(big, 0, 'given', ORDER, [centre]));
    ours.kpm = marker.seconds;
    const scaling = chebyshevScaling(big.hamiltonian);

    let theirs: Record<string, number> | null = null;
    if (existsSync(PYTHON)) {
      const job = join(dir, 'job.json');
      writeFileSync(job, JSON.stringify({
        dir, rounds: ROUNDS, eigh: EIGH_SIZES,
        bott: { n: flake.size, L1: 30, L2: 30 },
        kpm: { n: big.size, centre: scaling.centre, halfWidth: scaling.halfWidth, order: ORDER, fermiEnergy: 0, orbitals },
      }));
      const env = { ...process.env, OPENBLAS_NUM_THREADS: '1', OMP_NUM_THREADS: '1', MKL_NUM_THREADS: '1' };
      const args = [PYTHON, '-c', REFERENCE, job];
      const py = cpu === null ? spawnSync(PYTHON, args.slice(1), { env, encoding: 'utf8' }) : spawnSync(TASKSET, ['-c', cpu, ...args], { env, encoding: 'utf8' });
      if (py.status !== 0) throw new Error(`bench realspace: numpy side failed: ${py.stderr}`);
      theirs = JSON.parse(py.stdout) as Record<string, number>;
      // Same work on both sides, or the ratio means nothing.
      if (Math.abs(theirs.bottValue - bott.value.raw!) > 1e-6) throw new Error(`bench realspace: Bott ${bott.value.raw} vs numpy ${theirs.bottValue}`);
      if (Math.abs(theirs.kpmValue - marker.value.marker[0]) > 1e-8) throw new Error(`bench realspace: marker ${marker.value.marker[0]} vs scipy ${theirs.kpmValue}`);
    }
    const row = (name: string, key: string, target: string): BenchRow => {
      const reference = theirs === null ? null : theirs[key];
      return { name, ours: ours[key], reference, unit: 'CPU s', ratio: reference === null ? null : reference / ours[key], target };
    };
    for (const n of EIGH_SIZES) rows.push(row(`eigh n=${n} (values + vectors), dense real-space path`, `eigh${n}`, '>= 0.8x numpy eigh (report only here)'));
    rows.push(row(`Bott index, clean 30x30 QWZ flake (${flake.size} orbitals), value ${bott.value.bott}`, 'bott', '>= 1x numpy, same algorithm'));
    rows.push(row(`local Chern marker by Chebyshev, centre of 300x300 QWZ (${big.size} orbitals, order ${ORDER}), value ${marker.value.marker[0].toFixed(6)}`, 'kpm', '>= 1x scipy.sparse, same recursion'));
    const mib = 2 ** 20;
    rows.push({ name: `memory held by the Chebyshev marker (${big.size} orbitals)`, ours: kpmBytes(big) / mib, reference: theirs === null ? null : theirs.kpmBytes / mib, unit: 'MiB', ratio: theirs === null ? null : theirs.kpmBytes / kpmBytes(big), target: 'linear in the sample' });
    rows.push({ name: `building the 300x300 sample (${big.size} orbitals, CSR)`, ours: built.seconds, reference: null, unit: 'CPU s', ratio: null, target: 'none (for information)' });
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
  return rows;
}

if (import.meta.url === pathToFileURL(process.argv[1]).href) {
  console.log(formatTable(await benchRealspace()));
}
