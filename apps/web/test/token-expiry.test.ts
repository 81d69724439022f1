import { describe, expect, it } from 'vitest';
import { describeExpiry, expiryInstant, localDateInputValue } from '@/features/tokens/utils/token-expiry';

const DAY = 86_400_000;
const now = new Date(2026, 11, 3, 14, 30); // 3 Dec 2026, 14:30 local time

describe('expiryInstant', () => {
  it('is null for never and now plus whole days for the presets', () => {
    expect(expiryInstant('never', '', now)).toEqual({ expiresAt: null });
    expect(expiryInstant('30', '', now)).toEqual({ expiresAt: new Date(now.getTime() + 30 * DAY).toISOString() });
    expect(expiryInstant('365', '', now)).toEqual({ expiresAt: new Date(now.getTime() + 365 * DAY).toISOString() });
  });

  it('lets a picked day be used to its end (the next local midnight)', () => {
    expect(expiryInstant('date', '2027-01-15', now)).toEqual({ expiresAt: new Date(2027, 0, 16).toISOString() });
    // Today is still allowed: the token works until midnight.
    expect(expiryInstant('date', localDateInputValue(now), now)).toEqual({ expiresAt: new Date(2026, 11, 4).toISOString() });
  });

  it('refuses a missing or past day in words', () => {
    expect(expiryInstant('date', '', now)).toEqual({ error: 'Pick the last day the token may be used.' });
    expect(expiryInstant('date', '2026-12-02', now)).toEqual({ error: 'Pick today or a later day.' });
  });
});

describe('describeExpiry', () => {
  const at = (ms: number) => new Date(now.getTime() + ms).toISOString();
  it('says nothing for a token that never expires', () => {
    expect(describeExpiry(null, now.getTime())).toBeNull();
  });

  it('counts whole days ahead, rounding a token made a moment ago to its full term', () => {
    expect(describeExpiry(at(30 * DAY - 2000), now.getTime())).toEqual({ expired: false, text: 'expires in 30 days' });
    expect(describeExpiry(at(365 * DAY), now.getTime())).toEqual({ expired: false, text: 'expires in 365 days' });
    expect(describeExpiry(at(5 * 3_600_000), now.getTime())).toEqual({ expired: false, text: 'expires in 5 hours' });
    expect(describeExpiry(at(20 * 60_000), now.getTime())).toEqual({ expired: false, text: 'expires in 20 minutes' });
  });

  it('says how long ago an expired token expired', () => {
    expect(describeExpiry(at(-2 * DAY), now.getTime())).toEqual({ expired: true, text: 'expired 2 days ago' });
    expect(describeExpiry(at(-3 * 3_600_000), now.getTime())).toEqual({ expired: true, text: 'expired 3 hours ago' });
    expect(describeExpiry(at(0), now.getTime())).toEqual({ expired: true, text: 'expired 1 minute ago' });
  });
});
