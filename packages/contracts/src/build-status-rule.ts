import type { BuildStatus } from './builds.js';
import type { CaptureDto, VerdictOutcome } from './captures.js';

/** A capture as the build-status rule sees it: where its analysis is and its newest verdict. */
export interface CaptureState {
  status: 'queued' | 'analysing' | 'done' | 'error';
  outcome: 'pass' | 'fail' | 'error' | null;
}

/**
 * THE build-status rule (docs/ci.md, "Build status"): the dashboard, the API, JUnit, the mail
 * and the CLI all take a build's status from here.
 *
 * | captures                                  | build     |
 * |-------------------------------------------|-----------|
 * | none, or any waiting without a verdict    | `pending` |
 * | any being analysed                        | `running` |
 * | any `error` (verdict, or analysis failed) | `error`   |
 * | any `fail`                                | `fail`    |
 * | every one `pass` (waived checks included) | `pass`    |
 *
 * An error outranks a failure: a gate that could not judge a capture must not read as judged,
 * and "could not tell" asks for a different reaction (fix the set-up, retry) than "out of
 * tolerance" (fix the firmware).
 */
export function aggregateBuildStatus(captures: readonly CaptureState[]): BuildStatus {
  if (captures.length === 0) return 'pending';
  if (captures.some((c) => c.status === 'queued' || (c.status === 'done' && c.outcome === null))) return 'pending';
  if (captures.some((c) => c.status === 'analysing')) return 'running';
  if (captures.some((c) => c.outcome === 'error' || c.status === 'error')) return 'error';
  if (captures.some((c) => c.outcome === 'fail')) return 'fail';
  return 'pass';
}

/** How the rule sees a capture as the API sends it (its status and newest verdict): for clients such as the CLI. */
export function captureStateOf(capture: Pick<CaptureDto, 'status' | 'verdict'>): CaptureState {
  return { status: capture.status, outcome: capture.verdict?.outcome ?? null };
}

/**
 * The same rule for captures that all hold a verdict (an impact run's "what would this build
 * have been"): error, else fail, else pass.
 * @throws Error on an empty list, which has no judged outcome
 */
export function aggregateVerdicts(outcomes: readonly VerdictOutcome[]): VerdictOutcome {
  const status = aggregateBuildStatus(outcomes.map((outcome) => ({ status: outcome === 'error' ? 'error' : 'done', outcome })));
  if (status === 'pending' || status === 'running') throw new Error('aggregateVerdicts needs at least one verdict');
  return status;
}
