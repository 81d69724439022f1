import type { z } from 'zod';
import { ApiError } from './api-error';

/** Validation messages keyed by dotted path (`checks.0.upper.1.hz`), first message first. */
export type FieldIssues = Record<string, string[]>;

/** Groups a zod error's issues by their path, so a form can put each message beside its field. */
export function issuesByPath(error: z.ZodError, prefix: readonly (string | number)[] = []): FieldIssues {
  const out: FieldIssues = {};
  for (const issue of error.issues) {
    const path = [...prefix, ...issue.path.map(String)].join('.');
    (out[path] ??= []).push(issue.message);
  }
  return out;
}

/**
 * The API's field problems (`body.stimulus.frequency`) as the same map, with the request
 * part dropped so they land on the fields the form already names.
 */
export function apiFieldIssues(error: unknown): FieldIssues {
  const out: FieldIssues = {};
  if (!(error instanceof ApiError)) return out;
  for (const problem of error.fieldErrors) {
    const path = problem.path.replace(/^(body|query|params)\.?/, '');
    (out[path] ??= []).push(problem.message);
  }
  return out;
}

/** Messages at a path and below it (`stimulus` collects `stimulus.frequency` too). */
export function issuesUnder(issues: FieldIssues, path: string): string[] {
  return Object.entries(issues)
    .filter(([key]) => key === path || key.startsWith(`${path}.`))
    .flatMap(([, messages]) => messages);
}
