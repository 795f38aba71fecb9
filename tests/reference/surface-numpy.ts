/**
 * A numpy reference of the Lopez Sancho–Lopez Sancho–Rubio decimation (J. Phys. F 15, 851 (1985)),
 * vectorised over k_par, written independently of the engine for the tests (surface.test.ts) and
 * the bench (bench/surface.ts). It builds H00 and H01 from the model's numeric terms itself, for a
 * cut that opens one periodic direction of a 2D model with hoppings reaching the next cell only.
 * Run with Debian's /usr/bin/python3 (python3-numpy), one BLAS thread.
 */
import { execFileSync } from 'node:child_process';
import type { BlochHamiltonian } from '../../src/bloch/hamiltonian.js';
import { DECIMATION_MAX_STEPS, DECIMATION_TOLERANCE } from '../../src/surface/decimation.js';

export const PYTHON = '/usr/bin/python3';

export const DECIMATION_PY = String.raw`
import json, sys, time
import numpy as np

def layers(job, ks):
    # <R,b|H|0,a> = t: H_ba += t e^{-ik.R} (DEVELOPERS.md). H00 = <0|H|0>, H01 = <0|H|1>.
    n, cut = job["n"], job["cut"]
    along = 1 - cut
    K = len(ks)
    H00 = np.zeros((K, n, n), complex)
    H01 = np.zeros((K, n, n), complex)
    for a, b, cell, re, im, onsite in job["terms"]:
        t = (re + 1j * im) * np.exp(-1j * ks * cell[along])
        L = cell[cut]
        if L == 0:
            H00[:, b, a] += t
            if not onsite:
                H00[:, a, b] += t.conj()
        elif L == 1:
            H01[:, a, b] += t.conj()
        elif L == -1:
            H01[:, b, a] += t
        else:
            raise SystemExit("reference handles hoppings to the next cell only")
    return H00, H01

def decimate(H00, H01, E, eta, tol, max_steps):
    n = H00.shape[-1]
    w = (E + 1j * eta) * np.eye(n)
    eps = H00.copy(); bottom = H00.copy(); top = H00.copy()
    a = H01.copy(); b = np.conj(np.swapaxes(H01, -1, -2))
    scale = np.maximum(np.abs(H00.real).max(axis=(1, 2)), np.abs(H00.imag).max(axis=(1, 2)))
    scale = np.maximum(scale, np.maximum(np.abs(H01.real).max(axis=(1, 2)), np.abs(H01.imag).max(axis=(1, 2))))
    for _ in range(max_steps):
        g = np.linalg.inv(w - eps)
        ag = a @ g; bg = b @ g
        agb = ag @ b; bga = bg @ a
        bottom += agb; top += bga; eps += agb + bga
        a = ag @ a; b = bg @ b
        big = np.maximum(np.maximum(np.abs(a.real), np.abs(a.imag)).max(axis=(1, 2)), np.maximum(np.abs(b.real), np.abs(b.imag)).max(axis=(1, 2)))
        if np.all(big <= tol * scale):
            break
    weight = lambda e: -np.trace(np.linalg.inv(w - e), axis1=1, axis2=2).imag / np.pi
    return weight(bottom), weight(top), weight(eps)

job = json.loads(sys.stdin.read())
ks = np.array(job["ks"], float)
energies = job["energies"]
best = float("inf")
for _ in range(job.get("runs", 1)):
    t0 = time.perf_counter()
    H00, H01 = layers(job, ks)
    out = np.zeros((3, len(ks), len(energies)))
    for e, E in enumerate(energies):
        out[0][:, e], out[1][:, e], out[2][:, e] = decimate(H00, H01, E, job["eta"], job["tol"], job["maxSteps"])
    best = min(best, time.perf_counter() - t0)
print(json.dumps({"seconds": best, "bottom": out[0].ravel().tolist(), "top": out[1].ravel().tolist(), "bulk": out[2].ravel().tolist()}))
`;

/** The model's terms at its current values, as the reference reads them. */
export function numericTerms(h: BlochHamiltonian): [number, number, number[], number, number, boolean][] {
  const t = h.hoppings();
  return Array.from({ length: t.count }, (_, i) => {
    const cell = Array.from(t.cells.subarray(i * t.cellDim, (i + 1) * t.cellDim));
    return [t.from[i], t.to[i], cell, t.re[i], t.im[i], t.from[i] === t.to[i] && cell.every((c) => c === 0)];
  });
}

export interface ReferenceSpectrum {
  seconds: number;
  bottom: number[];
  top: number[];
  bulk: number[];
}

/** Runs the reference: k-major weights like the engine's, and the best time of `runs`. */
export function numpyDecimation(h: BlochHamiltonian, job: { cut: number; ks: number[]; energies: number[]; eta: number; tol?: number; maxSteps?: number; runs?: number }, cpu: string | null = null): ReferenceSpectrum {
  const input = JSON.stringify({ n: h.size, terms: numericTerms(h), tol: DECIMATION_TOLERANCE, maxSteps: DECIMATION_MAX_STEPS, ...job });
  const env = { ...process.env, OPENBLAS_NUM_THREADS: '1', OMP_NUM_THREADS: '1' };
  const out = cpu === null
    ? execFileSync(PYTHON, ['-c', DECIMATION_PY], { input, encoding: 'utf8', env, maxBuffer: 1 << 28 })
    : execFileSync('/usr/bin/taskset', ['-c', cpu, PYTHON, '-c', DECIMATION_PY], { input, encoding: 'utf8', env, maxBuffer: 1 << 28 });
  return JSON.parse(out) as ReferenceSpectrum;
}
