/**
 * Density of states per unit cell against energy (src/spectra/dos.ts), with how it was computed:
 * linear interpolation on simplices (no broadening) or Gaussian broadening of a stated width.
 */
import type { ViewResult } from '../contract/protocol.js';
import { BASE_LAYOUT, fmt, numberArray, titled, type Figure, type Table } from './common.js';

function read(result: ViewResult): { energy: ArrayLike<number>; density: ArrayLike<number> } {
  const energy = numberArray(result, 'energy');
  const density = numberArray(result, 'density');
  if (energy.length !== density.length || energy.length === 0) throw new Error(`dos result: ${energy.length} energies for ${density.length} densities`);
  return { energy, density };
}

export function dosFigure(result: ViewResult): Figure {
  const { energy, density } = read(result);
  const method = result.method === 'gaussian' ? `Gaussian broadening ${fmt(Number(result.width))}` : 'linear on simplices, no broadening';
  const bands = typeof result.bandCount === 'number' ? result.bandCount : null;
  const summary = `${bands === null ? '' : `${bands} band${bands === 1 ? '' : 's'} · `}${method}`;
  return {
    data: [
      {
        type: 'scatter',
        mode: 'lines',
        x: Array.from(energy),
        y: Array.from(density),
        line: { color: '#1f4e9c', width: 1.8 },
        name: 'density of states',
        hovertemplate: 'E = %{x:.4f}<br>%{y:.4g} states per cell per energy<extra></extra>',
      },
    ],
    layout: {
      ...BASE_LAYOUT,
      title: titled(`Density of states — ${summary}`),
      xaxis: { title: { text: 'E' }, zeroline: false },
      yaxis: { title: { text: 'states per cell per unit energy' }, rangemode: 'tozero', zeroline: false },
    },
    summary,
    invariant: null,
    gapless: false,
  };
}

export function dosTable(result: ViewResult): Table {
  const { energy, density } = read(result);
  return { columns: ['energy', 'density'], rows: Array.from(energy, (e, i) => [e, density[i]]) };
}
