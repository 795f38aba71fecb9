/** Rendering by result kind: result -> plotly figure, and result -> data table for export. */
import type { DiagnosticResult } from '../protocol.js';
import type { Figure, FigureContext, Table } from './common.js';
import { bandsFigure, bandsTable } from './bands.js';
import { curvatureFigure, curvatureTable } from './curvature.js';
import { dosFigure, dosTable } from './dos.js';
import { flowFigure, flowTable } from './flow.js';
import { gapFigure, gapTable } from './gap.js';
import { latticeFigure, latticeTable } from './lattice.js';
import { phaseMapFigure, phaseMapTable } from './phase-map.js';
import { ribbonFigure, ribbonTable } from './ribbon.js';

export type { Figure, FigureContext, Table } from './common.js';

interface Renderer {
  figure(result: DiagnosticResult, ctx: FigureContext): Figure;
  table(result: DiagnosticResult, ctx: FigureContext): Table;
}

const RENDERERS: Record<string, Renderer> = {
  curvature: { figure: curvatureFigure, table: curvatureTable },
  'wannier-flow': { figure: flowFigure, table: flowTable },
  bands: { figure: bandsFigure, table: bandsTable },
  ribbon: { figure: ribbonFigure, table: ribbonTable },
  'phase-map': { figure: phaseMapFigure, table: phaseMapTable },
  gap: { figure: gapFigure, table: gapTable },
  dos: { figure: dosFigure, table: dosTable },
  lattice: { figure: latticeFigure, table: latticeTable },
};

/** Whether results of this kind have a figure. */
export function hasFigure(kind: string): boolean {
  return Object.hasOwn(RENDERERS, kind);
}

function rendererFor(kind: string): Renderer {
  const renderer = RENDERERS[kind];
  if (renderer === undefined) throw new Error(`no figure for result kind "${kind}"`);
  return renderer;
}

export function figureFor(result: DiagnosticResult, ctx: FigureContext): Figure {
  return rendererFor(result.kind).figure(result, ctx);
}

export function tableFor(result: DiagnosticResult, ctx: FigureContext): Table {
  return rendererFor(result.kind).table(result, ctx);
}

/** CSV text: a header of column names, then rows; strings quoted. */
export function toCsv(table: Table): string {
  const cell = (v: number | string | null) =>
    v === null ? '' : typeof v === 'number' ? String(v) : `"${v.replace(/"/g, '""')}"`;
  return [table.columns.map(cell).join(','), ...table.rows.map((r) => r.map(cell).join(','))].join('\n') + '\n';
}
