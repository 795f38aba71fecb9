// The chernel lab app: JupyterLab with the plugins of every package listed under
// `jupyterlab.extensions` in lab/package.json (build/extensions.js is generated from that list)
// and of the federated extensions bootstrap.js loaded.

/**
 * Plugins left out because the services they need are not shipped here: the language-server
 * plugins need @jupyterlab/lsp-extension and a language server; the announcements plugin polls
 * the news and update-check API, which jupyterlab_server 2.16 does not serve.
 */
const LEFT_OUT = [/:language-server$/, /^@jupyterlab\/apputils-extension:announcements$/];

function pluginsOf(module) {
  const exported = module.default ?? module;
  return Array.isArray(exported) ? exported : [exported];
}

/** Starts the app; `federated` is bootstrap.js's list of `{name, plugins, mimeExtension}`. */
export async function main(federated) {
  await import('../build/style.js');
  const { JupyterLab } = await import('@jupyterlab/application');
  const { pluginModules, mimeRendererModules } = await import('../build/extensions.js');

  const load = loaders => Promise.all(loaders.map(load => load()));
  const mimeExtensions = [...(await load(mimeRendererModules)), ...federated.flatMap(ext => (ext.mimeExtension ? [ext.mimeExtension] : []))];
  const plugins = [...(await load(pluginModules)), ...federated.flatMap(ext => (ext.plugins ? [ext.plugins] : []))]
    .flatMap(pluginsOf)
    .filter(plugin => !LEFT_OUT.some(pattern => pattern.test(plugin.id)));

  const lab = new JupyterLab({ mimeExtensions });
  lab.registerPlugins(plugins);
  await lab.start();
  await lab.restored;
  // The handles browser tests (and curious users in the console) reach the app through.
  window.chernelLab = lab;
  window.chernelFederatedExtensions = federated.map(ext => ext.name);
  document.body.dataset.chernelLab = 'ready';
}
