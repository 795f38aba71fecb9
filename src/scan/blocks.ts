/**
 * Averaged points split into blocks of members, so one point's ensemble spreads over cluster shards
 * and a killed shard resumes mid-ensemble (plan.ts). Block b of a point covers members
 * [first + b m, first + (b + 1) m) of the point's ensemble (m = `membersPerTask`, the last block
 * shorter), computed as the same ensemble request with its own `first` and `samples`, so each
 * member keeps the seed it has in the unsplit ensemble (realspace/ensemble.ts: member i, seed + i).
 * Joining a point's blocks lays their member values end to end and summarises them as the unsplit
 * ensemble does: the same numbers in the same order give the same mean and standard error, bit for
 * bit, with null members counted as it counts them.
 */
import { ensemble } from '../diagnostics/kinds/ensemble.js';
import { ModelError, valueText } from '../model/errors.js';
import { ensembleOfValues, type EnsembleDiagnostic } from '../realspace/ensemble.js';
import { checkSeed } from '../realspace/random.js';
import type { ParameterValues } from '../model/spec.js';
import { splitOptionAxis, sweptParams, type PhaseMapRequest, type PointOutcome } from './sweep.js';

/** The ensemble options a block sets in its point's request. */
const BLOCK_OPTIONS = ['first', 'samples'] as const;

/** A block of a point's members: [first, first + samples). */
export interface MemberBlock {
  first: number;
  samples: number;
}

function wholeNumber(x: unknown, field: string, min: number): number {
  if (typeof x !== 'number' || !Number.isInteger(x) || x < min) throw new ModelError(field, `expected a whole number >= ${min}. Value: ${valueText(x)}`);
  return x;
}

/**
 * Check that a plan may split `request`'s points into blocks of `membersPerTask` members: an
 * averaged map whose ensemble size is the same at every point. Errors name the field.
 */
export function checkMembersPerTask(request: PhaseMapRequest, membersPerTask: unknown): number {
  const m = wholeNumber(membersPerTask, 'membersPerTask', 1);
  if (request.quantity !== 'ensemble') {
    throw new ModelError('membersPerTask', `only an averaged map (quantity "ensemble") has members to split; this one maps ${valueText(request.quantity)}`);
  }
  for (const [i, a] of request.axes.entries()) {
    const [option] = splitOptionAxis(a.param);
    if ((BLOCK_OPTIONS as readonly string[]).includes(option)) throw new ModelError(`axes[${i}].param`, `a map split into blocks of members cannot sweep "${option}" (every point needs the same members)`);
  }
  for (const name of BLOCK_OPTIONS) {
    if (Object.hasOwn(request.model.parameters, name)) throw new ModelError('membersPerTask', `model "${request.model.name}" has a parameter "${name}", which a block's own "${name}" would set`);
  }
  wholeNumber(request.samples, 'request.samples', 1);
  wholeNumber(request.first ?? 0, 'request.first', 0);
  return m;
}

/** The blocks of every point of an averaged map, in member order. */
export function memberBlocks(request: PhaseMapRequest, membersPerTask: number): MemberBlock[] {
  const first = (request.first as number | undefined) ?? 0;
  const samples = request.samples as number;
  const blocks: MemberBlock[] = [];
  for (let done = 0; done < samples; done += membersPerTask) blocks.push({ first: first + done, samples: Math.min(membersPerTask, samples - done) });
  return blocks;
}

/** The swept values a block's point function receives: the point's, and the block's members. */
export function blockParams(swept: ParameterValues, block: MemberBlock): ParameterValues {
  return { ...swept, first: block.first, samples: block.samples };
}

/** A block's member values from its point outcome, or what is wrong when the point function gave none that fit. */
export function blockValues(outcome: PointOutcome, block: MemberBlock): (number | null)[] | string {
  const m = outcome.members;
  if (m !== undefined && m.first === block.first && m.values.length === block.samples) return m.values;
  return `the point function returned ${m === undefined ? 'no members' : `members ${m.first}..${m.first + m.values.length - 1}`} for members ${block.first}..${block.first + block.samples - 1}`;
}

/** A point's outcome from its blocks' values, in member order: that of the unsplit ensemble. */
export function joinBlocks(request: PhaseMapRequest, coords: readonly number[], values: readonly (readonly (number | null)[])[]): PointOutcome {
  const point = { ...request, ...sweptParams(request.axes, coords) };
  const result = ensembleOfValues(point.of as EnsembleDiagnostic, checkSeed(point.seed ?? 0), (point.first as number | undefined) ?? 0, values.flat());
  return ensemble.sweep!(result);
}
