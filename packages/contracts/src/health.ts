import { z } from 'zod';

/** What a process needs to do its work; each is checked by readiness. */
export const ReadinessCheckName = z.enum(['database', 'queue', 'objectStore']);
export type ReadinessCheckName = z.infer<typeof ReadinessCheckName>;

/**
 * The answer of a readiness probe (`/readyz` on the metrics port, `/api/health/ready` on the API's).
 * Ready when every check passed in time and the process is not draining; a failing check is
 * named in `checks` and its error message in `errors`.
 */
export const ReadyReport = z.object({
  ready: z.boolean(),
  /** Shutting down: it finishes what it holds and takes no new work, so the checks are not run. */
  draining: z.boolean(),
  checks: z.partialRecord(ReadinessCheckName, z.enum(['ok', 'failed'])),
  errors: z.partialRecord(ReadinessCheckName, z.string()),
});
export type ReadyReport = z.infer<typeof ReadyReport>;
