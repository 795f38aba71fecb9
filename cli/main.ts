#!/usr/bin/env node
/**
 * `chernel`: start the kernel from a connection file, install / remove its kernelspec, run sweeps,
 * export a notebook as a standalone page.
 *
 *   chernel start <connection-file>        (also: chernel -f <connection-file>; kernel/main.ts)
 *   chernel install [--user | --prefix DIR | --sys-prefix]
 *   chernel remove  [--user | --prefix DIR | --sys-prefix]
 *   chernel sweep plan|run|merge|status|submit ...   (cluster/sweep-cli.ts)
 *   chernel export-html <notebook.ipynb> [-o page.html]
 */

import { install, remove, type InstallTarget } from './kernelspec.js';
import { startKernel } from '../kernel/main.js';
import { KERNEL_VERSION } from '../kernel/protocol/kernel.js';

const USAGE = `usage:
  chernel start <connection-file>      start the kernel (Jupyter does this); also: chernel -f <file>
  chernel install [--user | --prefix DIR | --sys-prefix]
                                       install the kernelspec "chernel" (default: for this user)
  chernel remove [--user | --prefix DIR | --sys-prefix]
                                       remove it
  chernel sweep plan|run|merge|status|submit ...
                                       phase-map sweeps as files, shards and Slurm job arrays
  chernel export-html <notebook.ipynb> [-o page.html]
                                       a standalone page whose widgets recompute with no kernel
  chernel --version`;

class UsageError extends Error {}

function parseTarget(args: string[]): InstallTarget {
  let target: InstallTarget = { kind: 'user' };
  for (let i = 0; i < args.length; i++) {
    const arg = args[i];
    if (arg === '--user') target = { kind: 'user' };
    else if (arg === '--sys-prefix') target = { kind: 'sys-prefix' };
    else if (arg === '--prefix' || arg.startsWith('--prefix=')) {
      const dir = arg.includes('=') ? arg.slice('--prefix='.length) : args[++i];
      if (!dir) throw new UsageError('--prefix: missing directory');
      target = { kind: 'prefix', dir };
    } else throw new UsageError(`unknown option "${arg}"`);
  }
  return target;
}

async function main(argv: string[]): Promise<void> {
  const [command, ...rest] = argv;
  switch (command) {
    case 'start':
    case '-f': {
      if (rest.length !== 1) throw new UsageError(`${command}: expected one connection file, got ${rest.length} arguments`);
      await startKernel(rest[0]);
      return;
    }
    case 'install': {
      const done = install(parseTarget(rest));
      console.log(`installed kernelspec "chernel" in ${done.kernelspec}`);
      if (done.labextension) console.log(`installed the widgets' JupyterLab extension in ${done.labextension}`);
      return;
    }
    case 'remove':
    case 'uninstall': {
      const dir = remove(parseTarget(rest));
      console.log(dir ? `removed ${dir}` : 'no kernelspec "chernel" was installed there');
      return;
    }
    case 'sweep': {
      const { runSweepCli } = await import('../cluster/sweep-cli.js');
      process.exitCode = await runSweepCli(rest);
      return;
    }
    case 'export-html': {
      const { exportHtmlCommand } = await import('./export-html.js');
      process.exitCode = exportHtmlCommand(rest);
      return;
    }
    case '--version':
      console.log(KERNEL_VERSION);
      return;
    case undefined:
    case '-h':
    case '--help':
    case 'help':
      console.log(USAGE);
      return;
    default:
      throw new UsageError(`unknown command "${command}"`);
  }
}

main(process.argv.slice(2)).catch((error: Error) => {
  console.error(`chernel: ${error.message}`);
  if (error instanceof UsageError) console.error(USAGE);
  process.exit(error instanceof UsageError ? 2 : 1);
});
