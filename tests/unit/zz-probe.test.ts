import { it } from 'vitest';
import { BlochHamiltonian, ssh, kitaevChain, riceMele, weyl2band, cubicTI } from '../../src/index.js';
import { bulkBoundary } from '../../src/surface/bulk-boundary.js';
it('probe', () => {
  const show = (r: any) => console.log(r.verdict, '|', r.summary, '|', r.checks.warnings.join(' / '));
  for (const v of [0.5, 1.5]) show(bulkBoundary(new BlochHamiltonian(ssh(), { v, w: 1 }), { cut: 0 }));
  for (const mu of [0.5, 3]) show(bulkBoundary(new BlochHamiltonian(kitaevChain(), { mu }), { cut: 0 }));
  for (const u of [0, 0.2]) show(bulkBoundary(new BlochHamiltonian(riceMele(), { u }), { cut: 0 }));
  let t = Date.now();
  for (const M of [2, 6, 10, -1]) for (const cut of [2, 0, [1,1,0], [1,1,1]] as any[]) { show(bulkBoundary(new BlochHamiltonian(cubicTI(), { M }), { cut })); }
  console.log('ti ms', Date.now() - t); t = Date.now();
  for (const cut of [0, 1, 2] as any[]) show(bulkBoundary(new BlochHamiltonian(weyl2band(), {}), { cut, nk: 128 }));
  console.log('weyl ms', Date.now() - t);
});
