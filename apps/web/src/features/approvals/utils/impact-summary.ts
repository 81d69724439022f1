import type { ImpactRunDto } from '@earmark/contracts';

const builds = (n: number) => `${n} ${n === 1 ? 'build' : 'builds'}`;

/**
 * The impact run's answer in one sentence for the approve confirmation: how many recent
 * builds change verdict under the revision. Null when there is no finished run to quote.
 */
export function impactSentence(run: ImpactRunDto | null | undefined): string | null {
  const summary = run?.state === 'done' ? run.result?.summary : null;
  if (!summary) return null;
  if (summary.passToFail === 0 && summary.failToPass === 0) {
    return `Of the last ${builds(summary.builds)} (${summary.captures} captures), none would change verdict.`;
  }
  return `Of the last ${builds(summary.builds)} (${summary.captures} captures), ${summary.passToFail} would newly fail and ${summary.failToPass} would newly pass.`;
}
