// Builds chernel-widgets with esbuild:
//   dist/worker.js  the engine (../src) as a Web Worker script, inlined into the two bundles below
//   lib/index.js    the JupyterLab extension module (ES module; @jupyter-widgets/base and
//                   @jupyterlab/* stay external: JupyterLab provides them)
//   dist/embed.js   the exported-page runtime: html-manager + widgets + worker, one classic script
// `node build.mjs --dev` skips minification.
import * as esbuild from 'esbuild';
import { mkdirSync, writeFileSync } from 'node:fs';

const minify = !process.argv.includes('--dev');
const common = {
  bundle: true,
  minify,
  target: 'es2022',
  platform: 'browser',
  logLevel: 'warning',
  legalComments: 'none',
  // Some dependencies (plotly's) still reach for Node's `global`.
  define: { global: 'globalThis', 'process.env.NODE_ENV': '"production"' },
};

const worker = await esbuild.build({ ...common, entryPoints: ['src/worker.ts'], format: 'iife', write: false, metafile: true });
const workerSource = worker.outputFiles[0].text;
mkdirSync('dist', { recursive: true });
writeFileSync('dist/worker.js', workerSource);

/** `import source from 'chernel:worker-source'` gives the worker script as a string. */
const inlineWorker = {
  name: 'inline-worker',
  setup(build) {
    build.onResolve({ filter: /^chernel:worker-source$/ }, (args) => ({ path: args.path, namespace: 'chernel' }));
    build.onLoad({ filter: /.*/, namespace: 'chernel' }, () => ({ contents: `export default ${JSON.stringify(workerSource)};`, loader: 'js' }));
  },
};

const lib = await esbuild.build({
  ...common,
  entryPoints: ['src/index.ts'],
  outfile: 'lib/index.js',
  format: 'esm',
  external: ['@jupyter-widgets/base', '@jupyterlab/*', '@lumino/*'],
  plugins: [inlineWorker],
  metafile: true,
});

const embed = await esbuild.build({
  ...common,
  entryPoints: ['src/embed.ts'],
  outfile: 'dist/embed.js',
  format: 'iife',
  plugins: [inlineWorker],
  loader: { '.css': 'empty', '.svg': 'empty', '.woff': 'empty', '.woff2': 'empty', '.ttf': 'empty', '.eot': 'empty' },
  metafile: true,
});

const size = (meta) => Object.values(meta.outputs).filter((o) => !o.imports || true).reduce((s, o) => s + o.bytes, 0);
const kb = (n) => `${(n / 1024).toFixed(0)} KiB`;
console.log(`chernel-widgets: worker ${kb(workerSource.length)}, lib ${kb(size(lib.metafile))}, embed ${kb(size(embed.metafile))}`);
writeFileSync('dist/meta.json', JSON.stringify({ worker: worker.metafile, lib: lib.metafile, embed: embed.metafile }));
