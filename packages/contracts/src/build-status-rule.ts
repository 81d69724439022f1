import type { BuildStatus } from './builds.js';

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
