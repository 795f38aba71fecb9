/**
 * The kernel side of chernel's widgets; its exports are in cell scope. `show(model, options)` computes the first result with
 * the engine, opens a `jupyter.widget` comm carrying the state (model description, parameter
 * values, options, result; typed arrays as binary buffers) and returns a handle that displays as
 * `application/vnd.jupyter.widget-view+json`. The front end recomputes as controls move and syncs
 * values and results back here; a cell reads them (`w.values`, `w.result`) and moves the controls
 * (`w.setValues({...})`).
 */

import { validateModel, type ModelSpec } from '../src/index.js';
import { computeView } from '../src/views.js';
import { openComm, type Comm, type CommMessage } from './comms.js';
import { figureOutput, MIME_BUNDLE } from './display/index.js';
import { latticePicture } from './display/lattice.js';
import type { ResultLike } from './display/summary.js';
import type { LatticePicture } from '../figures/lattice.js';
import { figurePng } from './display/pictures.js';
import { integerOrValue } from '../figures/curvature.js';
import { figureFor } from '../figures/index.js';
import { SAVED_WIDGET_MIME, WIDGET_KINDS, WIDGET_PROTOCOL_VERSION, WIDGET_VIEW_MIME, type ViewResult, type ModelSpecView, type WidgetKind } from '../contract/protocol.js';
import { putBuffers, removeBuffers, unpackArrays, type BufferPath } from '../contract/wire.js';
import { widgetRequest } from '../contract/option-sliders.js';
import {
  checkControlValues,
  checkOptionSliders,
  checkValues,
  checkWidgetOptions,
  savedStateEntry,
  startValues,
  WidgetOptionError,
  widgetState,
  type Result,
  type Values,
  type WidgetOptions,
} from './widget-state.js';

export type { WidgetKind, WidgetOptions };

function describeError(err: unknown): string {
  return err instanceof Error ? `${err.name}: ${err.message}` : String(err);
}

/** A live widget: its state mirrors the front end's; display it to show a view. */
export class DiagnosticWidget {
  readonly kind: WidgetKind;
  readonly spec: ModelSpec;
  readonly options: Record<string, unknown>;
  readonly title: string;
  private current: Values;
  private lastResult: Result | null;
  private resultValues: Values | null;
  private lastError: string;
  private readonly comm: Comm;
  private readonly listeners: ((widget: DiagnosticWidget) => void)[] = [];

  constructor(model: unknown, options: WidgetOptions = {}) {
    const { kind = 'curvature', values = {}, title = '', ...requestOptions } = options;
    if (!WIDGET_KINDS.includes(kind)) {
      throw new WidgetOptionError('kind', `expected one of ${[...WIDGET_KINDS, 'lattice'].join(', ')}. Value: ${JSON.stringify(kind)}`);
    }
    checkWidgetOptions(kind, options);
    this.kind = kind;
    this.spec = validateModel(model);
    this.options = requestOptions;
    this.title = String(title);
    checkOptionSliders(kind, this.spec, options);
    this.current = startValues(this.spec, requestOptions, values);
    this.lastResult = null;
    this.resultValues = null;
    this.lastError = '';
    try {
      this.lastResult = this.computeNow(this.current);
      this.resultValues = { ...this.current };
    } catch (err) {
      this.lastError = describeError(err);
    }
    const split = removeBuffers(this.state());
    this.comm = openComm(
      'jupyter.widget',
      { state: split.state, buffer_paths: split.buffer_paths },
      { metadata: { version: WIDGET_PROTOCOL_VERSION }, buffers: split.buffers },
    );
    this.comm.onMessage((msg) => this.received(msg));
  }

  get modelId(): string {
    return this.comm.id;
  }

  /** The values the controls show: parameters and option sliders (synced from the front end). */
  get values(): Values {
    return { ...this.current };
  }

  /**
   * The last result (computed here at creation, then by the front end as values move). A curvature
   * map's Chern number is also under `chern`, the name every other Chern result uses (an integer,
   * as the lattice sum is one up to rounding).
   */
  get result(): Result | null {
    const result = this.lastResult;
    if (result?.kind === 'curvature' && !('chern' in result)) return { ...result, chern: integerOrValue(typeof result.total === 'number' ? result.total : null) };
    return result;
  }

  /** The values `result` was computed for. */
  get resultFor(): Values | null {
    return this.resultValues === null ? null : { ...this.resultValues };
  }

  /** The last engine error shown in the widget, or '' when none. */
  get error(): string {
    return this.lastError;
  }

  /**
   * Move the controls: the front end recomputes and syncs the result back. Returns nothing, so a
   * cell ending with it shows no second view of the widget.
   */
  setValues(values: Values): void {
    const checked = checkControlValues(this.spec, this.options, values, 'setValues');
    this.current = { ...this.current, ...checked };
    this.send({ values: this.current });
  }

  /** Called after every change synced from the front end. */
  onChange(listener: (widget: DiagnosticWidget) => void): this {
    this.listeners.push(listener);
    return this;
  }

  close(): void {
    this.comm.close();
  }

  /**
   * The live view, and beside it what outlives the kernel: the widget's state (a front end with no
   * saved widget state restores the widget from it) and a PNG of its last result (what an untrusted
   * notebook, nbconvert and viewers without JavaScript show).
   */
  [MIME_BUNDLE](): Record<string, unknown> {
    const bundle: Record<string, unknown> = {
      [WIDGET_VIEW_MIME]: { model_id: this.comm.id, version_major: 2, version_minor: 0 },
      [SAVED_WIDGET_MIME]: { model_id: this.comm.id, ...savedStateEntry(this.state()) },
      'text/plain': `${this.kind} widget for model "${this.spec.name}" (${Object.entries(this.current)
        .map(([k, v]) => `${k} = ${v}`)
        .join(', ')})`,
    };
    const picture = this.picture();
    if (picture !== null) bundle['image/png'] = picture;
    return bundle;
  }

  /** The PNG of the last result, drawn as the view draws it; null without a result. */
  private picture(): string | null {
    if (this.lastResult === null) return null;
    const values = this.resultValues ?? this.current;
    try {
      const figure = figureFor(this.lastResult as ViewResult, { spec: this.spec as unknown as ModelSpecView, values, options: this.options });
      return figurePng(figure);
    } catch {
      return null; // the view shows the same figure error; the state still travels
    }
  }

  private computeNow(values: Values): Result {
    const request = widgetRequest(this.kind, this.spec as unknown as ModelSpecView, this.options, values);
    return computeView(request) as Result;
  }

  /** The full synced state (typed arrays packed, not yet lifted out as buffers). */
  state(): Record<string, unknown> {
    return widgetState({
      kind: this.kind,
      spec: this.spec,
      options: this.options,
      values: this.current,
      result: this.lastResult,
      error: this.lastError,
      title: this.title,
    });
  }

  private send(patch: Record<string, unknown>): void {
    const split = removeBuffers(patch);
    this.comm.send({ method: 'update', state: split.state, buffer_paths: split.buffer_paths }, { buffers: split.buffers });
  }

  private received(msg: CommMessage): void {
    const data = msg.data as { method?: string; state?: Record<string, unknown>; buffer_paths?: BufferPath[] };
    if (data.method === 'request_state') {
      const split = removeBuffers(this.state());
      this.comm.send({ method: 'update', state: split.state, buffer_paths: split.buffer_paths }, { buffers: split.buffers });
      return;
    }
    if (data.method !== 'update' || data.state === undefined) return;
    const state = data.state;
    putBuffers(state, data.buffer_paths ?? [], msg.buffers);
    if (state.values !== undefined) this.current = checkControlValues(this.spec, this.options, state.values, 'values (from the front end)');
    if (state.result !== undefined) this.lastResult = state.result === null ? null : (unpackArrays(state.result) as Result);
    if (state.result_values !== undefined) this.resultValues = state.result_values as Values | null;
    if (typeof state.error === 'string') this.lastError = state.error;
    for (const listener of this.listeners) listener(this);
  }
}

/** A picture of a few cells of a model's lattice at some parameter values (`show(model, {kind: 'lattice'})`). */
export class LatticeDrawing {
  constructor(readonly picture: LatticePicture) {}

  [MIME_BUNDLE](): Record<string, unknown> {
    return figureOutput(this.picture as unknown as ResultLike)?.data ?? { 'text/plain': `lattice of ${this.picture.name}` };
  }
}

export interface LatticeOptions {
  kind: 'lattice';
  /** Parameter values for the amplitudes (defaults from the model for the rest). */
  values?: Values;
}

/**
 * `show(model, options)` in a cell: a live widget for the model. As a cell's value it displays
 * itself; `display(w)` shows another view of the same widget. `{kind: 'lattice'}` draws a few cells
 * of the model's lattice instead: sites, bonds coloured by the phase of their amplitude, the unit cell.
 */
export function show(model: unknown, options: LatticeOptions): LatticeDrawing;
export function show(model: unknown, options?: WidgetOptions): DiagnosticWidget;
export function show(model: unknown, options: WidgetOptions | LatticeOptions = {}): DiagnosticWidget | LatticeDrawing {
  if (options.kind === 'lattice') {
    const spec = validateModel(model);
    return new LatticeDrawing(latticePicture(spec, checkValues(spec, options.values ?? {})));
  }
  return new DiagnosticWidget(model, options as WidgetOptions);
}
