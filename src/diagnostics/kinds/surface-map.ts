/** A constant-energy map of a three-dimensional model's surfaces over the surface zone, with the projected Weyl nodes (Fermi arcs). */
import { surfaceMap as mapAtEnergy, surfaceMapCost, type SurfaceMapOptions, type SurfaceMapResult } from '../../surface/fermi-map.js';
import { optionNames, type Diagnostic } from '../diagnostic.js';

export const surfaceMap: Diagnostic<SurfaceMapOptions, SurfaceMapResult> = {
  kind: 'surface-map',
  options: optionNames<SurfaceMapOptions>({ cut: true, energy: true, grid: true, nodes: true, eta: true, tolerance: true, maxSteps: true }),
  run: mapAtEnergy,
  cost: (request, n) => surfaceMapCost(n, request as Partial<SurfaceMapOptions>),
  headline: ['energy', 'nodes'],
};
