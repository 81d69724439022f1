import { EXIT } from '../cli-error.js';
import type { CaptureOutcome } from './capture-outcome.js';

/** The build's word from its captures' outcomes: any error, else any fail, else any pending, else pass. */
export function overallOutcome(outcomes: CaptureOutcome[]): CaptureOutcome {
  for (const word of ['error', 'fail', 'pending'] as const) if (outcomes.includes(word)) return word;
  return 'pass';
}

/**
 * The exit code a pipeline gates on (docs/ci.md): without --wait, 0 once every upload was
 * accepted (the verdicts come later); with it, 2 if any capture is an error or still
 * pending, else 1 if any failed, else 0. An error outranks a failure because the build was
 * not fully judged, which is a different thing to act on than a judged failure.
 */
export function exitCodeFor(outcomes: CaptureOutcome[], waited: boolean): number {
  if (!waited) return EXIT.ok;
  const overall = overallOutcome(outcomes);
  if (overall === 'error' || overall === 'pending') return EXIT.error;
  return overall === 'fail' ? EXIT.fail : EXIT.ok;
}
