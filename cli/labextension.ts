/**
 * Hook for `chernel install`: the widgets' prebuilt JupyterLab extension, when it has been built,
 * is copied to `<data dir>/labextensions/<package name>/` beside the kernelspec, which is where
 * JupyterLab looks for prebuilt extensions. `PREBUILT_DIR` is the output folder of the widgets'
 * labextension build (a folder with the extension's package.json and static/).
 */

import { cpSync, existsSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

export const PREBUILT_DIR = fileURLToPath(new URL('../../widgets/labextension/', import.meta.url));

function extensionName(): string | null {
  const pkg = join(PREBUILT_DIR, 'package.json');
  if (!existsSync(pkg)) return null;
  const name = (JSON.parse(readFileSync(pkg, 'utf8')) as { name?: unknown }).name;
  return typeof name === 'string' ? name : null;
}

/** Installs the prebuilt extension under `dataDir`; returns where, or null if none is built. */
export function installLabExtension(dataDir: string): string | null {
  const name = extensionName();
  if (!name) return null;
  const target = join(dataDir, 'labextensions', name);
  rmSync(target, { recursive: true, force: true });
  cpSync(PREBUILT_DIR, target, { recursive: true });
  // How it came and how to remove it, which JupyterLab's extension listings show (its install.json).
  const install = { packageManager: 'chernel', packageName: name, uninstallInstructions: 'Use `chernel remove` with the options it was installed with' };
  writeFileSync(join(target, 'install.json'), JSON.stringify(install, null, 2) + '\n');
  return target;
}

export function removeLabExtension(dataDir: string): string | null {
  const name = extensionName();
  if (!name) return null;
  const target = join(dataDir, 'labextensions', name);
  if (!existsSync(target)) return null;
  rmSync(target, { recursive: true, force: true });
  return target;
}
