// Entry of the chernel lab: starts JupyterLab with the plugins of every package listed under
// `jupyterlab.extensions` in lab/package.json (build/extensions.js is generated from that list).
import { PageConfig } from '@jupyterlab/coreutils';

// Chunks and assets load from the server's static URL; this must run before any dynamic import.
// eslint-disable-next-line no-undef
__webpack_public_path__ = PageConfig.getOption('fullStaticUrl') + '/';

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

async function main() {
  await import('../build/style.js');
  const { JupyterLab } = await import('@jupyterlab/application');
  const { pluginModules, mimeRendererModules } = await import('../build/extensions.js');

  const load = loaders => Promise.all(loaders.map(load => load()));
  const mimeExtensions = await load(mimeRendererModules);
  const plugins = (await load(pluginModules))
    .flatMap(pluginsOf)
    .filter(plugin => !LEFT_OUT.some(pattern => pattern.test(plugin.id)));

  const lab = new JupyterLab({ mimeExtensions });
  lab.registerPlugins(plugins);
  await lab.start();
  await lab.restored;
  // The handle browser tests (and curious users in the console) reach the app through.
  window.chernelLab = lab;
  document.body.dataset.chernelLab = 'ready';
}

main().catch(error => {
  console.error('chernel lab failed to start', error);
  document.body.dataset.chernelLab = 'failed';
});
