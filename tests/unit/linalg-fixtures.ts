/**
 * Test matrices and gauge-free checks for the linalg tests. Matrices are built here with plain
 * loops (modified Gram–Schmidt for unitaries), independently of the code under test.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

export const EPS = 2 ** -52;

/** Deterministic uniform numbers in [-1, 1) (mulberry32). */
export function uniform(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 2 ** 31 - 1;
  };
}

export function randomHermitian(n: number, next: () => number): Float64Array {
  const h = new Float64Array(2 * n * n);
  for (let i = 0; i < n; i++) {
    for (let j = i; j < n; j++) {
      const re = next();
      const im = i === j ? 0 : next();
      h[2 * (i * n + j)] = re;
      h[2 * (i * n + j) + 1] = im;
      h[2 * (j * n + i)] = re;
      h[2 * (j * n + i) + 1] = -im;
    }
  }
  return h;
}

/** A random complex skew-symmetric n x n matrix (the input of a Pfaffian). */
export function randomSkew(n: number, next: () => number): Float64Array {
  const a = new Float64Array(2 * n * n);
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      const re = next(), im = next();
      a[2 * (i * n + j)] = re;
      a[2 * (i * n + j) + 1] = im;
      a[2 * (j * n + i)] = -re;
      a[2 * (j * n + i) + 1] = -im;
    }
  }
  return a;
}

/** A random unitary: modified Gram–Schmidt (twice) on the columns of a random complex matrix. */
export function randomUnitary(n: number, next: () => number): Float64Array {
  const u = new Float64Array(2 * n * n).map(() => next());
  for (let pass = 0; pass < 2; pass++) {
    for (let c = 0; c < n; c++) {
      for (let p = 0; p < c; p++) {
        let sr = 0;
        let si = 0;
        for (let i = 0; i < n; i++) {
          const ar = u[2 * (i * n + p)], ai = u[2 * (i * n + p) + 1];
          const br = u[2 * (i * n + c)], bi = u[2 * (i * n + c) + 1];
          sr += ar * br + ai * bi;
          si += ar * bi - ai * br;
        }
        for (let i = 0; i < n; i++) {
          const ar = u[2 * (i * n + p)], ai = u[2 * (i * n + p) + 1];
          u[2 * (i * n + c)] -= sr * ar - si * ai;
          u[2 * (i * n + c) + 1] -= sr * ai + si * ar;
        }
      }
      let norm = 0;
      for (let i = 0; i < n; i++) norm += u[2 * (i * n + c)] ** 2 + u[2 * (i * n + c) + 1] ** 2;
      norm = Math.sqrt(norm);
      for (let i = 0; i < n; i++) {
        u[2 * (i * n + c)] /= norm;
        u[2 * (i * n + c) + 1] /= norm;
      }
    }
  }
  return u;
}

/** U diag(d) U^dagger for complex d given as (re, im) pairs (real d: im = 0). */
export function withSpectrum(u: Float64Array, n: number, dRe: ArrayLike<number>, dIm?: ArrayLike<number>): Float64Array {
  const h = new Float64Array(2 * n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      let re = 0;
      let im = 0;
      for (let k = 0; k < n; k++) {
        const ar = u[2 * (i * n + k)], ai = u[2 * (i * n + k) + 1];
        const br = u[2 * (j * n + k)], bi = -u[2 * (j * n + k) + 1];
        const er = dRe[k], ei = dIm === undefined ? 0 : dIm[k];
        const xr = ar * er - ai * ei, xi = ar * ei + ai * er;
        re += xr * br - xi * bi;
        im += xr * bi + xi * br;
      }
      h[2 * (i * n + j)] = re;
      h[2 * (i * n + j) + 1] = im;
    }
  }
  // Exactly Hermitian when d is real (average the two triangles).
  if (dIm === undefined) {
    for (let i = 0; i < n; i++) {
      h[2 * (i * n + i) + 1] = 0;
      for (let j = i + 1; j < n; j++) {
        const re = 0.5 * (h[2 * (i * n + j)] + h[2 * (j * n + i)]);
        const im = 0.5 * (h[2 * (i * n + j) + 1] - h[2 * (j * n + i) + 1]);
        h[2 * (i * n + j)] = h[2 * (j * n + i)] = re;
        h[2 * (i * n + j) + 1] = im;
        h[2 * (j * n + i) + 1] = -im;
      }
    }
  }
  return h;
}

/**
 * A Hermitian H commuting with the antiunitary T = (i sigma_y (x) 1) K, T^2 = -1: H = [[A, B],
 * [-conj B, conj A]] with A Hermitian and B antisymmetric. Every eigenvalue is doubly degenerate
 * (Kramers' theorem; e.g. Sakurai, Modern Quantum Mechanics, sec. 4.4).
 */
export function kramersHermitian(half: number, next: () => number): Float64Array {
  const n = 2 * half;
  const a = randomHermitian(half, next);
  const b = randomSkew(half, next);
  const h = new Float64Array(2 * n * n);
  const set = (i: number, j: number, re: number, im: number): void => {
    h[2 * (i * n + j)] = re;
    h[2 * (i * n + j) + 1] = im;
  };
  for (let i = 0; i < half; i++) {
    for (let j = 0; j < half; j++) {
      const ar = a[2 * (i * half + j)], ai = a[2 * (i * half + j) + 1];
      const br = b[2 * (i * half + j)], bi = b[2 * (i * half + j) + 1];
      set(i, j, ar, ai);
      set(i + half, j + half, ar, -ai);
      set(i, j + half, br, bi);
      set(i + half, j, -br, bi);
    }
  }
  return h;
}

/** max |(H v_c - w_c v_c)_i| over all columns c, relative to max |H_ij|. */
export function residual(n: number, h: Float64Array, w: Float64Array, v: Float64Array): number {
  let worst = 0;
  let norm = 0;
  for (let i = 0; i < 2 * n * n; i++) norm = Math.max(norm, Math.abs(h[i]));
  for (let c = 0; c < n; c++) {
    for (let i = 0; i < n; i++) {
      let re = -w[c] * v[2 * (i * n + c)];
      let im = -w[c] * v[2 * (i * n + c) + 1];
      for (let k = 0; k < n; k++) {
        const hr = h[2 * (i * n + k)], hi = h[2 * (i * n + k) + 1];
        const vr = v[2 * (k * n + c)], vi = v[2 * (k * n + c) + 1];
        re += hr * vr - hi * vi;
        im += hr * vi + hi * vr;
      }
      worst = Math.max(worst, Math.hypot(re, im));
    }
  }
  return norm === 0 ? worst : worst / norm;
}

/** max |(V^dagger V - 1)_ij|. */
export function orthonormalityError(n: number, v: Float64Array): number {
  let worst = 0;
  for (let a = 0; a < n; a++) {
    for (let b = a; b < n; b++) {
      let re = a === b ? -1 : 0;
      let im = 0;
      for (let k = 0; k < n; k++) {
        const ar = v[2 * (k * n + a)], ai = v[2 * (k * n + a) + 1];
        const br = v[2 * (k * n + b)], bi = v[2 * (k * n + b) + 1];
        re += ar * br + ai * bi;
        im += ar * bi - ai * br;
      }
      worst = Math.max(worst, Math.hypot(re, im));
    }
  }
  return worst;
}

export const PYTHON = '/usr/bin/python3';

/**
 * Run `code` under Debian's numpy with `inp` (a dict of the given arrays as complex numpy arrays
 * of the given shapes) defined; the code assigns `out` (anything JSON-serialisable).
 */
export function numpy<T>(code: string, inputs: Record<string, { data: Float64Array; shape: number[]; complex: boolean }>): T {
  const dir = mkdtempSync(join(tmpdir(), 'chernel-linalg-'));
  try {
    const inFile = join(dir, 'in.json');
    const outFile = join(dir, 'out.json');
    const payload: Record<string, { data: number[]; shape: number[]; complex: boolean }> = {};
    for (const [k, v] of Object.entries(inputs)) payload[k] = { data: Array.from(v.data), shape: v.shape, complex: v.complex };
    writeFileSync(inFile, JSON.stringify(payload));
    const prelude = [
      'import json, sys',
      'import numpy as np',
      'raw = json.load(open(sys.argv[1]))',
      'inp = {}',
      'for k, v in raw.items():',
      '    a = np.array(v["data"], dtype=float)',
      '    inp[k] = (a[0::2] + 1j * a[1::2]).reshape(v["shape"]) if v["complex"] else a.reshape(v["shape"])',
    ].join('\n');
    const script = `${prelude}\n${code}\njson.dump(out, open(sys.argv[2], "w"))\n`;
    const run = spawnSync(PYTHON, ['-c', script, inFile, outFile], {
      encoding: 'utf8',
      env: { ...process.env, OPENBLAS_NUM_THREADS: '1' },
    });
    if (run.status !== 0) throw new Error(`numpy script failed: ${run.stderr}`);
    return JSON.parse(readFileSync(outFile, 'utf8')) as T;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
