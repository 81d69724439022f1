import type { Problem } from '@earmark/contracts';

/** The server answered with an error status; the message is `<title>: <detail>` from its problem+json. */
export class ApiError extends Error {
  override readonly name = 'ApiError';
  constructor(
    readonly status: number,
    readonly problem: Problem,
  ) {
    super(describeProblem(problem));
  }
}

/** The server could not be reached (or kept failing) within the retry budget. */
export class ApiUnreachableError extends Error {
  override readonly name = 'ApiUnreachableError';
}

/** The server answered 2xx with a body that does not match the contract: a version mismatch or a proxy page. */
export class UnexpectedResponseError extends Error {
  override readonly name = 'UnexpectedResponseError';
}

/** A request body's source (the capture file) failed while streaming: a local fault, never retried. */
export class BodySourceError extends Error {
  override readonly name = 'BodySourceError';
}

/** One line: title, detail, and field errors in brackets (validation problems name the field). */
export function describeProblem(problem: Problem): string {
  let text = problem.title;
  if (problem.detail !== undefined && problem.detail !== '') text += `: ${problem.detail}`;
  if (problem.errors && problem.errors.length > 0) {
    text += ` (${problem.errors.map((e) => (e.path ? `${e.path}: ${e.message}` : e.message)).join('; ')})`;
  }
  return text.replace(/\s*\n\s*/g, ' ');
}
