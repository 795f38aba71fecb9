/**
 * Compact summaries of engine results and model descriptions, as text and HTML. Written against
 * the result contract (`kind`, `checks: {minGap, minGapAt?, grid?, warnings, gapless?}`) and
 * otherwise generic: the fields that answer the question come first (each kind's `headline`,
 * src/diagnostics/), then the other scalar fields by name, arrays by their length, so new result
 * kinds display sensibly without changes here.
 */
import { DIAGNOSTICS } from '../../src/diagnostics/registry.js';

export interface ResultLike {
  kind: string;
  convention?: string;
  checks: {
    minGap?: number; minGapAt?: unknown; grid?: unknown; warnings?: string[]; gapless?: boolean;
    certified?: boolean; gapProof?: { verdict: string; lowerBound: number; samples: number; lines: number[]; reason?: string };
  };
  [field: string]: unknown;
}

export interface ModelLike {
  format: 'chernel.model';
  name?: string;
  periodic?: number;
  vectors?: number[][];
  orbitals?: { label?: string; position?: number[] }[];
  parameters?: Record<string, { default?: number; range?: [number, number]; unit?: string; doc?: string }>;
  terms?: unknown[];
}

export function isResult(value: unknown): value is ResultLike {
  if (typeof value !== 'object' || value === null) return false;
  const v = value as Record<string, unknown>;
  return typeof v.kind === 'string' && typeof v.checks === 'object' && v.checks !== null;
}

export function isModelSpec(value: unknown): value is ModelLike {
  return typeof value === 'object' && value !== null && (value as Record<string, unknown>).format === 'chernel.model';
}

const escapeHtml = (s: string): string =>
  s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c] ?? c);

function num(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  if (Number.isInteger(x)) return String(x);
  const a = Math.abs(x);
  return a !== 0 && (a < 1e-3 || a >= 1e5) ? x.toExponential(3) : x.toPrecision(4).replace(/\.?0+$/, '');
}

/** A short rendering of a field value, or null when it is bulk data better left to a plot. */
function brief(value: unknown): string | null {
  if (value === null) return 'null';
  if (typeof value === 'number') return num(value);
  if (typeof value === 'string') return value.length <= 80 ? value : `${value.slice(0, 77)}...`;
  if (typeof value === 'boolean') return String(value);
  if (ArrayBuffer.isView(value)) return `${value.constructor.name}(${(value as unknown as ArrayLike<number>).length})`;
  if (Array.isArray(value)) {
    if (value.length <= 8 && value.every((v) => typeof v === 'number' || v === null)) return `[${value.map((v) => (v === null ? 'null' : num(v))).join(', ')}]`;
    return `array(${value.length})`;
  }
  return null;
}

function gridText(grid: unknown): string | null {
  if (typeof grid === 'number') return String(grid);
  if (Array.isArray(grid)) return grid.join('×');
  return grid === undefined ? null : brief(grid);
}

function kAt(at: unknown): string | null {
  return Array.isArray(at) || ArrayBuffer.isView(at) ? `k = (${Array.from(at as ArrayLike<number>, num).join(', ')})` : null;
}

const SKIP = new Set(['kind', 'checks', 'convention', 'model', 'request']);

/** The fields that answer a result's question, first (the registry's headline), then the rest in the engine's order. */
function fieldOrder(result: ResultLike): string[] {
  const headline: readonly string[] = Object.hasOwn(DIAGNOSTICS, result.kind) ? DIAGNOSTICS[result.kind as keyof typeof DIAGNOSTICS].headline : [];
  return [...headline.filter((k) => Object.hasOwn(result, k)), ...Object.keys(result).filter((k) => !headline.includes(k))];
}

/** Fields worth a line: the headline, then scalars and short arrays. */
function fields(result: ResultLike): [string, string][] {
  const rows: [string, string][] = [];
  for (const key of fieldOrder(result)) {
    const value = result[key];
    if (SKIP.has(key)) continue;
    const text = brief(value);
    if (text !== null) rows.push([key, text]);
  }
  return rows;
}

function checkRows(result: ResultLike): [string, string][] {
  const c = result.checks;
  const rows: [string, string][] = [];
  if (typeof c.minGap === 'number' && Number.isFinite(c.minGap)) rows.push(['min gap', [num(c.minGap), kAt(c.minGapAt)].filter(Boolean).join(' at ')]);
  const grid = gridText(c.grid);
  if (grid) rows.push(['grid', grid]);
  if (result.convention) rows.push(['convention', result.convention]);
  if (c.gapless) rows.push(['gapless', 'yes: invariants are not defined']);
  const proof = c.gapProof;
  if (proof !== undefined) {
    const how = `${proof.samples} samples on ${proof.lines.join('x')} lines`;
    const said = proof.verdict === 'gapped' ? `proven: at least ${num(proof.lowerBound)} everywhere (${how})` : proof.verdict === 'gapless' ? `closes (${how})` : `not proven (${how})`;
    rows.push(['gap proof', said]);
  }
  if (c.certified !== undefined) rows.push(['certified', c.certified ? 'yes: gap proven, lattice condition met' : 'no']);
  return rows;
}

export function resultText(result: ResultLike): string {
  const lines = [`${result.kind} result`];
  for (const [k, v] of [...fields(result), ...checkRows(result)]) lines.push(`  ${k}: ${v}`);
  for (const w of result.checks.warnings ?? []) lines.push(`  warning: ${w}`);
  return lines.join('\n');
}

const STYLE = 'border-collapse:collapse;font-size:0.9em';
const CELL = 'padding:1px 8px;text-align:left;border-bottom:1px solid #ddd';

function table(caption: string, rows: [string, string][], extra = ''): string {
  const body = rows.map(([k, v]) => `<tr><th style="${CELL}">${escapeHtml(k)}</th><td style="${CELL}">${escapeHtml(v)}</td></tr>`).join('');
  return `<div class="chernel-summary"><table style="${STYLE}"><caption style="text-align:left;font-weight:bold">${escapeHtml(caption)}</caption>${body}</table>${extra}</div>`;
}

export function resultHtml(result: ResultLike): string {
  const warnings = result.checks.warnings ?? [];
  const extra = warnings.length
    ? `<ul style="margin:2px 0;color:#a15c00">${warnings.map((w) => `<li>⚠ ${escapeHtml(w)}</li>`).join('')}</ul>`
    : '';
  return table(`${result.kind} result`, [...fields(result), ...checkRows(result)], extra);
}

function modelRows(model: ModelLike): { rows: [string, string][]; params: [string, string][] } {
  const rows: [string, string][] = [];
  rows.push(['periodic dimensions', String(model.periodic ?? '?')]);
  const orbitals = model.orbitals ?? [];
  rows.push(['orbitals', `${orbitals.length}: ${orbitals.map((o) => o.label ?? '?').join(', ')}`]);
  rows.push(['terms', String(model.terms?.length ?? 0)]);
  if (model.vectors?.length) rows.push(['vectors', model.vectors.map((v) => `(${v.map(num).join(', ')})`).join(' ')]);
  const params: [string, string][] = Object.entries(model.parameters ?? {}).map(([name, p]) => [
    name,
    [p.default === undefined ? '' : num(p.default), p.range ? `in [${p.range.map(num).join(', ')}]` : '', p.unit ?? '', p.doc ? `— ${p.doc}` : '']
      .filter(Boolean)
      .join(' '),
  ]);
  return { rows, params };
}

export function modelText(model: ModelLike): string {
  const { rows, params } = modelRows(model);
  const lines = [`model ${model.name ?? '(unnamed)'}`, ...rows.map(([k, v]) => `  ${k}: ${v}`)];
  if (params.length) lines.push('  parameters:', ...params.map(([k, v]) => `    ${k} = ${v}`));
  return lines.join('\n');
}

export function modelHtml(model: ModelLike): string {
  const { rows, params } = modelRows(model);
  return table(`model ${model.name ?? '(unnamed)'}`, [...rows, ...params.map(([k, v]): [string, string] => [`parameter ${k}`, v])]);
}
