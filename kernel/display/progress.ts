/** A progress bar as a MIME bundle; updated in place through its display id. */
import type { DisplayOutput } from '../executor/channel.js';

export interface ProgressState {
  label: string;
  done: number;
  total: number | null;
  finished: boolean;
  /** Said after the bar: the time left, or how long it took. */
  note?: string;
}

export function progressBundle(state: ProgressState): DisplayOutput {
  const fraction = state.total ? Math.min(1, Math.max(0, state.done / state.total)) : null;
  const percent = fraction === null ? '' : `${Math.round(fraction * 100)}%`;
  // A count is shown only when counting items (total > 1); `{fraction}` progress shows a percentage.
  const count = state.total === null ? (state.done > 0 ? ` (${state.done})` : '') : state.total > 1 ? ` (${state.done}/${state.total})` : '';
  const width = 30;
  const filled = fraction === null ? 0 : Math.round(fraction * width);
  const bar = `[${'#'.repeat(filled)}${'.'.repeat(width - filled)}]`;
  const label = state.label.replace(/[&<>]/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;' })[c] ?? c);
  const status = (state.finished ? ' done' : '') + (state.note ? ` · ${state.note.replace(/[&<>]/g, '')}` : '');
  return {
    data: {
      'text/plain': `${state.label} ${bar} ${percent}${count}${status}`.trim(),
      'text/html':
        `<div class="chernel-progress" style="font-family:monospace">${label} ` +
        `<progress ${fraction === null ? '' : `value="${fraction.toFixed(4)}" max="1"`} style="width:16em;vertical-align:middle"></progress> ` +
        `${percent}${count}${status}</div>`,
    },
    metadata: {},
  };
}
