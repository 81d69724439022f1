import { aggregateBuildStatus, captureStateOf, type CaptureDto, type VerdictOutcome } from '@earmark/contracts';

export type CaptureOutcome = VerdictOutcome | 'pending';

/**
 * Where a capture stands. A capture whose analysis broke (status `error`) counts as an error
 * even if the server has not attached a verdict to it.
 */
export function captureOutcome(capture: CaptureDto): CaptureOutcome {
  if (capture.verdict) return capture.verdict.outcome;
  return capture.status === 'error' ? 'error' : 'pending';
}

/** Judged by the build-status rule: a capture analysed again (re-evaluation) is waited for like a new one. */
export function isSettled(capture: CaptureDto): boolean {
  const status = aggregateBuildStatus([captureStateOf(capture)]);
  return status !== 'pending' && status !== 'running';
}
