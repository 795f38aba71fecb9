/**
 * Topology throughput against a vectorised numpy implementation of the same computation (batched
 * eigh, einsum overlaps, OPENBLAS_NUM_THREADS=1), run in the same bench:
 * - the Fukui–Hatsugai–Suzuki Chern number of the Haldane model on a 300 x 300 grid;
 * - the Wannier-centre flow of the Kane–Mele model on 101 x 101 (Wilson loops along k2).
 * Both sides build H(k) from the same numeric term list; timings are the best of several runs and
 * exclude process start-up. Standalone: `node --import ./scripts/register-ts.js bench/topology.ts`.
 */
import { execFileSync } from 'node:child_process';
import { pathToFileURL } from 'node:url';
import { BlochHamiltonian } from '../src/bloch/hamiltonian.js';
import { compileAmplitude } from '../src/model/expressions.js';
import { haldane, kaneMele } from '../src/model/catalogue.js';
import type { ModelSpec, ParameterValues } from '../src/model/spec.js';
import { chernNumber } from '../src/topology/chern.js';
import { wannierFlow } from '../src/topology/wilson.js';
import { formatTable, type BenchRow } from './table.js';

const PYTHON = '/usr/bin/python3';
/** Timed runs (best taken) after WARMUP untimed ones that let the JIT settle. */
const RUNS = 5;
const WARMUP = 3;

/** The model as numbers: [from, to, cell, re, im, onsite] per term, for the numpy side. */
function numericTerms(spec: ModelSpec, params: ParameterValues): { n: number; terms: [number, number, number[], number, number, boolean][] } {
  const h = new BlochHamiltonian(spec, params);
  const index = new Map(spec.orbitals.map((o, i) => [o.label, i]));
  const names = new Set(Object.keys(spec.parameters));
  const out = new Float64Array(2);
  const terms = spec.terms.map((t, i): [number, number, number[], number, number, boolean] => {
    compileAmplitude(t.amplitude, `terms[${i}]`, names)(h.params, out, 0);
    const a = index.get(t.from)!, b = index.get(t.to)!;
    return [a, b, t.cell, out[0], out[1], a === b && t.cell.every((c) => c === 0)];
  });
  return { n: spec.orbitals.length, terms };
}

const NUMPY = String.raw`
import json, sys, time
import numpy as np
job = json.loads(sys.stdin.read())
n, terms = job["n"], job["terms"]

def hamiltonians(K):
    H = np.zeros(K.shape[:-1] + (n, n), complex)
    for a, b, cell, re, im, onsite in terms:
        # <R,b|H|0,a> = t gives H_ba(k) += t e^{-ik.R} (DEVELOPERS.md conventions)
        ph = (re + 1j * im) * np.exp(-1j * (K @ np.array(cell, float)))
        H[..., b, a] += ph
        if not onsite:
            H[..., a, b] += ph.conj()
    return H

def chern(N, m):
    k = -np.pi + 2 * np.pi * np.arange(N) / N
    K = np.stack(np.meshgrid(k, k, indexing="ij"), -1)
    _, v = np.linalg.eigh(hamiltonians(K))
    u = v[..., :m]
    U1 = np.linalg.det(np.einsum("abim,abin->abmn", u.conj(), np.roll(u, -1, axis=0)))
    U2 = np.linalg.det(np.einsum("abim,abin->abmn", u.conj(), np.roll(u, -1, axis=1)))
    F = np.angle(U1 * np.roll(U2, -1, axis=0) * np.roll(U1, -1, axis=1).conj() * U2.conj())
    return float(-F.sum() / (2 * np.pi))

def flow(n_along, n_across, m):
    k1 = -np.pi + 2 * np.pi * np.arange(n_across + 1) / n_across
    k2 = -np.pi + 2 * np.pi * np.arange(n_along) / n_along
    K = np.stack(np.meshgrid(k1, k2, indexing="ij"), -1)
    _, v = np.linalg.eigh(hamiltonians(K))
    u = v[..., :m]
    M = np.einsum("abim,abin->abmn", u.conj(), np.roll(u, -1, axis=1))
    W = np.broadcast_to(np.eye(m, dtype=complex), (n_across + 1, m, m)).copy()
    for j in range(n_along):
        W = W @ M[:, j]
    centres = np.sort(np.mod(-np.angle(np.linalg.eigvals(W)) / (2 * np.pi), 1.0), axis=1)
    return centres

best = float("inf")
for _ in range(job["runs"]):
    t0 = time.perf_counter()
    if job["what"] == "chern":
        value = chern(job["N"], job["m"])
    else:
        value = float(flow(job["N"], job["N"], job["m"]).sum())
    best = min(best, time.perf_counter() - t0)
print(json.dumps({"seconds": best, "value": value}))
`;

function numpy(job: object): { seconds: number; value: number } {
  const out = execFileSync(PYTHON, ['-c', NUMPY], { input: JSON.stringify(job), encoding: 'utf8', env: { ...process.env, OPENBLAS_NUM_THREADS: '1', OMP_NUM_THREADS: '1' }, maxBuffer: 1 << 24 });
  return JSON.parse(out) as { seconds: number; value: number };
}

function best(run: () => number): { seconds: number; value: number } {
  let seconds = Infinity;
  let value = 0;
  for (let i = 0; i < WARMUP; i++) value = run();
  for (let i = 0; i < RUNS; i++) {
    const t0 = performance.now();
    value = run();
    seconds = Math.min(seconds, (performance.now() - t0) / 1000);
  }
  return { seconds, value };
}

export async function benchTopology(): Promise<BenchRow[]> {
  const rows: BenchRow[] = [];

  const hp = { t1: 1, t2: 0.1, phi: Math.PI / 2, M: 0.2 };
  const hModel = new BlochHamiltonian(haldane(), hp);
  const ours = best(() => chernNumber(hModel, { grid: 300, bands: 1 }).flux ?? NaN);
  const ref = numpy({ what: 'chern', N: 300, m: 1, runs: RUNS, ...numericTerms(haldane(), hp) });
  if (Math.abs(ours.value - ref.value) > 1e-6) throw new Error(`Haldane Chern numbers disagree: ours ${ours.value}, numpy ${ref.value}`);
  rows.push({ name: 'Chern number, Haldane, FHS 300x300', ours: ours.seconds * 1000, reference: ref.seconds * 1000, unit: 'ms', ratio: ref.seconds / ours.seconds, target: '>= 3x numpy' });

  const kp = { t: 1, lambda_SO: 0.06, lambda_R: 0.05, lambda_v: 0.1 };
  const kModel = new BlochHamiltonian(kaneMele(), kp);
  const oursFlow = best(() => wannierFlow(kModel, { grid: [101, 101], bands: 2 }).centres.reduce((s, x) => s + x, 0));
  const refFlow = numpy({ what: 'flow', N: 101, m: 2, runs: RUNS, ...numericTerms(kaneMele(), kp) });
  if (Math.abs(oursFlow.value - refFlow.value) > 1e-6 * Math.max(1, Math.abs(refFlow.value))) {
    throw new Error(`Kane–Mele Wannier centres disagree: ours sum ${oursFlow.value}, numpy ${refFlow.value}`);
  }
  rows.push({ name: 'Wannier-centre flow, Kane–Mele, 101x101', ours: oursFlow.seconds * 1000, reference: refFlow.seconds * 1000, unit: 'ms', ratio: refFlow.seconds / oursFlow.seconds, target: '>= 3x numpy' });
  return rows;
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  console.log(formatTable(await benchTopology()));
}
