/**
 * A lean plotly.js: the core (which carries scatter) plus the two trace types the figures use.
 * The full distribution is ~4.5 MB; this is what keeps the widget bundle small.
 */
import type { Data } from 'plotly.js';
import Plotly from 'plotly.js/lib/core';
import contour from 'plotly.js/lib/contour';
import heatmap from 'plotly.js/lib/heatmap';
import type { Data as FigureTrace } from '../../figures/plotly-json.js';

Plotly.register([heatmap, contour]);

/** The trace types this build draws (scatter comes with the core). */
export const TRACE_TYPES: ReadonlySet<string> = new Set(['scatter', 'heatmap', 'contour']);

export default Plotly;
export type { Data, Layout, Config, PlotlyHTMLElement } from 'plotly.js';

/** The figures' traces (plotly's JSON, figures/plotly-json.ts) as plotly.js types them: the attribute values are plotly's to check. */
export const plotlyTraces = (traces: readonly FigureTrace[]): Data[] => traces as unknown as Data[];
