/**
 * The Slurm job-array script for one round of a sweep: task i runs shard i of N. Requeued tasks
 * (pre-emption, node failure) resume from their shard's own output.
 */
import { ModelError, valueText } from '../src/model/errors.js';

export interface SlurmOptions {
  partition?: string;
  /** Wall time per task, in Slurm's format (e.g. "00:30:00"). */
  time?: string;
  cpusPerTask?: number;
  /** Memory per node, in Slurm's format (e.g. "2G"). */
  mem?: string;
  account?: string;
}

export interface ScriptOptions extends SlurmOptions {
  shards: number;
  name: string;
  /** Where Slurm writes each task's log. */
  logDir: string;
  /** The directory the tasks run in. */
  workdir: string;
  /** The command a task runs; `--workers` is appended from the task's CPU count. */
  command: string[];
}

/** Quote a word for bash. */
function quote(word: string): string {
  return /^[A-Za-z0-9_\-+=.,/:@%]+$/.test(word) ? word : `'${word.replace(/'/g, `'\\''`)}'`;
}

function checkOption(field: string, value: string | undefined, pattern: RegExp, example: string): void {
  if (value !== undefined && !pattern.test(value)) throw new ModelError(field, `expected something like ${example}. Value: ${valueText(value)}`);
}

export function sbatchScript(o: ScriptOptions): string {
  checkOption('partition', o.partition, /^[A-Za-z0-9_.,-]+$/, '"batch"');
  checkOption('time', o.time, /^(\d+-)?\d+(:\d+){0,2}$/, '"00:30:00" or "1-00:00:00"');
  checkOption('mem', o.mem, /^\d+[KMGT]?$/, '"2G"');
  checkOption('account', o.account, /^[A-Za-z0-9_.-]+$/, '"myproject"');
  if (o.cpusPerTask !== undefined && (!Number.isInteger(o.cpusPerTask) || o.cpusPerTask < 1)) {
    throw new ModelError('cpus-per-task', `expected a whole number >= 1. Value: ${valueText(o.cpusPerTask)}`);
  }
  const lines = [
    '#!/bin/bash',
    `#SBATCH --job-name=${quote(o.name)}`,
    `#SBATCH --array=0-${o.shards - 1}`,
    `#SBATCH --output=${quote(`${o.logDir}/slurm-%A_%a.log`)}`,
    '#SBATCH --open-mode=append',
    '#SBATCH --requeue',
    `#SBATCH --ntasks=1`,
  ];
  if (o.partition !== undefined) lines.push(`#SBATCH --partition=${o.partition}`);
  if (o.time !== undefined) lines.push(`#SBATCH --time=${o.time}`);
  if (o.cpusPerTask !== undefined) lines.push(`#SBATCH --cpus-per-task=${o.cpusPerTask}`);
  if (o.mem !== undefined) lines.push(`#SBATCH --mem=${o.mem}`);
  if (o.account !== undefined) lines.push(`#SBATCH --account=${o.account}`);
  lines.push(
    '# Written by `chernel sweep submit`. Task i computes shard i (from SLURM_ARRAY_TASK_ID).',
    `cd ${quote(o.workdir)}`,
    `exec ${o.command.map(quote).join(' ')} --workers "\${SLURM_CPUS_PER_TASK:-1}"`,
    '',
  );
  return lines.join('\n');
}
