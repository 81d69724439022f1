import { describe, expect, it } from 'vitest';
import { findingTitle } from '../src/finding-title.js';

describe('findingTitle', () => {
  it('names the check by its label and kind, and the margin in the one formatter', () => {
    expect(findingTitle({ checkId: 'response', checkKind: 'magnitude-envelope', checkLabel: 'Passband', margin: -0.8319, unit: 'dB', worstHz: 7986.3 })).toBe(
      'Passband (magnitude envelope): −0.83 dB at 7.99 kHz',
    );
  });

  it('a dBFS check fails by a margin in dB; a count reads as a whole number', () => {
    expect(findingTitle({ checkId: 'level', checkKind: 'level', checkLabel: null, margin: -1.2, unit: 'dBFS', worstHz: null })).toBe('Level: −1.20 dB');
    expect(findingTitle({ checkId: 'clipping', checkKind: 'integrity', checkLabel: 'Clipped samples', margin: -79153, unit: 'count', worstHz: null })).toBe(
      'Clipped samples (time-domain integrity): −79153',
    );
  });

  it('falls back to the check id, and says when there was no margin', () => {
    expect(findingTitle({ checkId: 'latency', margin: null, unit: 'ms', worstHz: null })).toBe('latency: not measurable');
  });
});
