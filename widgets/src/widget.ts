/**
 * The widget: the model holds the diagnostic request (model description, parameter values,
 * options) and its last result; the view draws the result and, when a control moves, recomputes
 * in a Web Worker, then writes values and result back to the model (and so to the kernel and the
 * saved notebook).
 */
import { DOMWidgetModel, DOMWidgetView, type IBackboneModelOptions, type ISerializers } from '@jupyter-widgets/base';
import { LatestWinsClient, type Outcome, type WorkerLike } from './compute-client.js';
import { createParameterControls, formatValue, type ControlDecl, type ParameterControls } from './controls.js';
import { spawnEngineWorker } from './engine-worker.js';
import { downloadFigure, downloadText, resultJson, safeFileName } from './exporting.js';
import { figureFor, figureTitle, tableFor, toCsv, type Figure, type FigureContext } from '../../figures/index.js';
import { PHASE_POINT_SHAPE } from '../../figures/phase-map.js';
import Plotly, { plotlyTraces, type Config, type PlotlyHTMLElement } from './plotly.js';
import { rasterImage } from '../../figures/picture.js';
import { DragPreview } from './preview.js';
import { forgetLiveModel, registerLiveModel } from './saved-state.js';
import { WIDGET_MODEL_NAME, WIDGET_MODULE, WIDGET_MODULE_VERSION, WIDGET_VIEW_NAME, type ViewRequest, type ViewResult, type ModelSpecView, type WidgetKind } from '../../contract/protocol.js';
import { engineWorkers, splitPlan } from './split.js';
import { ensureStyles } from './styles.js';
import { diagnosticStateProblem } from '../../contract/state-check.js';
import { packArrays, unpackArrays } from '../../contract/wire.js';
import { optionSlidersOf, optionStart, requestValues, widgetRequest } from '../../contract/option-sliders.js';

export type Values = Record<string, number>;

export function sameValues(a: Values | null | undefined, b: Values | null | undefined): boolean {
  if (!a || !b) return false;
  const keys = Object.keys(a);
  return keys.length === Object.keys(b).length && keys.every((k) => Object.is(a[k], b[k]));
}

export class DiagnosticModel extends DOMWidgetModel {
  override defaults(): Backbone.ObjectHash {
    return {
      ...super.defaults(),
      _model_name: WIDGET_MODEL_NAME,
      _model_module: WIDGET_MODULE,
      _model_module_version: WIDGET_MODULE_VERSION,
      _view_name: WIDGET_VIEW_NAME,
      _view_module: WIDGET_MODULE,
      _view_module_version: WIDGET_MODULE_VERSION,
      title: '',
      kind: 'curvature',
      spec: null,
      /** The model's parameter order (a saved notebook sorts object keys). */
      parameter_order: [],
      options: {},
      values: {},
      result: null,
      result_values: null,
      error: '',
    };
  }

  /** Each model is known by id on the page, so its notebook output can be kept current (notebook-outputs.ts). */
  override initialize(attributes: Backbone.ObjectHash, options: IBackboneModelOptions): void {
    super.initialize(attributes, options);
    registerLiveModel(this);
    this.once('destroy', () => forgetLiveModel(this));
  }

  static override serializers: ISerializers = {
    ...DOMWidgetModel.serializers,
    result: { serialize: (value: unknown) => packArrays(value), deserialize: (value: unknown) => unpackArrays(value) },
  };

  /** Parameters a phase map sweeps: moving them moves the marker, it does not recompute the map. */
  sweptParameters(): string[] {
    if (this.get('kind') !== 'phase-map') return [];
    const axes = (this.get('options') as { axes?: { param?: unknown }[] }).axes;
    return Array.isArray(axes) ? axes.map((a) => String(a?.param)) : [];
  }

  /** Whether a result computed for `computed` still answers `wanted` (swept parameters aside). */
  answers(computed: Values | null | undefined, wanted: Values): boolean {
    const swept = new Set(this.sweptParameters());
    const strip = (v: Values) => Object.fromEntries(Object.entries(v).filter(([k]) => !swept.has(k)));
    return computed != null && sameValues(strip(computed), strip(wanted));
  }

  /** The request the current values describe (option sliders' values as request options). */
  request(values: Values = this.get('values')): ViewRequest {
    return widgetRequest(this.get('kind'), this.get('spec'), this.get('options') as Record<string, unknown>, values);
  }
}

const PLOT_CONFIG: Partial<Config> = {
  responsive: true,
  displaylogo: false,
  modeBarButtonsToRemove: ['toImage', 'lasso2d', 'select2d'],
};

/** Fired on the widget element after each draw; the browser tests and the bench listen for it. */
export interface DrawnDetail {
  summary: string;
  invariant: number | null;
  gapless: boolean;
  /** Milliseconds from the control moving to the plot drawn, or null for a draw from saved state. */
  latency: number | null;
  computeMs: number | null;
  /** Milliseconds spent turning the result into traces, and drawing them. */
  figureMs: number;
  plotMs: number;
  /** True when a drag step drew only the picture and the title, without plotly (see `draw`). */
  previewed: boolean;
}

/** How long the controls must rest before a previewed drawing is redrawn in full. */
const SETTLE_MS = 250;
/** How long a computation may take before the plot is shown as stale. */
const STALE_AFTER_MS = 150;

/** Creates the worker for a view; replaced in unit tests by a worker running in the test process. */
export let workerFactory: () => WorkerLike = spawnEngineWorker;
export function setWorkerFactory(factory: () => WorkerLike): void {
  workerFactory = factory;
}

export class DiagnosticView extends DOMWidgetView {
  declare model: DiagnosticModel;
  private plot!: HTMLDivElement;
  private titleEl!: HTMLElement;
  private summaryEl!: HTMLElement;
  private messageEl!: HTMLElement;
  private statusEl!: HTMLElement;
  private controlsHost!: HTMLElement;
  /** A long computation's progress (a phase map's points) and its stop button. */
  private progressEl!: HTMLElement;
  private progressStarted: number | null = null;
  private controls: ParameterControls | null = null;
  private client: LatestWinsClient | null = null;
  private attached = false;
  private seen: IntersectionObserver | null = null;
  private figure: Figure | null = null;
  private plotEventsBound = false;
  /** The frame key of the figure plotly shows in full, and the pending full redraw after a drag. */
  private drawnFrameKey: string | null = null;
  private settleTimer: ReturnType<typeof setTimeout> | null = null;
  private staleTimer: ReturnType<typeof setTimeout> | null = null;
  private preview!: DragPreview;
  /** The values the controls show; ahead of the model's result while a recompute is pending. */
  private live: Values = {};

  override render(): void {
    ensureStyles(this.el.ownerDocument);
    this.el.classList.add('chernel-widget');
    this.el.innerHTML = '';

    const header = document.createElement('div');
    header.className = 'chernel-header';
    this.titleEl = document.createElement('span');
    this.titleEl.className = 'chernel-title';
    this.summaryEl = document.createElement('span');
    this.summaryEl.className = 'chernel-summary';
    header.append(this.titleEl, this.summaryEl);

    this.messageEl = document.createElement('div');
    this.messageEl.className = 'chernel-message';
    this.messageEl.setAttribute('role', 'status');

    this.plot = document.createElement('div');
    this.plot.className = 'chernel-plot';
    this.preview = new DragPreview(this.plot);

    const footer = document.createElement('div');
    footer.className = 'chernel-footer';
    for (const [label, action] of [
      ['PNG', () => this.exportFigure('png')],
      ['SVG', () => this.exportFigure('svg')],
      ['CSV', () => this.exportData('csv')],
      ['JSON', () => this.exportData('json')],
    ] as const) {
      const button = document.createElement('button');
      button.type = 'button';
      button.textContent = label;
      button.title = label === 'PNG' || label === 'SVG' ? `Download the figure as ${label}` : `Download the plotted data as ${label}`;
      button.dataset.export = label.toLowerCase();
      button.addEventListener('click', action);
      footer.append(button);
    }
    this.statusEl = document.createElement('span');
    this.statusEl.className = 'chernel-status';
    footer.append(this.statusEl);

    this.progressEl = document.createElement('div');
    this.progressEl.className = 'chernel-progress';
    const bar = document.createElement('progress');
    bar.max = 1;
    const progressText = document.createElement('span');
    const stop = document.createElement('button');
    stop.type = 'button';
    stop.textContent = 'Stop';
    stop.title = 'Stop this computation; the plot keeps the last result';
    stop.addEventListener('click', () => this.stopComputing());
    this.progressEl.append(bar, progressText, stop);

    this.controlsHost = document.createElement('div');
    for (const approach of ['pointerenter', 'focusin']) this.controlsHost.addEventListener(approach, () => this.warmUp(), { once: true });
    this.el.append(header, this.messageEl, this.controlsHost, this.progressEl, this.plot, footer);
    this.buildControls();

    this.listenTo(this.model, 'change:values', (_m: unknown, _v: unknown, options: { updated_view?: unknown }) => {
      if (options?.updated_view !== this) this.valuesPushed();
    });
    this.listenTo(this.model, 'change:result change:error', (_m: unknown, _v: unknown, options: { updated_view?: unknown }) => {
      if (options?.updated_view !== this) this.showModelState();
    });
    this.listenTo(this.model, 'change:spec change:options change:kind', () => {
      this.buildControls();
      this.refresh();
    });

    void this.displayed.then(() => {
      this.attached = true;
      this.refresh();
      this.warmWhenSeen();
    });
  }

  override remove(): this {
    this.attached = false;
    this.seen?.disconnect();
    if (this.settleTimer !== null) clearTimeout(this.settleTimer);
    if (this.staleTimer !== null) clearTimeout(this.staleTimer);
    Plotly.purge(this.plot);
    this.client?.dispose();
    this.client = null;
    this.controls?.dispose();
    return super.remove();
  }

  private parameterOrder(): string[] {
    const declared = Object.keys(this.spec?.parameters ?? {});
    const saved = (this.model.get('parameter_order') as string[] | undefined) ?? [];
    return [...saved.filter((k) => declared.includes(k)), ...declared.filter((k) => !saved.includes(k))];
  }

  private get spec(): ModelSpecView {
    return this.model.get('spec') as ModelSpecView;
  }

  private context(values: Values): FigureContext {
    return { spec: this.spec, values, options: this.model.get('options') as Record<string, unknown> };
  }

  private buildControls(): void {
    this.controls?.dispose();
    const spec = this.spec;
    const kind = this.model.get('kind') as WidgetKind;
    this.titleEl.textContent = this.model.get('title') || `${figureTitle(kind)} · ${spec?.name ?? 'no model'}`;
    this.live = { ...(this.model.get('values') as Values) };
    if (!spec) return;
    const ordered: Record<string, ControlDecl> = Object.fromEntries(this.parameterOrder().map((k) => [k, spec.parameters[k]]));
    // Request options with a slider follow the parameters (contract/option-sliders.ts).
    const options = this.model.get('options') as Record<string, unknown>;
    for (const [name, slider] of Object.entries(optionSlidersOf(options))) {
      if (Object.hasOwn(ordered, name)) continue;
      ordered[name] = { default: optionStart(name, slider, options), range: slider.range, step: slider.step ?? undefined, doc: `request option "${name}"` };
    }
    this.controls = createParameterControls(
      ordered,
      this.live,
      (name, value) => this.controlMoved(name, value),
      (message) => this.showMessage('error', message),
    );
    this.controlsHost.append(this.controls.element);
  }

  /** Draw the saved result when it matches the values; otherwise compute. */
  private refresh(): void {
    if (!this.attached) return;
    // A damaged saved state says so when the widget loads, not when a control first moves.
    const damaged = diagnosticStateProblem(this.model.attributes);
    if (damaged !== null) {
      this.showMessage('error', `This widget's saved state is damaged: ${damaged}. Re-run the cell that made it to rebuild it.`);
      this.el.dispatchEvent(new CustomEvent('chernel-error', { bubbles: true, detail: { message: damaged } }));
      return;
    }
    const result = this.model.get('result') as ViewResult | null;
    const error = this.model.get('error') as string;
    if (result && this.model.answers(this.model.get('result_values'), this.live)) {
      this.draw(result, this.live, null);
      if (error) this.showMessage('error', error);
    } else if (this.spec) {
      this.recompute();
    }
  }

  private showModelState(): void {
    const result = this.model.get('result') as ViewResult | null;
    const error = this.model.get('error') as string;
    if (error) this.showMessage('error', error);
    else if (result) this.draw(result, this.model.get('result_values') ?? this.live, null);
  }

  private valuesPushed(): void {
    this.live = { ...this.live, ...(this.model.get('values') as Values) };
    this.controls?.setValues(this.live);
    this.refresh();
  }

  private controlMoved(name: string, value: number): void {
    this.moveTo({ [name]: value });
  }

  /** New parameter values from a control or the phase-map marker. */
  private moveTo(changes: Values): void {
    this.live = { ...this.live, ...changes };
    this.model.set('values', { ...this.live }, { updated_view: this });
    const result = this.model.get('result') as ViewResult | null;
    if (result && this.model.answers(this.model.get('result_values'), this.live)) {
      // Only swept parameters moved: same map, the marker moves.
      this.sync();
      this.draw(result, this.live, null);
    } else {
      this.recompute();
    }
  }

  /** Dragging the phase-map marker (an editable shape) or clicking the map sets the swept values. */
  private bindPlotEvents(): void {
    if (this.plotEventsBound) return;
    this.plotEventsBound = true;
    const gd = this.plot as unknown as PlotlyHTMLElement;
    // Where the plot area is after every plotly draw (a redraw, a resize, a zoom); this first
    // draw's event has passed already.
    gd.on('plotly_afterplot', () => this.preview.measure());
    this.preview.measure();
    gd.on('plotly_relayout', (update) => {
      const swept = this.model.sweptParameters();
      if (swept.length === 0) return;
      const shapes = (gd as unknown as { layout: { shapes?: { name?: string; x0: number; x1: number; y0: number; y1: number }[] } }).layout.shapes ?? [];
      const i = shapes.findIndex((sh) => sh.name === PHASE_POINT_SHAPE);
      if (i < 0 || !Object.keys(update).some((key) => key.startsWith(`shapes[${i}]`))) return;
      const sh = shapes[i];
      const changes: Values = { [swept[0]]: (sh.x0 + sh.x1) / 2 };
      if (swept[1] !== undefined) changes[swept[1]] = (sh.y0 + sh.y1) / 2;
      this.pointChosen(changes);
    });
    gd.on('plotly_click', (event) => {
      const swept = this.model.sweptParameters();
      const point = event.points[0];
      if (swept.length < 2 || point === undefined || typeof point.x !== 'number' || typeof point.y !== 'number') return;
      this.pointChosen({ [swept[0]]: point.x, [swept[1]]: point.y });
    });
  }

  private pointChosen(changes: Values): void {
    const clamped: Values = {};
    for (const [name, value] of Object.entries(changes)) {
      const range = this.spec?.parameters[name]?.range;
      clamped[name] = range ? Math.min(range[1], Math.max(range[0], value)) : value;
    }
    this.controls?.setValues(clamped);
    this.moveTo(clamped);
  }

  private engine(): LatestWinsClient {
    this.client ??= new LatestWinsClient(workerFactory, (outcome) => this.computed(outcome), splitPlan(engineWorkers()), (fraction) => this.showProgress(fraction));
    return this.client;
  }

  /**
   * Once the view is first on screen (a saved notebook opens, drawn from its saved result): start
   * the workers and warm them on the current values, so that the first drag step is not cold.
   */
  private warmWhenSeen(): void {
    if (typeof IntersectionObserver === 'undefined') return this.warmUp();
    this.seen = new IntersectionObserver((entries) => {
      if (!entries.some((entry) => entry.isIntersecting)) return;
      this.seen?.disconnect();
      this.warmUp();
    });
    this.seen.observe(this.el);
  }

  /** The hand nears the controls: start the workers now, so the first drag steps are not cold. */
  private warmUp(): void {
    if (this.attached && this.spec) this.engine().warm(this.model.request(this.live));
  }

  private recompute(): void {
    this.engine().submit(this.model.request(this.live));
    this.markComputing();
  }

  /**
   * Fades the plot as stale once a computation has taken STALE_AFTER_MS: a drag step's result comes
   * sooner, and fading the whole plot in and out on every step would repaint all of it twice.
   */
  private markComputing(): void {
    if (this.staleTimer !== null || this.plot.classList.contains('chernel-stale')) return;
    this.staleTimer = setTimeout(() => {
      this.staleTimer = null;
      if (!(this.client?.busy ?? false)) return;
      this.plot.classList.add('chernel-stale');
      this.statusEl.textContent = 'computing…';
    }, STALE_AFTER_MS);
  }

  /** A result is drawn: the plot is current unless a newer computation is still running. */
  private computingDone(busy: boolean): void {
    if (this.staleTimer !== null) clearTimeout(this.staleTimer);
    this.staleTimer = null;
    if (busy) this.markComputing();
    else this.plot.classList.remove('chernel-stale');
  }

  /** A phase map on its way: how far, about how long is left, and a way to stop it. */
  private showProgress(fraction: number): void {
    if (!this.attached) return;
    const now = performance.now();
    this.progressStarted ??= now;
    const elapsed = now - this.progressStarted;
    const left = fraction > 0.02 ? ` · about ${Math.max(1, Math.round((elapsed * (1 - fraction)) / fraction / 1000))} s left` : '';
    (this.progressEl.querySelector('progress') as HTMLProgressElement).value = fraction;
    (this.progressEl.querySelector('span') as HTMLElement).textContent = `computing: ${Math.round(fraction * 100)}%${left}`;
    this.progressEl.dataset.active = 'true';
  }

  private hideProgress(): void {
    this.progressStarted = null;
    delete this.progressEl.dataset.active;
  }

  /** The stop button: the workers end; the plot keeps the last result, and the message says so. */
  private stopComputing(): void {
    const stopped = this.client?.stop() ?? null;
    this.hideProgress();
    if (this.staleTimer !== null) clearTimeout(this.staleTimer);
    this.staleTimer = null;
    this.plot.classList.remove('chernel-stale');
    if (stopped === null) return;
    const stoppedAt = requestValues(this.model.get('options') as Record<string, unknown>, stopped);
    const values = describeValues(stoppedAt, this.parameterOrder());
    this.showMessage('warning', `Stopped: nothing was computed for ${values}; the plot shows the last result.`);
    this.statusEl.textContent = `stopped at ${values}`;
    this.el.dispatchEvent(new CustomEvent('chernel-stopped', { bubbles: true, detail: { values: stoppedAt } }));
  }

  private computed(outcome: Outcome): void {
    if (!this.attached) return;
    if (!(this.client?.busy ?? false)) this.hideProgress();
    const values = requestValues(this.model.get('options') as Record<string, unknown>, outcome.request);
    if (outcome.error) {
      const message = `${outcome.error.name}: ${outcome.error.message}`;
      this.model.set({ error: message, values: { ...this.live } }, { updated_view: this });
      this.sync();
      this.showMessage('error', message);
      this.statusEl.textContent = `failed for ${describeValues(values, this.parameterOrder())}`;
      this.plot.classList.toggle('chernel-stale', !this.client?.busy);
      this.el.dispatchEvent(new CustomEvent('chernel-error', { bubbles: true, detail: { message } }));
      return;
    }
    const result = outcome.result as ViewResult;
    this.model.set({ result, result_values: values, error: '', values: { ...this.live } }, { updated_view: this });
    // During a drag the kernel hears once the drag rests (with the full redraw), not on every step:
    // a result is tens of kilobytes, and the page would serialise each one while the pointer moves.
    if (!this.draw(result, values, outcome)) this.sync();
  }

  /** Send values and result to the kernel when one is connected (not in an exported page). */
  private sync(): void {
    if (this.model.comm_live) this.touch();
  }

  /**
   * Draws a result; true when it was a drag preview (plotly and the kernel follow at rest). `full`:
   * redraw everything through plotly even where a preview would do (the drag has rested).
   */
  private draw(result: ViewResult, values: Values, outcome: Outcome | null, full = false): boolean {
    if (!this.attached) return false;
    let figure: Figure;
    const started = performance.now();
    try {
      figure = figureFor(result, this.context(values));
    } catch (err) {
      this.showMessage('error', (err as Error).message);
      return false;
    }
    this.figure = figure;
    this.summaryEl.textContent = figure.summary;
    this.summaryEl.dataset.gapless = String(figure.gapless);
    this.summaryEl.dataset.invariant = figure.invariant === null ? '' : String(figure.invariant);
    const warnings = result.checks?.warnings ?? [];
    if (figure.gapless) {
      this.showMessage('warning', ['Gapless: the invariant is withheld; the cross marks where the gap closes.', ...warnings].join('\n'));
    } else if (warnings.length > 0) {
      this.showMessage('warning', warnings.join('\n'));
    } else {
      this.showMessage(null, '');
    }
    const busy = this.client?.busy ?? false;
    // A drag step whose figure keeps the frame of the one plotly shows draws only its picture and
    // title, without plotly; the full redraw (hover values included) follows once the drag rests.
    const title = (figure.layout.title as { text?: string } | undefined)?.text ?? '';
    const previewed =
      !full && outcome !== null && figure.frameKey !== undefined && figure.frameKey === this.drawnFrameKey && this.preview.show(figure, title);
    const figureMs = performance.now() - started;
    if (this.settleTimer !== null) clearTimeout(this.settleTimer);
    this.settleTimer = null;
    let drawn: Promise<unknown>;
    if (previewed) {
      drawn = Promise.resolve();
      this.settleTimer = setTimeout(() => {
        this.settleTimer = null;
        // Still computing: the drag goes on, and the next result re-arms this.
        if (this.client?.busy ?? false) return;
        this.draw(result, values, outcome, true);
        this.sync();
      }, SETTLE_MS);
    } else {
      drawn = this.plotFull(figure);
    }
    void drawn.then(() => {
      if (!this.attached) return;
      this.computingDone(busy);
      this.statusEl.textContent = outcome
        ? `${describeValues(values, this.parameterOrder())} · engine ${outcome.computeMs.toFixed(0)} ms`
        : `${describeValues(values, this.parameterOrder())} · ${this.model.comm_live ? 'computed by the kernel' : 'saved result'}`;
      const detail: DrawnDetail = {
        summary: figure.summary,
        invariant: figure.invariant,
        gapless: figure.gapless,
        latency: outcome ? outcome.latency : null,
        computeMs: outcome ? outcome.computeMs : null,
        figureMs,
        plotMs: performance.now() - started - figureMs,
        previewed,
      };
      this.el.dispatchEvent(new CustomEvent('chernel-drawn', { bubbles: true, detail }));
    });
    return previewed;
  }

  /** The whole figure through plotly (traces, axes, colour bar), with its raster as an image. */
  private plotFull(figure: Figure): Promise<unknown> {
    // A phase map's only shape is its current point: let the pointer move it directly.
    const config = this.model.sweptParameters().length > 0 ? { ...PLOT_CONFIG, edits: { shapePosition: true } } : PLOT_CONFIG;
    const layout = { ...figure.layout, images: figure.raster ? [rasterImage(figure.raster)] : [] };
    this.drawnFrameKey = null;
    return Plotly.react(this.plot, plotlyTraces(figure.data), layout, config).then(() => {
      this.preview.hide();
      if (!this.attached) return;
      this.bindPlotEvents();
      this.drawnFrameKey = figure.frameKey ?? null;
    });
  }

  private showMessage(level: 'error' | 'warning' | null, text: string): void {
    if (level === null) delete this.messageEl.dataset.level;
    else this.messageEl.dataset.level = level;
    this.messageEl.textContent = text;
  }

  private fileStem(): string {
    return safeFileName(`${this.spec?.name ?? 'model'}-${this.model.get('kind')}`);
  }

  private exportFigure(format: 'png' | 'svg'): void {
    if (this.figure === null) return;
    void downloadFigure(this.plot, format, this.fileStem());
  }

  private exportData(format: 'csv' | 'json'): void {
    const result = this.model.get('result') as ViewResult | null;
    if (!result) return;
    const values = (this.model.get('result_values') as Values | null) ?? this.live;
    const text =
      format === 'csv'
        ? toCsv(tableFor(result, this.context(values)))
        : resultJson({ request: { ...this.model.request(values), model: this.spec }, result });
    downloadText(text, `${this.fileStem()}.${format}`, format === 'csv' ? 'text/csv' : 'application/json');
  }
}

/** "t1 = 1, M = 0.2", in the model's own parameter order (saved state may have sorted the keys). */
function describeValues(values: Values, order: string[] = []): string {
  const names = [...order.filter((k) => k in values), ...Object.keys(values).filter((k) => !order.includes(k))];
  return names.map((k) => `${k} = ${formatValue(values[k])}`).join(', ');
}
