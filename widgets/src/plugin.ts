/**
 * The JupyterLab plugin: registers chernel's widget models and views with the widget manager, and
 * watches notebooks for chernel's outputs (notebook-outputs.ts).
 */
import { IJupyterWidgetRegistry } from '@jupyter-widgets/base';
import type { JupyterFrontEnd, JupyterFrontEndPlugin } from '@jupyterlab/application';
import { watchNotebooks } from './notebook-outputs.js';
import { WIDGET_MODULE, WIDGET_MODULE_VERSION } from '../../contract/protocol.js';
import { DiagnosticModel, DiagnosticView } from './widget.js';

export const widgetsPlugin: JupyterFrontEndPlugin<void> = {
  id: 'chernel-widgets:plugin',
  description: 'Live topology widgets for chernel notebooks: curvature, Wannier-centre flow, bands, ribbons, phase maps.',
  requires: [IJupyterWidgetRegistry],
  autoStart: true,
  activate: (app: JupyterFrontEnd, registry: IJupyterWidgetRegistry) => {
    registry.registerWidget({
      name: WIDGET_MODULE,
      version: WIDGET_MODULE_VERSION,
      exports: { DiagnosticModel, DiagnosticView },
    });
    // Figures drawn live, widgets restored from and saved into their own outputs.
    watchNotebooks(app);
  },
};
