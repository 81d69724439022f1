import { DASH, formatFrequency, formatNumberIn, marginUnit } from '@earmark/contracts';
import type { EvaluationSummary } from './evaluation-summary.js';

const dash = DASH;

function pad(cells: string[], widths: number[]): string {
  return cells.map((c, i) => c.padEnd(widths[i] ?? 0)).join('  ').trimEnd();
}

/** The readable table of `earmark evaluate` (the `--json` form is the summary itself). */
export function formatEvaluation(summary: EvaluationSummary, source: string): string {
  // Figures in the shared formatter's rules (@earmark/contracts); the margin column is in the margin's unit (dB for dBFS).
  const head = ['check', 'kind', 'result', 'measured', 'limit', 'unit', 'margin', 'unit', 'worst at', 'ch'];
  const rows = summary.checks.map((c) => [
    c.id,
    c.kind,
    c.error !== null ? 'ERROR' : c.pass ? 'pass' : 'FAIL',
    formatNumberIn(c.measured, c.unit),
    formatNumberIn(c.limit, c.unit),
    c.unit,
    formatNumberIn(c.margin, marginUnit(c.unit), true),
    marginUnit(c.unit) ?? '',
    formatFrequency(c.worstHz),
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
