import type { CheckUnit, MaskEvaluation } from '@earmark/contracts';

/** One check as `earmark evaluate --json` prints it. */
export interface CheckSummary {
  id: string;
  kind: string;
  label: string | null;
  pass: boolean;
  measured: number | null;
  limit: number | null;
  /** The margin in `unit` (ms, °, %, dB… as the check measures; dB for dBFS measures); positive inside the limits. */
  margin: number | null;
  unit: CheckUnit;
  worstHz: number | null;
  channel: number | null;
  error: string | null;
}

/** What `earmark evaluate --json` prints: the verdict and one line per check. */
export interface EvaluationSummary {
  verdict: MaskEvaluation['verdict'];
  engineVersion: string;
  reason: string | null;
  checks: CheckSummary[];
}

/** The printed form of an evaluation: the engine's result without the per-check details. */
export function summarizeEvaluation(evaluation: MaskEvaluation): EvaluationSummary {
  return {
    verdict: evaluation.verdict,
    engineVersion: evaluation.engineVersion,
    reason: evaluation.reason,
    checks: evaluation.checks.map((c) => ({
      id: c.id,
      kind: c.kind,
      label: c.label,
      pass: c.pass,
      measured: c.measured,
      limit: c.limit,
      margin: c.margin,
      unit: c.unit,
      worstHz: c.worstHz,
      channel: c.channel,
      error: c.error,
    })),
  };
}
