/**
 * The kernelspec named `chernel`: kernel.json (absolute paths of node and of the kernel), logos,
 * installed for the user (default), under a prefix (`DIR/share/jupyter/kernels/chernel/`) or under
 * the Python environment's prefix (`--sys-prefix`).
 */

import { execFileSync } from 'node:child_process';
import { existsSync, mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { homedir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { installLabExtension, removeLabExtension } from './labextension.js';
import { logoPng, logoSvg } from './logo.js';

export const KERNEL_NAME = 'chernel';
export const DISPLAY_NAME = 'TypeScript (chernel)';

export type InstallTarget = { kind: 'user' } | { kind: 'prefix'; dir: string } | { kind: 'sys-prefix' };

/** Jupyter's per-user data directory, as jupyter_core computes it. */
export function userDataDir(): string {
  if (process.env.JUPYTER_DATA_DIR) return process.env.JUPYTER_DATA_DIR;
  if (process.platform === 'darwin') return join(homedir(), 'Library', 'Jupyter');
  if (process.platform === 'win32') return join(process.env.APPDATA ?? homedir(), 'jupyter');
  return join(process.env.XDG_DATA_HOME || join(homedir(), '.local', 'share'), 'jupyter');
}

function pythonPrefix(): string {
  try {
    return execFileSync('python3', ['-c', 'import sys; print(sys.prefix)'], { encoding: 'utf8' }).trim();
  } catch (error) {
    throw new Error(`--sys-prefix: could not ask python3 for sys.prefix (${(error as Error).message}); use --prefix DIR instead`);
  }
}

export function dataDir(target: InstallTarget): string {
  switch (target.kind) {
    case 'user':
      return userDataDir();
    case 'prefix':
      return join(target.dir, 'share', 'jupyter');
    case 'sys-prefix':
      return join(pythonPrefix(), 'share', 'jupyter');
  }
}

export function kernelJson(): Record<string, unknown> {
  return {
    argv: [process.execPath, fileURLToPath(new URL('./main.js', import.meta.url)), 'start', '{connection_file}'],
    display_name: DISPLAY_NAME,
    language: 'typescript',
    interrupt_mode: 'message',
    metadata: { debugger: false },
  };
}

export interface Installed {
  kernelspec: string;
  labextension: string | null;
}

export function install(target: InstallTarget): Installed {
  const base = dataDir(target);
  const dir = join(base, 'kernels', KERNEL_NAME);
  mkdirSync(dir, { recursive: true });
  writeFileSync(join(dir, 'kernel.json'), JSON.stringify(kernelJson(), null, 2) + '\n');
  writeFileSync(join(dir, 'logo-32x32.png'), logoPng(32));
  writeFileSync(join(dir, 'logo-64x64.png'), logoPng(64));
  writeFileSync(join(dir, 'logo-svg.svg'), logoSvg());
  return { kernelspec: dir, labextension: installLabExtension(base) };
}

/** Returns the removed kernelspec folder, or null if there was none. */
export function remove(target: InstallTarget): string | null {
  const base = dataDir(target);
  removeLabExtension(base);
  const dir = join(base, 'kernels', KERNEL_NAME);
  if (!existsSync(dir)) return null;
  rmSync(dir, { recursive: true, force: true });
  return dir;
}
