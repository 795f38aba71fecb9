// First module of the chernel lab page, as in JupyterLab's own build: load the prebuilt (federated)
// extensions the server lists in the page config (`federated_extensions`, found in the Jupyter data
// directories' labextensions/), join them to the page's share scope, then start the app (index.js).
// Nothing here may import a shared package: those are available only after the scope is set up.

/** The page config the server wrote into the page (what @jupyterlab/coreutils' PageConfig reads). */
const config = JSON.parse(document.getElementById('jupyter-config-data')?.textContent ?? '{}');

// Chunks and assets load from the server's static URL; this must run before any dynamic import.
// eslint-disable-next-line no-undef
__webpack_public_path__ = config.fullStaticUrl + '/';

function loadScript(url) {
  return new Promise((resolve, reject) => {
    const script = document.createElement('script');
    script.onerror = () => reject(new Error(`could not load ${url}`));
    script.onload = resolve;
    script.async = true;
    script.src = url;
    document.head.appendChild(script);
  });
}

/** A module exposed by an extension's container, e.g. './extension'. */
async function exposed(name, module) {
  const factory = await window._JUPYTERLAB[name].get(module);
  return factory();
}

/**
 * Loads every federated extension's remote entry and initialises its container with the page's
 * share scope; returns their plugin and MIME-renderer modules. An extension that fails is reported
 * on the console and left out, as JupyterLab does, so one broken extension does not stop the page.
 */
async function loadFederatedExtensions() {
  const extensions = config.federated_extensions ?? [];
  const base = config.fullLabextensionsUrl;
  const entries = await Promise.allSettled(extensions.map(ext => loadScript(`${base}/${ext.name}/${ext.load}`).then(() => ext)));
  // eslint-disable-next-line no-undef
  await __webpack_init_sharing__('default');
  const loaded = [];
  for (const entry of entries) {
    if (entry.status === 'rejected') {
      console.error('chernel lab: a federated extension did not load', entry.reason);
      continue;
    }
    const ext = entry.value;
    try {
      // eslint-disable-next-line no-undef
      await window._JUPYTERLAB[ext.name].init(__webpack_share_scopes__.default);
      loaded.push({
        name: ext.name,
        plugins: ext.extension ? await exposed(ext.name, ext.extension) : null,
        mimeExtension: ext.mimeExtension ? await exposed(ext.name, ext.mimeExtension) : null,
      });
      if (ext.style) await exposed(ext.name, ext.style);
    } catch (error) {
      console.error(`chernel lab: the federated extension ${ext.name} failed to start`, error);
    }
  }
  return loaded;
}

async function bootstrap() {
  const federated = await loadFederatedExtensions();
  const { main } = await import('./index.js');
  await main(federated);
}

bootstrap().catch(error => {
  console.error('chernel lab failed to start', error);
  document.body.dataset.chernelLab = 'failed';
});
