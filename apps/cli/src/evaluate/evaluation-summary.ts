import type { CheckEvaluation, MaskEvaluation } from '@earmark/contracts';

/** One check as `earmark evaluate --json` prints it: the engine's check without its details. */
export type CheckSummary = Omit<CheckEvaluation, 'details'>;

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
    checks: evaluation.checks.map(({ details: _details, ...check }) => check),
  };
}
