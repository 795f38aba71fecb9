/**
 * What a diagnostic kind is: one module per kind (./kinds/) declares everything the rest of the
 * project needs to know about it, and `compute`, phase maps, cluster shards, the widget worker and
 * the kernel's summaries read it from the registry (./registry.ts). How a kind splits into parts is
 * declared once beside the joins (topology/parts.ts `SPLIT_ROWS`), which its module points to and a
 * page's main thread reads without loading the engine.
 */
import type { BlochHamiltonian } from '../bloch/hamiltonian.js';
import type { CostEstimate } from '../cost.js';
import { keys, type Exact } from '../model/field-names.js';

/** Every result names its kind (a part of a split request names its own, e.g. 'curvature-part'). */
export interface ResultBase {
  kind: string;
}

/** The engine-wide checks a result carries (the fields a phase-map point reads). */
interface PointChecks {
  checks: { minGap?: number | null; coarse?: boolean; converged?: boolean };
}

/** A request's fields as plain data, before they are known to be well formed (cost estimates read these). */
export type RequestFields = Readonly<Record<string, unknown>>;

/** What one point of a phase map yields: the quantity (null when not defined there) and the gap. */
export interface PointOutcome {
  value: number | null;
  gap: number;
  /** Set when the diagnostic flagged its own result (grid too coarse, not converged): kept, but warned about. */
  doubtful?: boolean;
  /**
   * The standard error of a value that is an average (an ensemble's mean); null when there were too
   * few members for one. Absent when the value is not an average.
   */
  standardError?: number | null;
  /**
   * An average's members: the index of the first and each member's value (null where it gave
   * none), so blocks of one ensemble computed apart join into the unsplit average (scan/blocks.ts).
   */
  members?: { first: number; values: (number | null)[] };
}

/** The fields every request carries besides its options. */
export const COMMON_FIELDS = ['kind', 'model', 'params', 'convention'] as const;

/** The options of a kind, less the ones every request carries (`params`, `convention`). */
export type OwnOptions<O> = Omit<O, 'params' | 'convention'>;

/** Exactly the option names of O (each once, none extra): the compiler checks the list. */
export const optionNames = <O>(table: Exact<OwnOptions<O>>): readonly string[] => keys<OwnOptions<O>>(table);

export interface Diagnostic<O = object, R extends ResultBase = ResultBase> {
  /** The request's `kind`, and the result's. */
  readonly kind: string;
  /** The options a request may carry besides kind, model, params and convention (`optionNames`). */
  readonly options: readonly string[];
  /** The fields of options that are objects, by option. */
  readonly nested?: Readonly<Record<string, readonly string[]>>;
  /** Runs on a compiled model whose parameter values are set. */
  run(h: BlochHamiltonian, options: O): R;
  /** Memory and time before it runs, from the model's orbital count `n` and periodic dimension `dim`. */
  cost(request: RequestFields, n: number, dim: number): CostEstimate;
  /** The fields whose size drives the cost, in the order a refusal names them (default: the grid). */
  sizeFields?(request: RequestFields): readonly string[];
  /** What a phase map reads at each point; absent when the kind cannot be swept. */
  sweep?(result: R): PointOutcome;
  /**
   * False when the swept value is not quantised (a gap, an average): its phase map is a continuous
   * map, with no boundaries between values to locate. Default true.
   */
  readonly quantised?: boolean;
  /**
   * Results computed in parts (the `part: {index, count}` option) and joined exactly: the rows a
   * request has, so a host knows how many parts are worth making. Absent when it does not split.
   */
  splitRows?(request: RequestFields): number;
  /** The result fields that answer the question, shown first by summaries. */
  readonly headline: readonly string[];
}

/** A kind a phase map can sweep: it has a scalar per point. */
export type SweptDiagnostic<O, R extends ResultBase> = Diagnostic<O, R> & Required<Pick<Diagnostic<O, R>, 'sweep'>>;
/** A kind whose requests split into parts. */
export type SplitDiagnostic<O, R extends ResultBase> = Diagnostic<O, R> & Required<Pick<Diagnostic<O, R>, 'splitRows'>>;

/** The point outcome of a result with a gap check, flagged doubtful when its grid was coarse or not converged. */
export function pointOutcome(value: number | null, result: PointChecks): PointOutcome {
  const c = result.checks;
  const gap = typeof c.minGap === 'number' ? c.minGap : Number.NaN;
  const doubtful = c.coarse === true || c.converged === false;
  return doubtful ? { value, gap, doubtful } : { value, gap };
}
