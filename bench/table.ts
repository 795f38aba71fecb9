/** One line of `npm run bench`: our figure beside a reference measured in the same run. */
export interface BenchRow {
  name: string;
  /** Our figure, in `unit`. */
  ours: number;
  /** The reference's figure in the same unit, or null when the reference is not available here. */
  reference: number | null;
  unit: string;
  /** How many times better we are than the reference (> 1 is better), or null. */
  ratio: number | null;
  /** The target, in words, e.g. ">= 2x numpy". */
  target: string;
}

function fmt(x: number | null): string {
  if (x === null) return '-';
  if (x === 0) return '0';
  const a = Math.abs(x);
  return a >= 1e5 || a < 1e-2 ? x.toExponential(2) : x.toPrecision(4);
}

/** A Markdown table, as pasted into README.md. */
export function formatTable(rows: BenchRow[]): string {
  const lines = ['| benchmark | ours | reference | unit | ratio | target |', '|---|---|---|---|---|---|'];
  for (const r of rows) {
    lines.push(`| ${r.name} | ${fmt(r.ours)} | ${fmt(r.reference)} | ${r.unit} | ${r.ratio === null ? '-' : r.ratio.toFixed(2) + 'x'} | ${r.target} |`);
  }
  return lines.join('\n');
}
