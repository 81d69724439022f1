import { describeCheckValues, formatMarginAt } from '@earmark/contracts';

/** What the analysis decided about one capture, before it is written. */
export interface CheckJudgement {
  id: string;
  kind: string;
  label: string | null;
  pass: boolean;
  measured: number | null;
  limit: number | null;
  margin: number | null;
  unit: string | null;
  worstHz: number | null;
  details: Record<string, unknown>;
}

export interface Judgement {
  outcome: 'pass' | 'fail' | 'error';
  reason: string | null;
  engineVersion: string;
  checks: CheckJudgement[];
}

/** A verdict of `error` with its reason and no checks. */
export function errorJudgement(reason: string, engineVersion: string): Judgement {
  return { outcome: 'error', reason, engineVersion, checks: [] };
}

/** One line for a failing check: used for finding titles, e-mail and logs. */
export function describeFailure(check: CheckJudgement): string {
  return `${check.label ?? check.id}: ${describeCheckValues(check)}`;
}

/** How many failing checks a verdict's reason names before "and N more". */
const NAMED_IN_REASON = 5;

/**
 * The reason of a `fail` verdict: "2 of 5 checks failed: response (margin −0.83 dB at 7.99 kHz), clipping (margin −79153)".
 * The engine names the checks; the margins are added here, in the one formatter's words.
 */
export function failReason(checks: readonly CheckJudgement[]): string {
  const failed = checks.filter((c) => !c.pass);
  const named = failed.slice(0, NAMED_IN_REASON).map((c) => `${c.id} (${c.margin === null ? (c.measured === null ? 'not measurable' : 'no margin') : `margin ${formatMarginAt(c.margin, c.unit, c.worstHz)}`})`);
  const rest = failed.length > NAMED_IN_REASON ? `, and ${failed.length - NAMED_IN_REASON} more` : '';
  return `${failed.length} of ${checks.length} checks failed: ${named.join(', ')}${rest}`;
}
