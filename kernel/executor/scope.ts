/**
 * What the kernel adds to cell scope beside the engine: `display`, `clearOutput`, `progress`,
 * `input`. They run in the worker and talk to the host through `post`.
 */

import { randomUUID } from 'node:crypto';
import { displayOutputs } from '../display/index.js';
import { progressBundle, type ProgressState } from '../display/progress.js';
import type { WorkerToHost } from './channel.js';

export interface ScopeHost {
  post(message: WorkerToHost): void;
  requestInput(prompt: string, password: boolean): Promise<string>;
}

/**
 * Posts a value's outputs under one display id: the first output under the id itself, a second one
 * (an engine result's figure) under `${id}-1`, so an update replaces each in place.
 */
export function postDisplay(host: Pick<ScopeHost, 'post'>, value: unknown, displayId: string, update: boolean): void {
  displayOutputs(value).forEach((output, i) => host.post({ type: 'display', output, displayId: i === 0 ? displayId : `${displayId}-${i}`, update }));
}

/** Returned by `display()`; not itself shown as a cell's value. */
export class DisplayHandle {
  constructor(
    readonly displayId: string,
    private readonly host: ScopeHost,
  ) {}

  /** Replace what this display shows, in place. */
  update(value: unknown): void {
    postDisplay(this.host, value, this.displayId, true);
  }
}

export interface DisplayOptions {
  /** Reuse a display id (to update it later with `update: true`). */
  displayId?: string;
  update?: boolean;
}

/** What `progress().update` accepts: a count (with optional total), or `{done, total}`, or `{fraction}`. */
export type ProgressInput = number | { done?: number; total?: number; fraction?: number };

export interface ProgressBar {
  /** Bound: pass it as an engine call's `onProgress`. */
  readonly update: (progress: ProgressInput, total?: number) => void;
  /** Ends the bar; with a value, the bar is replaced by that value's display. */
  finish(result?: unknown): void;
}

const MIN_INTERVAL_MS = 100;

export function createScope(host: ScopeHost): Record<string, unknown> {
  function display(value: unknown, options: DisplayOptions = {}): DisplayHandle {
    const displayId = options.displayId ?? randomUUID();
    postDisplay(host, value, displayId, options.update === true);
    return new DisplayHandle(displayId, host);
  }

  function clearOutput(wait = false): void {
    host.post({ type: 'clear_output', wait });
  }

  function input(prompt = '', options: { password?: boolean } = {}): Promise<string> {
    return host.requestInput(String(prompt), options.password === true);
  }

  function progress(label = '', total?: number): ProgressBar {
    const displayId = randomUUID();
    // Without a total, numbers are fractions of the work (what the engine's onProgress reports).
    const state: ProgressState = { label, done: 0, total: total ?? 1, finished: false };
    let lastSent = 0;
    const show = (update: boolean): void => {
      lastSent = Date.now();
      host.post({ type: 'display', output: progressBundle(state), displayId, update });
    };
    show(false);
    const update = (p: ProgressInput, newTotal?: number): void => {
      if (state.finished) return;
      if (typeof p === 'number') {
        state.done = p;
        if (newTotal !== undefined) state.total = newTotal;
      } else if (typeof p.fraction === 'number') {
        state.done = p.fraction;
        state.total = 1;
      } else {
        if (typeof p.done === 'number') state.done = p.done;
        if (typeof p.total === 'number') state.total = p.total;
      }
      const complete = state.total !== null && state.done >= state.total;
      if (complete || Date.now() - lastSent >= MIN_INTERVAL_MS) show(true);
    };
    return {
      update,
      finish(result?: unknown) {
        if (state.finished) return;
        state.finished = true;
        if (state.total !== null) state.done = state.total;
        if (result === undefined) show(true);
        else {
          // The bar becomes the result's summary; its figure, if any, is a new output below.
          const [summary, ...rest] = displayOutputs(result);
          host.post({ type: 'display', output: summary, displayId, update: true });
          rest.forEach((output, i) => host.post({ type: 'display', output, displayId: `${displayId}-${i + 1}`, update: false }));
        }
      },
    };
  }

  return { display, clearOutput, input, progress };
}
