import { z } from 'zod';

/** RFC 9457 problem details, the body of every error the API returns. */
export const Problem = z.object({
  type: z.string(),
  title: z.string(),
  status: z.number().int(),
  detail: z.string().optional(),
  instance: z.string().optional(),
  /** Field-level problems for validation errors: path → messages. */
  errors: z.array(z.object({ path: z.string(), message: z.string() })).optional(),
  /** A machine-readable reason, e.g. the capture decoder's error code. */
  code: z.string().optional(),
  /** A conflict's obstacle (the waiver already requested): clients link to it instead of showing its id. */
  existing: z.object({ kind: z.enum(['waiver']), id: z.string(), state: z.string() }).optional(),
});
export type Problem = z.infer<typeof Problem>;

export const PROBLEM_CONTENT_TYPE = 'application/problem+json';
