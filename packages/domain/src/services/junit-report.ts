import type { BuildDetail } from '@earmark/contracts';
import junitModule, { type Builder } from 'junit-report-builder';

// NOTE: a CommonJS package compiled from TypeScript: under Node's ESM loader the default
// import is the whole exports object, so take its `default` when present.
const junit: Builder = (junitModule as unknown as { default?: Builder }).default ?? (junitModule as unknown as Builder);

const fmt = (v: number | null, unit: string | null) => (v === null ? 'n/a' : `${Number(v.toPrecision(6))}${unit ? ` ${unit}` : ''}`);

/**
 * JUnit XML for a build: one testsuite per target, one testcase per test case × check.
 * Failures carry measured, limit, margin and worst frequency; captures without a
 * verdict yet are skipped, analysis errors are errors.
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
        suite.testCase().className(className).name('verdict').skipped();
        continue;
      }
      if (verdict.outcome === 'error' || verdict.checks.length === 0) {
        const tc = suite.testCase().className(className).name('verdict');
        if (verdict.outcome === 'error') tc.error(verdict.reason ?? 'analysis error', 'analysis-error');
        continue;
      }
      for (const check of verdict.checks) {
        const tc = suite.testCase().className(className).name(check.label ? `${check.id} (${check.label})` : check.id);
        tc.property('capture', capture.id).property('engineVersion', verdict.engineVersion);
        if (!check.pass) {
          const worst = check.worstHz === null ? '' : ` at ${Number(check.worstHz.toPrecision(5))} Hz`;
          tc.failure(
            `${check.kind}: measured ${fmt(check.measured, check.unit)}, limit ${fmt(check.limit, check.unit)}, margin ${fmt(check.margin, check.unit)}${worst}`,
            check.kind,
          );
        }
      }
    }
  }
  return builder.build();
}
