import type { BuildStatus } from '@earmark/contracts';

export interface CaptureState {
  status: 'queued' | 'analysing' | 'done' | 'error';
  outcome: 'pass' | 'fail' | 'error' | null;
}

/**
 * A build's verdict from its captures: pending while any capture waits, running while
 * any is analysed, then fail if any failed, error if any errored, else pass. A definite
 * failure outranks an error because it is the more useful thing to tell a pipeline.
 */
export function aggregateBuildStatus(captures: readonly CaptureState[]): BuildStatus {
  if (captures.length === 0) return 'pending';
  if (captures.some((c) => c.status === 'queued' || (c.status !== 'error' && c.outcome === null && c.status !== 'analysing'))) return 'pending';
  if (captures.some((c) => c.status === 'analysing')) return 'running';
  if (captures.some((c) => c.outcome === 'fail')) return 'fail';
  if (captures.some((c) => c.outcome === 'error' || c.status === 'error')) return 'error';
  return 'pass';
}
