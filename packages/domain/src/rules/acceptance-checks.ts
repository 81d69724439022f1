import { isEngineSelfTest, selfTestIssues } from '@earmark/contracts';
import { ValidationError } from '../errors.js';

/**
 * What a new mask revision may hold: acceptance checks only. The engine's self-test
 * (energy-parseval) checks the analysis, not the firmware, so a draft that holds it is refused
 * when it is created or its checks are saved. Revisions stored before this rule are left as
 * they are and keep being evaluated (their verdicts stay comparable); copying one leaves the
 * self-test out (docs/masks.md, "Engine self-test").
 */
export function assertAcceptanceChecks(checks: readonly unknown[]): void {
  const issues = selfTestIssues(checks as { kind?: unknown; metric?: unknown }[]);
  if (issues.length === 0) return;
  const ids = issues.map((issue) => {
    const index = Number(issue.path.split('.')[1]);
    const id = (checks[index] as { id?: unknown } | undefined)?.id;
    return typeof id === 'string' ? `“${id}”` : `number ${index + 1}`;
  });
  throw new ValidationError(
    `Check ${ids.join(', ')} is the engine self-test (energy agreement): it checks the analysis, not the firmware, and a new mask revision cannot hold it. Remove it and save again.`,
    issues.map((issue) => ({ path: `body.${issue.path}`, message: issue.message })),
    'engine-self-test-in-mask',
  );
}

/** A stored revision's checks without the self-test, for a copy; `left` names the ids left out. */
export function withoutSelfTests<T extends { id?: unknown }>(checks: readonly T[]): { kept: T[]; left: string[] } {
  const kept = checks.filter((check) => !isEngineSelfTest(check as { kind?: unknown; metric?: unknown }));
  const left = checks.filter((check) => isEngineSelfTest(check as { kind?: unknown; metric?: unknown })).map((check) => String(check.id));
  return { kept, left };
}
