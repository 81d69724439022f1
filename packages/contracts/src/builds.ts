import { z } from 'zod';

export const CommitSha = z.string().regex(/^[0-9a-f]{7,64}$/, 'a hex commit SHA of 7 to 64 characters');

export const BuildStatus = z.enum(['pending', 'running', 'pass', 'fail', 'error']);
export type BuildStatus = z.infer<typeof BuildStatus>;

export const UpsertBuildRequest = z.object({
  sha: CommitSha,
  label: z.string().max(120).optional(),
  branch: z.string().max(200).optional(),
  /** Rendered as a link on the build page, so only http(s): never javascript:, data: or the like. */
  pipelineUrl: z.url({ protocol: /^https?$/, error: 'an http(s) URL' }).max(2000).optional(),
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
