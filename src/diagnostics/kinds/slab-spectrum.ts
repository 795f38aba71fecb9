/** A slab (finite along one lattice direction) and its spectrum along the surface zone, with layer weights. */
import { slabSpectrum as spectrumOfSlab, slabSpectrumCost, type SlabSpectrumOptions, type SlabSpectrumResult } from '../../surface/slab.js';
import { optionNames, type Diagnostic } from '../diagnostic.js';

export const slabSpectrum: Diagnostic<SlabSpectrumOptions, SlabSpectrumResult> = {
  kind: 'slab-spectrum',
  options: optionNames<SlabSpectrumOptions>({ cut: true, width: true, nk: true, path: true }),
  run: spectrumOfSlab,
  cost: (request, n, dim) => slabSpectrumCost(n, request as Partial<SlabSpectrumOptions>, dim),
  sizeFields: () => ['width', 'nk'],
  headline: ['width', 'bandCount'],
};
