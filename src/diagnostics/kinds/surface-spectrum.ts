/** The spectral function of a semi-infinite sample's two terminations and of the bulk, along a surface k-path (Lopez Sancho decimation). */
import { surfaceSpectrum as spectrumAtSurface, surfaceSpectrumCost, type SurfaceSpectrumOptions, type SurfaceSpectrumResult } from '../../surface/spectrum.js';
import { optionNames, type Diagnostic } from '../diagnostic.js';

export const surfaceSpectrum: Diagnostic<SurfaceSpectrumOptions, SurfaceSpectrumResult> = {
  kind: 'surface-spectrum',
  options: optionNames<SurfaceSpectrumOptions>({ cut: true, energyRange: true, energyCount: true, nk: true, path: true, eta: true, tolerance: true, maxSteps: true }),
  run: spectrumAtSurface,
  cost: (request, n, dim) => surfaceSpectrumCost(n, request as Partial<SurfaceSpectrumOptions>, dim),
  sizeFields: () => ['nk', 'energyCount'],
  headline: ['boundary', 'eta'],
};
