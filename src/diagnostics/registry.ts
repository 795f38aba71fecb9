/**
 * Every diagnostic kind, one module each (./kinds/). Adding a kind is one module here, a figure
 * module in figures/ if it plots, and its tests: requests, their checks and costs, phase maps,
 * cluster shards, the widget worker and the summaries all read this table (a kind that splits
 * also names its rows in topology/parts.ts, where the split plan reads them).
 */
import type { BlochConvention } from '../bloch/hamiltonian.js';
import { ModelError, valueText } from '../model/errors.js';
import { didYouMean } from '../model/field-names.js';
import type { ModelSpec, ParameterValues } from '../model/spec.js';
import type { Diagnostic, OwnOptions } from './diagnostic.js';
import { bands } from './kinds/bands.js';
import { berryPhase } from './kinds/berry-phase.js';
import { bulkBoundary } from './kinds/bulk-boundary.js';
import { bott } from './kinds/bott.js';
import { chainWinding } from './kinds/chain-winding.js';
import { chern } from './kinds/chern.js';
import { curvature } from './kinds/curvature.js';
import { ensemble } from './kinds/ensemble.js';
import { gapClosings } from './kinds/gap-closings.js';
import { gap } from './kinds/gap.js';
import { hall } from './kinds/hall.js';
import { localDensity } from './kinds/local-density.js';
import { localMarker } from './kinds/local-marker.js';
import { majorana } from './kinds/majorana.js';
import { ribbon } from './kinds/ribbon.js';
import { slabSpectrum } from './kinds/slab-spectrum.js';
import { spinBott } from './kinds/spin-bott.js';
import { spinChern } from './kinds/spin-chern.js';
import { surfaceMap } from './kinds/surface-map.js';
import { surfaceSpectrum } from './kinds/surface-spectrum.js';
import { wannierFlow } from './kinds/wannier-flow.js';
import { weyl } from './kinds/weyl.js';
import { winding } from './kinds/winding.js';
import { z2 } from './kinds/z2.js';

export const DIAGNOSTICS = {
  bands,
  gap,
  'gap-closings': gapClosings,
  ribbon,
  chern,
  curvature,
  'wannier-flow': wannierFlow,
  'berry-phase': berryPhase,
  z2,
  'spin-chern': spinChern,
  winding,
  majorana,
  weyl,
  hall,
  // Finite, possibly disordered samples (src/realspace/).
  bott,
  'spin-bott': spinBott,
  'chain-winding': chainWinding,
  'local-marker': localMarker,
  'local-density': localDensity,
  ensemble,
  // Edges and surfaces of semi-infinite samples and slabs (src/surface/).
  'surface-spectrum': surfaceSpectrum,
  'surface-map': surfaceMap,
  'slab-spectrum': slabSpectrum,
  'bulk-boundary': bulkBoundary,
} as const;

type Registry = typeof DIAGNOSTICS;
/** A kind computed on one compiled model (a phase map sweeps one of these). */
export type KindName = keyof Registry;
type OptionsOf<K extends KindName> = Registry[K] extends Diagnostic<infer O, infer _R> ? O : never;
type ResultOf<K extends KindName> = Registry[K] extends Diagnostic<infer _O, infer R> ? R : never;

/** What every request carries besides its options. */
export interface RequestBase {
  model: ModelSpec;
  params?: ParameterValues;
  convention?: BlochConvention;
}

/** A request of one registered kind: its kind, the model, parameter values and the kind's options. */
export type KindRequest = { [K in KindName]: RequestBase & { kind: K } & OwnOptions<OptionsOf<K>> }[KindName];
export type KindResult = { [K in KindName]: ResultOf<K> }[KindName];

export const KIND_NAMES = Object.keys(DIAGNOSTICS) as KindName[];

/** The kinds a phase map can sweep: those with a scalar per point. */
export type SweepQuantity = { [K in KindName]: Registry[K] extends { sweep: unknown } ? K : never }[KindName];
export const SWEEP_QUANTITIES = KIND_NAMES.filter((k) => 'sweep' in DIAGNOSTICS[k]) as SweepQuantity[];

/** The kinds whose requests split into parts computed apart and joined exactly. */
export type SplitKind = { [K in KindName]: Registry[K] extends { splitRows: unknown } ? K : never }[KindName];

/** The error for a kind that is not one of `among`, naming `field` and the closest kind. */
export function unknownKind(kind: unknown, field: string, among: readonly string[]): ModelError {
  const hint = typeof kind === 'string' ? didYouMean(kind, among) : '';
  return new ModelError(field, `unknown diagnostic ${valueText(kind)}${hint} (expected one of ${among.map((k) => `"${k}"`).join(', ')})`);
}

/** The module of a registered kind, or an error naming `field` and the closest kind. */
export function diagnosticOf(kind: unknown, field = 'kind'): Diagnostic<object> {
  if (typeof kind === 'string' && Object.hasOwn(DIAGNOSTICS, kind)) return DIAGNOSTICS[kind as KindName] as unknown as Diagnostic<object>;
  throw unknownKind(kind, field, KIND_NAMES);
}

/** Whether results of `kind` can be computed in parts. */
export function splits(kind: string): kind is SplitKind {
  return Object.hasOwn(DIAGNOSTICS, kind) && DIAGNOSTICS[kind as KindName].splitRows !== undefined;
}
