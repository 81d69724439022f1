import type { Capture } from '@earmark/db';
import { errorJudgement, type Judgement } from '@earmark/domain';
import { describe, expect, it } from 'vitest';
import { summarizeImpact } from '../src/jobs/evaluate-impact.job.js';

type Evaluated = Parameters<typeof summarizeImpact>[1][number];

const build = { id: 'b-1', sha: 'a1b2c3d', branch: 'main', label: null, createdAt: new Date('2026-11-30T10:00:00Z') };
const capture = (id: string) => ({ id, build: { id: build.id }, target: { key: 'evt2-48k' } }) as unknown as Capture;
const failing: Judgement = {
  outcome: 'fail',
  reason: null,
  engineVersion: 'test',
  checks: [{ id: 'level', kind: 'level', label: null, pass: false, measured: -8, limit: -10, margin: -2, unit: 'dBFS', worstHz: null, details: {} }],
};
const erroring = errorJudgement('the capture is 0.2 s long; the stimulus needs 2 s', 'test');
const evaluated = (id: string, now: Judgement, draft: Judgement): Evaluated => ({
  capture: capture(id),
  current: { outcome: now.outcome, revision: 3, checks: new Map(now.checks.map((c) => [c.id, { pass: c.pass, margin: c.margin, unit: c.unit }])) },
  draft,
});

describe('summarizeImpact: a build row follows the build-status rule', () => {
  it('ranks an error above a failure, now and under the draft', () => {
    const result = summarizeImpact([build], [evaluated('c-1', failing, failing), evaluated('c-2', erroring, erroring)]);
    expect(result.builds).toHaveLength(1);
    expect(result.builds[0]!.current).toBe('error');
    expect(result.builds[0]!.draft).toBe('error');
    // An error is neither a pass nor a fail, so the row does not flip.
    expect(result.builds[0]!.flip).toBeNull();
  });

  it('says fail when a capture fails and none errors, pass when all pass', () => {
    const passing: Judgement = { ...failing, outcome: 'pass', checks: [{ ...failing.checks[0]!, pass: true, margin: 1 }] };
    const result = summarizeImpact([build], [evaluated('c-1', passing, failing), evaluated('c-2', passing, passing)]);
    expect(result.builds[0]!.current).toBe('pass');
    expect(result.builds[0]!.draft).toBe('fail');
    expect(result.builds[0]!.flip).toBe('pass-to-fail');
  });
});
