/**
 * Surface spectral function throughput against numpy: the edge spectral function of the Kane–Mele
 * model with Rashba coupling (4 orbitals per principal layer, no block structure), 257 k-points x
 * 256 energies, both terminations and the bulk, by the decimation of Lopez Sancho, Lopez Sancho &
 * Rubio (J. Phys. F 15, 851 (1985)). The reference is the same algorithm in numpy vectorised over
 * k (tests/reference/surface-numpy.ts), one BLAS thread, pinned to the CPU our thread runs on
 * (taskset), measured in the same run; both sides' results are compared before timing counts.
 * Standalone: `node --import ./scripts/register-ts.js bench/surface.ts`.
 */
import { existsSync } from 'node:fs';
import { pathToFileURL } from 'node:url';
import { BlochHamiltonian } from '../src/bloch/hamiltonian.js';
import { kaneMele, twoBandWeyl } from '../src/model/catalogue.js';
import { surfaceMap } from '../src/surface/fermi-map.js';
import { surfaceSpectrum } from '../src/surface/spectrum.js';
import { numpyDecimation, PYTHON } from '../tests/reference/surface-numpy.js';
import { sameCpu } from './linalg.js';
import { formatTable, type BenchRow } from './table.js';

const RUNS = 5;
const WARMUP = 2;

export function benchSurface(): Promise<BenchRow[]> {
  // Both sides on one CPU (bench/linalg.ts says why).
  return sameCpu(async (cpu) => {
    const h = new BlochHamiltonian(kaneMele(), { t: 1, lambda_SO: 0.06, lambda_R: 0.05, lambda_v: 0.1 });
    const options = { cut: 1, nk: 256, energyCount: 256, eta: 0.01 };
    let result = surfaceSpectrum(h, options);
    for (let i = 1; i < WARMUP; i++) result = surfaceSpectrum(h, options);
    let ours = Infinity;
    for (let i = 0; i < RUNS; i++) {
      const t0 = performance.now();
      result = surfaceSpectrum(h, options);
      ours = Math.min(ours, (performance.now() - t0) / 1000);
    }
    const label = `Edge spectral function, Kane–Mele with Rashba (4 orbitals), ${result.path.count} k x ${result.energies.length} E, both edges + bulk`;
    if (!existsSync(PYTHON)) return [{ name: label, ours: ours * 1000, reference: null, unit: 'ms', ratio: null, target: '>= 2x numpy' }, mapRow()];
    const ref = numpyDecimation(h, {
      cut: 1, ks: Array.from(result.path.fractions, (f) => 2 * Math.PI * f), energies: Array.from(result.energies), eta: options.eta, runs: 3,
    }, cpu);
    let worst = 0, largest = 0;
    for (const side of ['bottom', 'top', 'bulk'] as const) {
      ref[side].forEach((x, i) => {
        worst = Math.max(worst, Math.abs(x - result[side][i]));
        largest = Math.max(largest, Math.abs(x));
      });
    }
    if (!(worst <= 1e-8 * largest)) throw new Error(`bench surface: ours and numpy differ by ${worst} (largest weight ${largest})`);
    return [{ name: label, ours: ours * 1000, reference: ref.seconds * 1000, unit: 'ms', ratio: ref.seconds / ours, target: '>= 2x numpy' }, mapRow()];
  });
}

/**
 * The engine's share of a constant-energy map widget step: the two-band Weyl model's (100) surface,
 * 128 x 128 k-points, one thread, with and without locating the Weyl nodes (no reference; the
 * widget's own target, p95 under 200 ms in Chromium on 2 workers, is measured by the widget bench).
 */
function mapRow(): BenchRow {
  const h = new BlochHamiltonian(twoBandWeyl(), {});
  const time = (nodes: boolean): number => {
    let best = Infinity;
    for (let i = 0; i < WARMUP + RUNS; i++) {
      const t0 = performance.now();
      surfaceMap(h, { cut: 0, grid: 128, energy: 0, eta: 0.02, nodes });
      if (i >= WARMUP) best = Math.min(best, performance.now() - t0);
    }
    return best;
  };
  const without = time(false), withNodes = time(true);
  return { name: `Constant-energy map, Weyl model (100) surface, 128x128, one thread (with the Weyl nodes located: ${withNodes.toFixed(0)} ms)`, ours: without, reference: null, unit: 'ms', ratio: null, target: 'engine share of a < 200 ms widget step' };
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  console.log(formatTable(await benchSurface()));
}
