import { describe, expect, it } from 'vitest';
import { changedFields } from '../src/services/audit.service.js';

describe('changedFields (what an audit row records for an edit)', () => {
  it('keeps only the fields whose value changes, with both values', () => {
    const current = { name: 'Music EQ', channelMap: [0, 1], analysis: { window: 'hann', fftSize: 8192 } };
    const patch = { name: 'Music EQ', channelMap: [1, 0], analysis: { window: 'hann', fftSize: 16384 }, description: undefined };
    expect(changedFields(current, patch)).toEqual({
      before: { channelMap: [0, 1], analysis: { window: 'hann', fftSize: 8192 } },
      after: { channelMap: [1, 0], analysis: { window: 'hann', fftSize: 16384 } },
    });
  });

  it('records a field that was absent as null before', () => {
    expect(changedFields({}, { note: 'first' })).toEqual({ before: { note: null }, after: { note: 'first' } });
  });

  it('is empty when nothing changes', () => {
    expect(changedFields({ a: 1, b: [1, 2] }, { a: 1, b: [1, 2] })).toEqual({ before: {}, after: {} });
  });
});
