/** chernel-widgets: the JupyterLab extension (default export) and the widget classes. */
import { widgetsPlugin } from './plugin.js';

export { DiagnosticModel, DiagnosticView } from './widget.js';
export { WIDGET_MODULE, WIDGET_MODULE_VERSION } from '../../contract/protocol.js';
export default widgetsPlugin;
