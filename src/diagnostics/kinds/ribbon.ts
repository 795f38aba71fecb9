/** A ribbon (open along one direction) and its spectrum along the remaining one, with edge weights. */
import { count, denseBytes, solveSeconds } from '../../cost.js';
import { ribbonSpectrum, type RibbonSpectrumOptions, type RibbonSpectrumResult } from '../../spectra/ribbon.js';
import { optionNames, type Diagnostic } from '../diagnostic.js';

export const ribbon: Diagnostic<RibbonSpectrumOptions, RibbonSpectrumResult> = {
  kind: 'ribbon',
  options: optionNames<RibbonSpectrumOptions>({ direction: true, width: true, nk: true, edgeLayers: true, path: true }),
  run: ribbonSpectrum,
  cost(request, n, dim) {
    const big = n * count(request.width, 1);
    const nk = count(request.nk, dim === 1 ? 201 : 40 * 4);
    return { bytes: denseBytes(big) + nk * big * 16, seconds: nk * solveSeconds(big) };
  },
  sizeFields: () => ['width', 'nk'],
  headline: ['width', 'bandCount'],
};
