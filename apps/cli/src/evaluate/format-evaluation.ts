import type { EvaluationSummary } from './evaluation-summary.js';

const dash = '—';

/** A number for people: 4 significant digits, small ratios in exponent form. */
function show(v: number | null): string {
  if (v === null || !Number.isFinite(v)) return dash;
  if (v !== 0 && Math.abs(v) < 1e-3) return v.toExponential(2);
  return String(Number(v.toPrecision(4)));
}

function pad(cells: string[], widths: number[]): string {
  return cells.map((c, i) => c.padEnd(widths[i] ?? 0)).join('  ').trimEnd();
}

/** The readable table of `earmark evaluate` (the `--json` form is the summary itself). */
export function formatEvaluation(summary: EvaluationSummary, source: string): string {
  const head = ['check', 'kind', 'result', 'measured', 'limit', 'margin', 'unit', 'worst Hz', 'ch'];
  const rows = summary.checks.map((c) => [
    c.id,
    c.kind,
    c.error !== null ? 'ERROR' : c.pass ? 'pass' : 'FAIL',
    show(c.measured),
    show(c.limit),
    show(c.margin),
    c.unit,
    c.worstHz === null ? dash : String(Math.round(c.worstHz)),
    c.channel === null ? dash : String(c.channel),
  ]);
  const widths = head.map((h, i) => Math.max(h.length, ...rows.map((r) => (r[i] ?? '').length)));
  const lines = [`${source}: verdict ${summary.verdict.toUpperCase()} (engine ${summary.engineVersion})`, '', pad(head, widths), ...rows.map((r) => pad(r, widths))];
  const errors = summary.checks.filter((c) => c.error !== null);
  if (errors.length > 0) lines.push('', ...errors.map((c) => `${c.id}: ${c.error}`));
  if (summary.reason !== null) lines.push('', summary.reason);
  lines.push('', 'margin: positive inside the limits, in the unit shown (dB for dBFS); levels in dBFS: a full-scale sine reads 0 dBFS (AES17)');
  return `${lines.join('\n')}\n`;
}
