import { z } from 'zod';

/**
 * Data lifecycle: what the API says about a capture whose audio the retention policy removed,
 * and a project's storage quota. The sentence is shared so the API and the web page read alike.
 */

/** problem+json `code` (and the last part of its `type`) for audio removed by the retention policy (410). */
export const CAPTURE_PURGED = 'capture-purged';
/** problem+json `code` (and the last part of its `type`) for an upload past the project's storage quota (413). */
export const STORAGE_QUOTA_EXCEEDED = 'storage-quota-exceeded';

/** "The audio of this capture was removed by the retention policy on 2027-03-01; its verdict is kept." */
export function capturePurgedDetail(purgedAt: Date | string): string {
  const day = new Date(purgedAt).toISOString().slice(0, 10);
  return `The audio of this capture was removed by the retention policy on ${day}; its verdict is kept.`;
}

const MIB = 1024 * 1024;

/** Bytes as MiB with one decimal, for messages (`12.5 MiB`). */
export function mebibytes(bytes: number): string {
  return `${(bytes / MIB).toFixed(1)} MiB`;
}

/**
 * `PATCH /api/projects/:project` (administrators): the project's storage quota in bytes. A
 * positive number sets it, 0 makes the project unlimited, null returns it to the server's
 * default (EARMARK_PROJECT_QUOTA_BYTES).
 */
export const UpdateProjectRequest = z.strictObject({
  storageQuotaBytes: z
    .number('bytes, 0 for unlimited, or null for the server default')
    .int('whole bytes')
    .min(0, 'at least 0 (0 = unlimited)')
    .max(Number.MAX_SAFE_INTEGER, 'at most 2^53 - 1 bytes')
    .nullable()
    .optional(),
  /** true archives the project (it leaves the lists and accepts no uploads); false brings it back. */
  archived: z.boolean().optional(),
  name: z.string().trim().min(1).max(120).optional(),
});
export type UpdateProjectRequest = z.infer<typeof UpdateProjectRequest>;
