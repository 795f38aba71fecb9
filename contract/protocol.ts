/**
 * The contract between the kernel and the widgets, which both import and neither owns: the widget
 * kinds, the names and versions of the widget's model and view, the MIME types of the outputs, and
 * the shapes of a view's request and result as they travel (`ViewRequest` is the engine's
 * `DiagnosticRequest`, src/request.ts, as JSON; `ViewResult` lists only the fields the figures draw,
 * so a saved notebook from an older engine still opens). Typed arrays travel packed (wire.ts).
 */

/** The front-end module, its version, and the semver range the kernel writes into widget state. */
export const WIDGET_MODULE = 'chernel-widgets';
export const WIDGET_MODULE_VERSION = '0.1.0';
export const WIDGET_MODULE_RANGE = `^${WIDGET_MODULE_VERSION}`;
/** The Jupyter widget model and view classes of every chernel widget (saved notebooks name them). */
export const WIDGET_MODEL_NAME = 'DiagnosticModel';
export const WIDGET_VIEW_NAME = 'DiagnosticView';
/** The version of the Jupyter widget messaging protocol the kernel speaks (@jupyter-widgets/base 6). */
export const WIDGET_PROTOCOL_VERSION = '2.1.0';

export const WIDGET_KINDS = [
  'curvature', 'wannier-flow', 'bands', 'ribbon', 'phase-map',
  'local-marker', 'local-density',
  'surface-spectrum', 'surface-map',
] as const;
export type WidgetKind = (typeof WIDGET_KINDS)[number];

/** MIME types the kernel writes and the pages read (Jupyter widgets' own, and plotly's figure JSON). */
export const WIDGET_STATE_MIME = 'application/vnd.jupyter.widget-state+json';
export const WIDGET_VIEW_MIME = 'application/vnd.jupyter.widget-view+json';
export const PLOTLY_MIME = 'application/vnd.plotly.v1+json';
/**
 * chernel's own entry in a widget's output: the widget's state as a notebook's widget-state entry
 * (`{model_name, model_module, model_module_version, state, buffers}`) and its `model_id`, so a
 * notebook saved without the lab's "save widget state" still reopens with live widgets.
 */
export const SAVED_WIDGET_MIME = 'application/vnd.chernel.widget-state+json';

export interface ParameterDecl {
  default: number;
  range?: [number, number];
  unit?: string;
  doc?: string;
}

/** The part of a ModelSpec the views read (the full spec travels untouched to the worker). */
export interface ModelSpecView {
  format: string;
  name: string;
  periodic: number;
  vectors: number[][];
  orbitals: { label: string; position: number[] }[];
  parameters: Record<string, ParameterDecl>;
}

/** A view's request: the engine's request as a widget holds it (plain JSON; the engine checks it). */
export interface ViewRequest {
  kind: WidgetKind;
  model: ModelSpecView;
  params: Record<string, number>;
  [option: string]: unknown;
}

export interface Checks {
  /** Smallest gap of the chosen band group; null when not measured. */
  minGap: number | null;
  /** Where, in units of the reciprocal lattice vectors. */
  minGapAt?: number[];
  grid?: number[];
  warnings: string[];
  gapless?: boolean;
}

/** A result as a view reads it (src/topology/flow-z2.ts has the engine's side of the same shape). */
export interface ViewResult {
  kind: string;
  checks: Checks;
  convention?: 'lattice' | 'orbital';
  [field: string]: unknown;
}
