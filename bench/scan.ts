/**
 * Phase-diagram throughput: a 64 x 64 map of the lower band's Chern number of a two-parameter
 * Qi–Wu–Zhang model, H = sin kx sx + sin ky sy + (u + cos kx + b cos ky) sz, each point by
 * Fukui–Hatsugai–Suzuki links on a 24 x 24 k-grid.
 *  - ours (one thread) beside the same computation vectorised in numpy (Debian's /usr/bin/python3,
 *    OPENBLAS_NUM_THREADS=1, batched eigh and link products), both as process CPU time (the machine
 *    is shared, so wall time would measure the neighbours); the two maps must agree point for point;
 *  - the sweep on 2 worker threads against 1 worker thread, wall time (pools started before timing;
 *    meaningful only when two cores are actually free);
 *  - the same for a disorder ensemble: the Bott index of QWZ at u = -1 averaged over seeded samples
 *    of an open flake, over an axis of the onsite disorder W (each point keeps its standard error).
 *    Scaled down from 64 seeds x 32 W on a 24 x 24 flake (about 1.5 h on one core here) to
 *    16 seeds x 32 W on 10 x 10, so the row takes well under a minute.
 * Standalone: `node --import ./scripts/register-ts.js bench/scan.ts`.
 */
import { execFileSync } from 'node:child_process';
import { pathToFileURL } from 'node:url';
import { lattice } from '../src/model/builder.js';
import { qwz } from '../src/model/catalogue.js';
import type { ModelSpec } from '../src/model/spec.js';
import { NodeWorkerExecutor } from '../cluster/node-workers.js';
import { pointFunction } from '../src/scan/point.js';
import { phaseMapSync, runPhaseMap } from '../src/scan/run.js';
import type { PhaseMapRequest } from '../src/scan/sweep.js';
import { formatTable, type BenchRow } from './table.js';

const N = 64;
const K = 24;
const U = { from: -3, to: 3 };
const B = { from: -1.9, to: 2.1 }; // offset so no grid point sits exactly on a gap closing u ± 1 ± b = 0

function twoParameterQwz(): ModelSpec {
  return lattice('QWZ with anisotropy b', [[1, 0], [0, 1]])
    .parameter('u', { default: -1 })
    .parameter('b', { default: 1 })
    .site('a', [0, 0]).site('c', [0, 0]).block('s', ['a', 'c'])
    .onsiteMatrix('s', { z: 'u' })
    .harmonic('s', [1, 0], { cos: { z: 1 }, sin: { x: 1 } })
    .harmonic('s', [0, 1], { cos: { z: 'b' }, sin: { y: 1 } })
    .build();
}

const NUMPY = String.raw`
import json, sys, time
import numpy as np
N, K = ${N}, ${K}
u = np.linspace(${U.from}, ${U.to}, N)
b = np.linspace(${B.from}, ${B.to}, N)
k = -np.pi + 2 * np.pi * np.arange(K) / K
sx = np.array([[0, 1], [1, 0]], complex); sy = np.array([[0, -1j], [1j, 0]]); sz = np.diag([1.0, -1.0]).astype(complex)

def chern_row(ui):
    # All b values and k points of one u at once: shape (N, K, K, 2, 2).
    kx = k[None, :, None]; ky = k[None, None, :]
    dz = ui + np.cos(kx) + b[:, None, None] * np.cos(ky)
    h = (np.sin(kx)[..., None, None] * sx + np.sin(ky)[..., None, None] * sy) + dz[..., None, None] * sz
    h = np.broadcast_to(h, (N, K, K, 2, 2))
    w, v = np.linalg.eigh(h)
    gap = (w[..., 1] - w[..., 0]).min(axis=(1, 2))
    low = v[..., :, 0]
    u1 = np.sum(low.conj() * np.roll(low, -1, axis=1), axis=-1)
    u2 = np.sum(low.conj() * np.roll(low, -1, axis=2), axis=-1)
    plaquette = u1 * np.roll(u2, -1, axis=1) * np.roll(u1, -1, axis=2).conj() * u2.conj()
    flux = -np.angle(plaquette).sum(axis=(1, 2)) / (2 * np.pi)
    return np.rint(flux), gap

def run():
    rows = [chern_row(ui) for ui in u]
    return np.stack([r[0] for r in rows], axis=1), np.stack([r[1] for r in rows], axis=1)

best = float('inf')
for _ in range(3):
    t = time.process_time(); chern, gap = run(); best = min(best, time.process_time() - t)
# chern[j, i] is at (u_i, b_j): the row-major layout of the phase map's values.
print(json.dumps({'seconds': best, 'chern': chern.astype(int).ravel().tolist(), 'minGap': float(gap.min())}))
`;

function request(): PhaseMapRequest {
  return {
    kind: 'phase-map', model: twoParameterQwz(), quantity: 'chern', grid: K,
    axes: [{ param: 'u', ...U, count: N }, { param: 'b', ...B, count: N }],
  };
}

/** The disorder-ensemble row's map (scaled down from the 64 seeds x 32 W on 24 x 24; see the top). */
function ensembleRequest(): PhaseMapRequest {
  return {
    kind: 'phase-map', model: qwz(), params: { u: -1 }, quantity: 'ensemble', of: 'bott', samples: 16, sizes: [10, 10], seed: 1,
    axes: [{ param: 'onsiteDisorder', from: 0, to: 8, count: 32 }],
  };
}

/** Best of `rounds`, in wall seconds or in this process's CPU seconds. */
async function seconds(run: () => unknown | Promise<unknown>, rounds: number, clock: 'wall' | 'cpu' = 'wall'): Promise<number> {
  const now = () => (clock === 'wall' ? performance.now() / 1000 : (process.cpuUsage().user + process.cpuUsage().system) / 1e6);
  let best = Infinity;
  for (let r = 0; r < rounds; r++) {
    const t = now();
    await run();
    best = Math.min(best, now() - t);
  }
  return best;
}

export async function benchScan(): Promise<BenchRow[]> {
  const rows: BenchRow[] = [];
  const req = request();
  const ours = phaseMapSync(req, pointFunction);
  const oursSeconds = await seconds(() => phaseMapSync(req, pointFunction), 3, 'cpu');
  let numpy: { seconds: number; chern: number[] } | null = null;
  try {
    numpy = JSON.parse(execFileSync('/usr/bin/python3', ['-c', NUMPY], { env: { ...process.env, OPENBLAS_NUM_THREADS: '1' }, maxBuffer: 1 << 26 }).toString());
  } catch (err) {
    process.stderr.write(`bench scan: numpy reference unavailable: ${(err as Error).message}\n`);
  }
  if (numpy !== null) {
    const differ = ours.values.findIndex((v, n) => v !== numpy!.chern[n]);
    if (differ >= 0) throw new Error(`ours and numpy disagree at point ${differ}: ${ours.values[differ]} vs ${numpy.chern[differ]}`);
  }
  rows.push({
    name: `phase map ${N}x${N}, QWZ Chern on ${K}x${K} k (1 thread)`,
    ours: oursSeconds, reference: numpy?.seconds ?? null, unit: 's CPU',
    ratio: numpy === null ? null : numpy.seconds / oursSeconds, target: '>= 3x numpy (vectorised)',
  });

  const one = new NodeWorkerExecutor({ workers: 1 });
  const two = new NodeWorkerExecutor({ workers: 2 });
  try {
    const warm: PhaseMapRequest = { ...req, axes: [{ param: 'u', from: -1, to: 1, count: 4 }] };
    await runPhaseMap(warm, { executor: one });
    await runPhaseMap(warm, { executor: two });
    const t1 = await seconds(() => runPhaseMap(req, { executor: one }), 2);
    const t2 = await seconds(() => runPhaseMap(req, { executor: two }), 2);
    rows.push({ name: `phase map ${N}x${N}, 2 worker threads vs 1`, ours: t2, reference: t1, unit: 's', ratio: t1 / t2, target: '>= 1.8x' });

    const ens = ensembleRequest();
    // Each worker compiles the real-space kernels once, before the clock.
    const warmEnsemble: PhaseMapRequest = { ...ens, samples: 1, axes: [{ ...ens.axes[0], count: 4 }] };
    await runPhaseMap(warmEnsemble, { executor: one });
    await runPhaseMap(warmEnsemble, { executor: two });
    const e1 = await seconds(() => runPhaseMap(ens, { executor: one }), 2);
    const e2 = await seconds(() => runPhaseMap(ens, { executor: two }), 2);
    const ensAxis = ens.axes[0];
    rows.push({
      name: `disorder ensemble map: ${ens.samples} seeds x ${ensAxis.count} W on a ${(ens.sizes as number[]).join('x')} flake, Bott (QWZ), 2 worker threads vs 1`,
      ours: e2, reference: e1, unit: 's', ratio: e1 / e2, target: '>= 1.8x',
    });
  } finally {
    await Promise.all([one.close(), two.close()]);
  }
  return rows;
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  console.log(formatTable(await benchScan()));
}
