/**
 * A lean plotly.js: the core (which carries scatter) plus the two trace types the figures use.
 * The full distribution is ~4.5 MB; this is what keeps the widget bundle small.
 */
import Plotly from 'plotly.js/lib/core';
import heatmap from 'plotly.js/lib/heatmap';
import contour from 'plotly.js/lib/contour';

Plotly.register([heatmap, contour]);

/** The trace types this build draws (scatter comes with the core). */
export const TRACE_TYPES: ReadonlySet<string> = new Set(['scatter', 'heatmap', 'contour']);

export default Plotly;
export type { Data, Layout, Config, PlotlyHTMLElement } from 'plotly.js';
