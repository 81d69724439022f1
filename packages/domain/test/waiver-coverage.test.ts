import { describe, expect, it } from 'vitest';
import {
  coveredChecks,
  sameCoverage,
  verdictWaiver,
  waivedOutcome,
  waiverBasis,
  waiverMarkOf,
  withWaiverMark,
  type CoveringWaiver,
} from '../src/judging/waiver-coverage.js';

const march = new Date('2027-03-31T23:59:59.999Z');
const june = new Date('2027-06-30T23:59:59.999Z');
const waiver = (id: string, checkId: string, expiresAt: Date, targetId: string | null = null): CoveringWaiver => ({ id, checkId, targetId, expiresAt });
const checks = [
  { id: 'dc', pass: true },
  { id: 'loudness', pass: false },
  { id: 'thd', pass: false },
];

describe('coveredChecks (which failing checks a set of waivers covers)', () => {
  it('covers only failing checks, by check id', () => {
    const covered = coveredChecks(checks, [waiver('w-loud', 'loudness', march), waiver('w-dc', 'dc', march)], 'board-b');
    expect([...covered.entries()].map(([check, w]) => [check, w.id])).toEqual([['loudness', 'w-loud']]);
  });

  it('honours a waiver scoped to one target and one for every target', () => {
    const ws = [waiver('w-a', 'loudness', march, 'board-a'), waiver('w-all', 'thd', march, null)];
    expect([...coveredChecks(checks, ws, 'board-a').keys()]).toEqual(['loudness', 'thd']);
    expect([...coveredChecks(checks, ws, 'board-b').keys()]).toEqual(['thd']);
  });

  it('picks the waiver running longest when several cover one check', () => {
    const covered = coveredChecks(checks, [waiver('w-short', 'loudness', march), waiver('w-long', 'loudness', june), waiver('w-mid', 'loudness', march)], 'b');
    expect(covered.get('loudness')!.id).toBe('w-long');
  });

  it('covers nothing without waivers', () => {
    expect(coveredChecks(checks, [], 'b').size).toBe(0);
  });
});

describe('waivedOutcome (the outcome under the coverage)', () => {
  const judged = { outcome: 'fail' as const, reason: '2 of 3 checks failed: loudness (margin -8 dB), thd (margin -1.5 dB)' };

  it('passes with waiver when every failing check is covered, naming them', () => {
    const covered = coveredChecks(checks, [waiver('w1', 'loudness', march), waiver('w2', 'thd', june)], 'b');
    expect(waivedOutcome(judged, checks, covered)).toEqual({ outcome: 'pass', reason: 'passed with waiver: loudness, thd' });
  });

  it("keeps failing with the analysis' reason when one failing check is not covered", () => {
    const covered = coveredChecks(checks, [waiver('w1', 'loudness', march)], 'b');
    expect(waivedOutcome(judged, checks, covered)).toEqual(judged);
  });

  it('never turns an error into a pass, and leaves a pass alone', () => {
    const covered = coveredChecks(checks, [waiver('w1', 'loudness', march), waiver('w2', 'thd', june)], 'b');
    expect(waivedOutcome({ outcome: 'error', reason: 'check "thd" could not be evaluated' }, checks, covered)).toEqual({ outcome: 'error', reason: 'check "thd" could not be evaluated' });
    expect(waivedOutcome({ outcome: 'pass', reason: null }, [{ id: 'dc', pass: true }], covered)).toEqual({ outcome: 'pass', reason: null });
  });
});

describe('waiver marks on stored check details', () => {
  it('sets { waiverId, until } on a covered check and removes a stale one from an uncovered check', () => {
    const covered = coveredChecks(checks, [waiver('w1', 'loudness', march)], 'b');
    expect(withWaiverMark({ label: 'Level', unit: 'dBFS' }, 'loudness', covered)).toEqual({ label: 'Level', unit: 'dBFS', waived: { waiverId: 'w1', until: '2027-03-31T23:59:59.999Z' } });
    expect(withWaiverMark({ unit: 'dB', waived: { waiverId: 'old', until: '2027-01-01T00:00:00.000Z' } }, 'thd', covered)).toEqual({ unit: 'dB' });
  });

  it('reads the mark back, ignoring malformed ones', () => {
    expect(waiverMarkOf({ waived: { waiverId: 'w1', until: '2027-03-31T23:59:59.999Z' } })).toEqual({ id: 'w1', until: '2027-03-31T23:59:59.999Z' });
    expect(waiverMarkOf({ waived: true })).toBeNull();
    expect(waiverMarkOf({})).toBeNull();
  });
});

describe('waiverBasis and sameCoverage', () => {
  it('lists the applied waivers sorted and once, and names the event that re-judged', () => {
    const covered = coveredChecks(checks, [waiver('w-b', 'loudness', june), waiver('w-a', 'thd', march)], 'b');
    expect(waiverBasis(covered)).toBe('w-a,w-b');
    expect(waiverBasis(new Map([['loudness', { id: 'w-x' }], ['thd', { id: 'w-x' }]]))).toBe('w-x');
    expect(waiverBasis(new Map(), { kind: 'revoked', waiverId: 'w-b' })).toBe(';revoked=w-b');
    expect(waiverBasis(covered, { kind: 'approved', waiverId: 'w-b' })).toBe('w-a,w-b;approved=w-b');
  });

  it('tells whether re-judging would change which waiver covers which check', () => {
    const a = new Map([['loudness', { id: 'w1' }]]);
    expect(sameCoverage(a, new Map([['loudness', { id: 'w1' }]]))).toBe(true);
    expect(sameCoverage(a, new Map([['loudness', { id: 'w2' }]]))).toBe(false);
    expect(sameCoverage(a, new Map())).toBe(false);
    expect(sameCoverage(new Map(), new Map())).toBe(true);
  });
});

describe('verdictWaiver ("passed with waiver, until <date>")', () => {
  it('names the waiver ending first on a passing verdict', () => {
    const marks = [null, { id: 'w-june', until: june.toISOString() }, { id: 'w-march', until: march.toISOString() }];
    expect(verdictWaiver('pass', marks)).toEqual({ id: 'w-march', until: march.toISOString() });
  });

  it('is null on a failing verdict or a pass without waived checks', () => {
    expect(verdictWaiver('fail', [{ id: 'w1', until: march.toISOString() }])).toBeNull();
    expect(verdictWaiver('pass', [null, null])).toBeNull();
  });
});
