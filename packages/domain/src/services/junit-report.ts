import { describeCheckValues, type BuildDetail } from '@earmark/contracts';
import junitModule, { type Builder } from 'junit-report-builder';

// NOTE: a CommonJS package compiled from TypeScript: under Node's ESM loader the default
// import is the whole exports object, so take its `default` when present.
const junit: Builder = (junitModule as unknown as { default?: Builder }).default ?? (junitModule as unknown as Builder);

/** `2027-01-15` from a waiver's end (an ISO timestamp): CI reports show the day. */
const day = (iso: string) => iso.slice(0, 10);

/**
 * JUnit XML for a build: one testsuite per target, one testcase per test case × check.
 * It says what the build-status rule says (docs/ci.md): an `error` verdict, or a capture
 * whose analysis broke, is an `<error>`; a failing check is a `<failure>` carrying measured,
 * limit, margin and worst frequency; a failing check covered by an approved waiver passes
 * with an `earmark.waiver` property ("passed with waiver, until <date>"), as it counts on the
 * dashboard. Captures without a verdict yet are skipped.
 */
export function renderJunit(build: BuildDetail): string {
  const builder = junit.newBuilder();
  const targets = [...new Set(build.captures.map((c) => c.target))].sort();
  for (const target of targets) {
    const suite = builder.testSuite().name(`${build.projectKey} ${build.sha.slice(0, 12)} ${target}`).timestamp(build.createdAt);
    for (const capture of build.captures.filter((c) => c.target === target)) {
      const className = `${build.projectKey}.${capture.testCase}`;
      const verdict = capture.verdict;
      if (!verdict) {
        const tc = suite.testCase().className(className).name('verdict').property('capture', capture.id);
        if (capture.status === 'error') tc.error('The capture could not be analysed.', 'analysis-error');
        else tc.skipped();
        continue;
      }
      // A fail that no unwaived check explains still fails here, so the counts never disagree with the status.
      const unexplainedFail = verdict.outcome === 'fail' && verdict.checks.every((c) => c.pass || c.waiver);
      if (verdict.outcome === 'error' || verdict.checks.length === 0) {
        const tc = suite.testCase().className(className).name('verdict');
        if (verdict.outcome === 'error') tc.error(verdict.reason ?? 'analysis error', 'analysis-error');
        else if (unexplainedFail) tc.failure(verdict.reason ?? 'The capture failed its mask.', 'verdict');
        continue;
      }
      for (const check of verdict.checks) {
        const tc = suite.testCase().className(className).name(check.label ? `${check.id} (${check.label})` : check.id);
        tc.property('capture', capture.id).property('engineVersion', verdict.engineVersion);
        if (!check.pass && check.waiver) {
          tc.property('earmark.waiver', `passed with waiver, until ${day(check.waiver.until)}`).property('earmark.waiverId', check.waiver.id);
        } else if (!check.pass) {
          tc.failure(`${check.kind}: ${describeCheckValues(check)}`, check.kind);
        }
      }
      if (unexplainedFail) suite.testCase().className(className).name('verdict').failure(verdict.reason ?? 'The capture failed its mask.', 'verdict');
    }
  }
  return builder.build();
}
