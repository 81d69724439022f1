import { describe, expect, it } from 'vitest';
import { currentFailingStreak, findingHistory, type CheckOutcomeAt } from '../src/judging/failure-history.js';

/** A crafted history: one letter per build, P = the check passed, F = it failed; build n is made on day n. */
function history(pattern: string): CheckOutcomeAt[] {
  return [...pattern].map((mark, i) => ({ sha: `b${i + 1}`, createdAt: new Date(Date.UTC(2026, 10, i + 1)).toISOString(), pass: mark === 'P' }));
}

const sha = (p: CheckOutcomeAt | null | undefined) => p?.sha ?? null;

describe('currentFailingStreak', () => {
  it('pass, pass, fail, fail: failing since the third build, two builds long', () => {
    const streak = currentFailingStreak(history('PPFF'));
    expect(sha(streak?.since)).toBe('b3');
    expect(sha(streak?.latest)).toBe('b4');
    expect(streak?.length).toBe(2);
  });

  it('a streak starts after the last pass, not at the first failure ever', () => {
    const streak = currentFailingStreak(history('FFPFFF'));
    expect(sha(streak?.since)).toBe('b4');
    expect(streak?.length).toBe(3);
  });

  it('a history that always failed fails since its first build', () => {
    expect(sha(currentFailingStreak(history('FFF'))?.since)).toBe('b1');
  });

  it('is null when the newest build passes, or there is no build', () => {
    expect(currentFailingStreak(history('FFP'))).toBeNull();
    expect(currentFailingStreak([])).toBeNull();
  });

  it('orders by build time, not by the order given', () => {
    const shuffled = history('PPFF').reverse();
    expect(sha(currentFailingStreak(shuffled)?.since)).toBe('b3');
  });

  it('a single failing build is a streak of one since itself', () => {
    const streak = currentFailingStreak(history('PPPF'));
    expect(sha(streak?.since)).toBe('b4');
    expect(streak?.length).toBe(1);
  });
});

describe('findingHistory', () => {
  it('counts every failing build and keeps the first as first seen, passes in between included', () => {
    const h = findingHistory(history('PFFPFF'));
    expect(sha(h.firstSeen)).toBe('b2');
    expect(h.occurrences).toBe(4);
    expect(sha(h.failingSince)).toBe('b5');
  });

  it('starts after an earlier finding of the same check was closed', () => {
    // b1–b2 belonged to a finding closed on day 3 (between b2 and b3, at noon); this one began at b4.
    const closed = new Date(Date.UTC(2026, 10, 3, 12));
    const h = findingHistory(history('FFPFF'), closed);
    expect(sha(h.firstSeen)).toBe('b4');
    expect(h.occurrences).toBe(2);
    expect(sha(h.failingSince)).toBe('b4');
  });

  it('a finding whose check passes now has no "failing since"', () => {
    const h = findingHistory(history('PFFP'));
    expect(sha(h.firstSeen)).toBe('b2');
    expect(h.occurrences).toBe(2);
    expect(h.failingSince).toBeNull();
  });

  it('nothing failing: no first sighting and no occurrences', () => {
    expect(findingHistory(history('PPP'))).toEqual({ firstSeen: null, occurrences: 0, failingSince: null });
  });
});
