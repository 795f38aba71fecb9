/** chernel-widgets: the JupyterLab extension (default export) and the widget classes. */
import { widgetsPlugin } from './plugin.js';

export { DiagnosticModel, DiagnosticView, MODULE_NAME, MODULE_VERSION } from './widget.js';
export default widgetsPlugin;
