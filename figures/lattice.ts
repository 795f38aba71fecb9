/**
 * A model's lattice, a few cells of it, so a wrong hopping is seen before any invariant is
 * computed: sites coloured by orbital (orbitals at one place share a marker), every hopping as a
 * bond whose colour is the phase of its amplitude and whose width grows with its modulus, the
 * home cell's bonds drawn strongest, and the unit cell outlined. The kernel builds the picture's
 * data from the model (kernel/display/lattice.ts); this draws it.
 */
import type { Data } from './plotly-json.js';
import type { ViewResult } from '../contract/protocol.js';
import { BASE_LAYOUT, fmt, titled, type Figure, type Table } from './common.js';

export interface LatticeSite {
  x: number;
  y: number;
  orbital: number;
  label: string;
  /** In the home cell (the others are drawn lighter). */
  home: boolean;
}

export interface LatticeBond {
  x0: number;
  y0: number;
  x1: number;
  y1: number;
  /** The amplitude <to|H|from> at the drawn parameter values. */
  re: number;
  im: number;
  /** The model term it comes from. */
  term: number;
  home: boolean;
}

export interface LatticePicture {
  kind: 'lattice';
  name: string;
  periodic: number;
  orbitals: string[];
  /** Onsite energy of each orbital (its diagonal onsite terms). */
  onsite: number[];
  sites: LatticeSite[];
  bonds: LatticeBond[];
  /** Corners of the home cell (two for a chain, none for a flake). */
  unitCell: [number, number][];
  checks: { minGap: null; warnings: string[] };
}

const ORBITAL_COLOURS = ['#1f4e9c', '#d9822b', '#4f9a5a', '#b5445b', '#7d5ba6', '#8c6d31', '#5b9aa8', '#c4a000'];
const PHASE_STEPS = 12;

function hex(r: number, g: number, b: number): string {
  return '#' + [r, g, b].map((v) => Math.round(Math.min(255, Math.max(0, v))).toString(16).padStart(2, '0')).join('');
}

/**
 * The colour of a phase: a real positive amplitude blue, a real negative one
 * orange, the phases between around a colour wheel (HSL, saturation 0.75, lightness 0.42).
 */
export function phaseColour(phase: number): string {
  const hue = (((220 + (phase / Math.PI) * 180) % 360) + 360) % 360;
  const s = 0.75;
  const l = 0.42;
  const c = (1 - Math.abs(2 * l - 1)) * s;
  const x = c * (1 - Math.abs(((hue / 60) % 2) - 1));
  const m = l - c / 2;
  const [r, g, b] = hue < 60 ? [c, x, 0] : hue < 120 ? [x, c, 0] : hue < 180 ? [0, c, x] : hue < 240 ? [0, x, c] : hue < 300 ? [x, 0, c] : [c, 0, x];
  return hex((r + m) * 255, (g + m) * 255, (b + m) * 255);
}

function read(result: ViewResult): LatticePicture {
  const picture = result as unknown as LatticePicture;
  if (!Array.isArray(picture.sites) || !Array.isArray(picture.bonds) || !Array.isArray(picture.orbitals)) {
    throw new Error(`lattice picture: sites, bonds and orbitals expected. Value: ${Object.keys(result).join(', ')}`);
  }
  return picture;
}

/** "1", "-0.5", "0.1 e^{0.6πi}" */
function amplitudeText(re: number, im: number): string {
  const modulus = Math.hypot(re, im);
  const phase = Math.atan2(im, re);
  if (Math.abs(im) < 1e-9 * modulus) return fmt(re);
  return `${fmt(modulus)} e^(${fmt(phase / Math.PI)}πi)`;
}

export function latticeFigure(result: ViewResult): Figure {
  const m = read(result);
  const biggest = Math.max(1e-300, ...m.bonds.map((b) => Math.hypot(b.re, b.im)));
  // Bonds grouped by colour step and width, one trace each (a few traces, not one per bond).
  const groups = new Map<string, { colour: string; width: number; home: boolean; x: (number | null)[]; y: (number | null)[]; text: string }>();
  for (const b of m.bonds) {
    if (Math.hypot(b.x1 - b.x0, b.y1 - b.y0) < 1e-9) continue; // between orbitals at one place: an onsite block
    const phase = Math.atan2(b.im, b.re);
    const step = Math.round((phase / (2 * Math.PI)) * PHASE_STEPS);
    const colour = phaseColour((step / PHASE_STEPS) * 2 * Math.PI);
    const width = Math.max(0.8, Math.round(4 * (Math.hypot(b.re, b.im) / biggest) * 2) / 2) + (b.home ? 1 : 0);
    const id = `${colour}|${width}|${b.home}`;
    const group = groups.get(id) ?? { colour, width, home: b.home, x: [], y: [], text: `t = ${amplitudeText(b.re, b.im)}` };
    group.x.push(b.x0, b.x1, null);
    group.y.push(b.y0, b.y1, null);
    groups.set(id, group);
  }
  const data: Data[] = [];
  if (m.unitCell.length >= 2) {
    const corners = m.unitCell.length === 2 ? m.unitCell : [...m.unitCell, m.unitCell[0]];
    data.push({ type: 'scatter', mode: 'lines', x: corners.map((c) => c[0]), y: corners.map((c) => c[1]), line: { color: '#999999', width: 1.5, dash: 'dash' }, name: 'unit cell', hoverinfo: 'skip' });
  }
  for (const g of [...groups.values()].sort((a, b) => Number(a.home) - Number(b.home))) {
    data.push({
      type: 'scatter',
      mode: 'lines',
      x: g.x,
      y: g.y,
      line: { color: g.colour, width: g.width },
      opacity: g.home ? 1 : 0.45,
      showlegend: false,
      hovertemplate: `${g.text}<extra></extra>`,
      name: g.text,
    });
  }
  // Orbitals at one place (spin, particle and hole copies) share a marker, named for all of them.
  const places = new Map<string, number[]>();
  for (const site of m.sites.filter((q) => q.home)) {
    const at = `${site.x.toFixed(6)},${site.y.toFixed(6)}`;
    places.set(at, [...(places.get(at) ?? []), site.orbital]);
  }
  for (const orbitals of places.values()) {
    const first = orbitals[0];
    const mine = m.sites.filter((q) => q.orbital === first);
    const label = orbitals.map((o) => m.orbitals[o]).join(', ');
    const energies = [...new Set(orbitals.map((o) => fmt(m.onsite[o] ?? 0)))].join(' / ');
    data.push({
      type: 'scatter',
      mode: 'markers',
      x: mine.map((q) => q.x),
      y: mine.map((q) => q.y),
      marker: { size: 11, color: ORBITAL_COLOURS[first % ORBITAL_COLOURS.length], line: { color: '#ffffff', width: 1.5 } },
      name: `${label} (onsite ${energies})`,
      showlegend: true,
      hovertemplate: `${label}<extra></extra>`,
    });
  }
  const homeBonds = m.bonds.filter((b) => b.home).length;
  const summary = `${m.orbitals.length} orbital${m.orbitals.length === 1 ? '' : 's'}, ${homeBonds} hopping${homeBonds === 1 ? '' : 's'} from the home cell; colour: phase of t, width: |t| (largest ${fmt(biggest)})`;
  return {
    data,
    layout: {
      ...BASE_LAYOUT,
      title: titled(`Lattice of ${m.name}`),
      xaxis: { title: { text: 'x' }, zeroline: false, showgrid: false },
      yaxis: { title: { text: 'y' }, zeroline: false, showgrid: false, scaleanchor: 'x' },
      legend: { orientation: 'h', x: 0, y: -0.15 },
      annotations: [{ xref: 'paper', yref: 'paper', x: 0, y: 1.02, xanchor: 'left', yanchor: 'bottom', showarrow: false, text: summary, font: { size: 11 } }],
    },
    summary,
    invariant: null,
    gapless: false,
  };
}

export function latticeTable(result: ViewResult): Table {
  const m = read(result);
  return {
    columns: ['x0', 'y0', 'x1', 'y1', 'Re t', 'Im t', 'term'],
    rows: m.bonds.map((b) => [b.x0, b.y0, b.x1, b.y1, b.re, b.im, b.term]),
  };
}
