import { aggregateBuildStatus, captureStateOf, type BuildStatus, type CaptureDto } from '@earmark/contracts';
import { EXIT, type ExitCode } from '../cli-error.js';

/** The build-status rule (the same one the server stores and the dashboard shows) over the captures of this run. */
export function submittedStatus(captures: readonly Pick<CaptureDto, 'status' | 'verdict'>[]): BuildStatus {
  return aggregateBuildStatus(captures.map(captureStateOf));
}

const EXIT_BY_STATUS: Record<BuildStatus, ExitCode> = {
  pass: EXIT.ok,
  fail: EXIT.fail,
  error: EXIT.error,
  // Not judged yet (only after --timeout): nothing to block on, worth a retry.
  pending: EXIT.incomplete,
  running: EXIT.incomplete,
};

/** The exit code a status gates on: pass 0, fail 1, error 2, not judged yet 3. */
export function exitCodeForStatus(status: BuildStatus): ExitCode {
  return EXIT_BY_STATUS[status];
}

/**
 * The exit code a pipeline gates on (docs/ci.md): without --wait, 0 once every upload was
 * accepted (the verdicts come later); with it, the code of the build-status rule over the
 * submitted captures, so an error outranks a failure exactly as on the dashboard.
 */
export function exitCodeFor(captures: readonly Pick<CaptureDto, 'status' | 'verdict'>[], waited: boolean): ExitCode {
  return waited ? exitCodeForStatus(submittedStatus(captures)) : EXIT.ok;
}
