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

const fmt = (v: number | null, unit: string | null) => (v === null ? 'n/a' : `${Number(v.toPrecision(4))}${unit ? ` ${unit}` : ''}`);

/** One line for a failing check: used for finding titles, e-mail and logs. */
export function describeFailure(check: CheckJudgement): string {
  const where = check.worstHz === null ? '' : ` at ${check.worstHz >= 1000 ? `${Number((check.worstHz / 1000).toPrecision(4))} kHz` : `${Number(check.worstHz.toPrecision(4))} Hz`}`;
  return `${check.label ?? check.id}: measured ${fmt(check.measured, check.unit)}, limit ${fmt(check.limit, check.unit)}, margin ${fmt(check.margin, check.unit)}${where}`;
}
