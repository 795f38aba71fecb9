/**
 * The one record format of a finished sweep point, as checkpoints (run.ts), plans and shard outputs
 * (plan.ts) store it: a JSON array, short because a map has thousands of them.
 *
 *   [coords, value, gap]                                a point
 *   [coords, value, gap, 1]                             a point its diagnostic flagged (doubtful)
 *   [coords, value, gap, doubtful, standardError]       an averaged point: doubtful 0 or 1, the
 *                                                       standard error a number or null (too few members)
 *
 * coords are the swept values in axis order; value is null where the quantity is not defined; gap
 * is null where it is not a number (JSON has no NaN). Records written before averaged points kept
 * their error (the first two forms) still load: such a point simply has none.
 *
 * A plan that splits each averaged point's ensemble into blocks of members (plan.ts,
 * `membersPerTask`) has its shards write one record per finished block instead:
 *
 *   [coords, first, values]                             members first, first + 1, ... of the point's
 *                                                       ensemble, each value a number or null (gave none)
 *
 * The values themselves, not a summary, so the merge joins them in member order and computes the
 * point exactly as the unsplit ensemble does (blocks.ts).
 */
import { ModelError, valueText } from '../model/errors.js';
import { pointKey, type PointOutcome } from './sweep.js';

export type PointRecord =
  | [coords: number[], value: number | null, gap: number]
  | [coords: number[], value: number | null, gap: number, doubtful: 1]
  | [coords: number[], value: number | null, gap: number, doubtful: 0 | 1, standardError: number | null];

export type BlockRecord = [coords: number[], first: number, values: (number | null)[]];

const isNumberOrNull = (x: unknown): boolean => x === null || typeof x === 'number';

/** One point's record (the shortest form that keeps everything the outcome says). */
export function pointRecord(coords: number[], o: PointOutcome): PointRecord {
  if (o.standardError !== undefined) return [coords, o.value, o.gap, o.doubtful === true ? 1 : 0, o.standardError];
  return o.doubtful === true ? [coords, o.value, o.gap, 1] : [coords, o.value, o.gap];
}

/** A record read back, or null when it is not one of the three forms for `dims` swept parameters. */
function outcomeOf(rec: unknown, dims: number): { coords: number[]; outcome: PointOutcome } | null {
  if (!Array.isArray(rec) || rec.length < 3 || rec.length > 5) return null;
  const [coords, value, gap, doubtful, standardError] = rec as unknown[];
  if (!Array.isArray(coords) || coords.length !== dims || !coords.every((x: unknown) => typeof x === 'number' && Number.isFinite(x))) return null;
  if (!isNumberOrNull(value) || !isNumberOrNull(gap)) return null;
  if (rec.length === 4 && doubtful !== 1) return null;
  if (rec.length === 5 && ((doubtful !== 0 && doubtful !== 1) || !isNumberOrNull(standardError))) return null;
  const outcome: PointOutcome = { value: value as number | null, gap: (gap as number | null) ?? Number.NaN };
  if (doubtful === 1) outcome.doubtful = true;
  if (rec.length === 5) outcome.standardError = standardError as number | null;
  return { coords: coords as number[], outcome };
}

/** Records -> known points, checking each record's shape (errors name `field[n]`). */
export function recordsToPoints(records: readonly unknown[], dims: number, field: string): Map<string, PointOutcome> {
  const known = new Map<string, PointOutcome>();
  records.forEach((rec, n) => {
    const read = outcomeOf(rec, dims);
    if (read === null) {
      throw new ModelError(`${field}[${n}]`, `expected [[${dims} coordinates], value or null, gap] (then 1 when doubtful, or doubtful 0/1 and a standard error). Value: ${valueText(rec)}`);
    }
    known.set(pointKey(read.coords), read.outcome);
  });
  return known;
}

/**
 * A block record read back, checking its shape: errors name `field[n]` and the part that is wrong.
 * Whether the block is one of the point's blocks is the plan's to check (blocks.ts).
 */
export function readBlockRecord(rec: unknown, dims: number, field: string): { coords: number[]; first: number; values: (number | null)[] } {
  if (!Array.isArray(rec) || rec.length !== 3) throw new ModelError(field, `expected a block record [[${dims} coordinates], first member, [member values or null]]. Value: ${valueText(rec)}`);
  const [coords, first, values] = rec as unknown[];
  if (!Array.isArray(coords) || coords.length !== dims || !coords.every((x: unknown) => typeof x === 'number' && Number.isFinite(x))) {
    throw new ModelError(`${field}.coords`, `expected ${dims} finite coordinates. Value: ${valueText(coords)}`);
  }
  if (typeof first !== 'number' || !Number.isInteger(first) || first < 0) throw new ModelError(`${field}.first`, `expected a member index >= 0. Value: ${valueText(first)}`);
  if (!Array.isArray(values) || values.length === 0 || !values.every((v: unknown) => v === null || (typeof v === 'number' && Number.isFinite(v)))) {
    throw new ModelError(`${field}.values`, `expected a non-empty array of member values (finite numbers, or null where a member gave none). Value: ${valueText(values)}`);
  }
  return { coords: coords as number[], first, values: values as (number | null)[] };
}

/** Known points -> records, in key order (so equal sets give equal files). */
export function pointsToRecords(known: ReadonlyMap<string, PointOutcome>): PointRecord[] {
  return [...known.keys()].sort().map((k) => pointRecord(k.split(',').map(Number), known.get(k)!));
}
