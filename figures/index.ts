/**
 * The figure library: by result kind, its name, the figure (result -> plotly's figure JSON) and the
 * data table for export. Pure (no DOM): the widgets, the kernel's outputs, the exported pages and
 * the still pictures (snapshot/) all draw a kind with the same module, so it looks the same in each.
 */
import type { ViewResult } from '../contract/protocol.js';
import type { Figure, FigureContext, Table } from './common.js';
import { bandsFigure, bandsTable } from './bands.js';
import { curvatureFigure, curvatureTable } from './curvature.js';
import { dosFigure, dosTable } from './dos.js';
import { flowFigure, flowTable } from './flow.js';
import { gapFigure, gapTable } from './gap.js';
import { latticeFigure, latticeTable } from './lattice.js';
import { phaseMapFigure, phaseMapTable } from './phase-map.js';
import { ribbonFigure, ribbonTable } from './ribbon.js';
import { surfaceSpectrumFigure, surfaceSpectrumTable } from './surface-spectrum.js';
import { surfaceMapFigure, surfaceMapTable } from './surface-map.js';
import { slabFigure, slabTable } from './slab.js';
import { bulkBoundaryFigure, bulkBoundaryTable } from './bulk-boundary.js';
import { densityFigure, densityTable, ensembleFigure, ensembleTable, markerFigure, markerTable } from './realspace.js';

export type { Figure, FigureContext, Table } from './common.js';

interface Renderer {
  /** What the kind is called in a widget's header and a summary's caption. */
  title: string;
  figure(result: ViewResult, ctx: FigureContext): Figure;
  table(result: ViewResult, ctx: FigureContext): Table;
}

const RENDERERS: Record<string, Renderer> = {
  curvature: { title: 'Berry curvature', figure: curvatureFigure, table: curvatureTable },
  'wannier-flow': { title: 'Wannier-centre flow', figure: flowFigure, table: flowTable },
  bands: { title: 'Band structure', figure: bandsFigure, table: bandsTable },
  ribbon: { title: 'Ribbon spectrum', figure: ribbonFigure, table: ribbonTable },
  'phase-map': { title: 'Phase map', figure: phaseMapFigure, table: phaseMapTable },
  gap: { title: 'Direct gap', figure: gapFigure, table: gapTable },
  dos: { title: 'Density of states', figure: dosFigure, table: dosTable },
  lattice: { title: 'Lattice', figure: latticeFigure, table: latticeTable },
  'surface-spectrum': { title: 'Surface spectral function', figure: surfaceSpectrumFigure, table: surfaceSpectrumTable },
  'surface-map': { title: 'Constant-energy surface map', figure: surfaceMapFigure, table: surfaceMapTable },
  'slab-spectrum': { title: 'Slab spectrum', figure: slabFigure, table: slabTable },
  'bulk-boundary': { title: 'Bulk–boundary check', figure: bulkBoundaryFigure, table: bulkBoundaryTable },
  'local-marker': { title: 'Local Chern marker', figure: markerFigure, table: markerTable },
  'local-density': { title: 'Local density of states', figure: densityFigure, table: densityTable },
  ensemble: { title: 'Disorder ensemble', figure: ensembleFigure, table: ensembleTable },
};

/** The name of a kind with a figure, or the kind itself. */
export function figureTitle(kind: string): string {
  return Object.hasOwn(RENDERERS, kind) ? RENDERERS[kind].title : kind;
}

/** Whether results of this kind have a figure. */
export function hasFigure(kind: string): boolean {
  return Object.hasOwn(RENDERERS, kind);
}

function rendererFor(kind: string): Renderer {
  const renderer = RENDERERS[kind];
  if (renderer === undefined) throw new Error(`no figure for result kind "${kind}"`);
  return renderer;
}

export function figureFor(result: ViewResult, ctx: FigureContext): Figure {
  return rendererFor(result.kind).figure(result, ctx);
}

export function tableFor(result: ViewResult, ctx: FigureContext): Table {
  return rendererFor(result.kind).table(result, ctx);
}

/** CSV text: a header of column names, then rows; strings quoted. */
export function toCsv(table: Table): string {
  const cell = (v: number | string | null) =>
    v === null ? '' : typeof v === 'number' ? String(v) : `"${v.replace(/"/g, '""')}"`;
  return [table.columns.map(cell).join(','), ...table.rows.map((r) => r.map(cell).join(','))].join('\n') + '\n';
}
