import { z } from 'zod';

export const CommitSha = z.string().regex(/^[0-9a-f]{7,64}$/, 'a hex commit SHA of 7 to 64 characters');

export const BuildStatus = z.enum(['pending', 'running', 'pass', 'fail', 'error']);
export type BuildStatus = z.infer<typeof BuildStatus>;

/** A CI clock may run a little ahead of ours: `builtAt` up to this far in the future is accepted. */
export const BUILT_AT_CLOCK_SKEW_MS = 5 * 60_000;

export const UpsertBuildRequest = z.object({
  sha: CommitSha,
  label: z.string().max(120).optional(),
  branch: z.string().max(200).optional(),
  /** Rendered as a link on the build page, so only http(s): never javascript:, data: or the like. */
  pipelineUrl: z.url({ protocol: /^https?$/, error: 'an http(s) URL' }).max(2000).optional(),
  /**
   * When the build was made (ISO date-time with an offset), as the CI system knows it; default:
   * when Earmark first hears of the build. Builds are ordered by it everywhere (tables, trend,
   * drift, "since which build"). Used only when the build is created; a later upsert keeps it.
   */
  builtAt: z.iso
    .datetime({ offset: true, error: 'an ISO 8601 date-time with a time zone, e.g. 2026-11-30T22:15:00Z' })
    .refine((s) => Date.parse(s) <= Date.now() + BUILT_AT_CLOCK_SKEW_MS, 'lies in the future: give the time the build was made')
    .refine((s) => Date.parse(s) >= Date.UTC(2000, 0, 1), 'lies before the year 2000')
    .optional(),
});
export type UpsertBuildRequest = z.infer<typeof UpsertBuildRequest>;

export const BuildRow = z.object({
  id: z.string(),
  projectKey: z.string(),
  sha: z.string(),
  label: z.string().nullable(),
  branch: z.string().nullable(),
  pipelineUrl: z.string().nullable(),
  status: BuildStatus,
  createdAt: z.string(),
  captureCount: z.number().int(),
});
export type BuildRow = z.infer<typeof BuildRow>;
