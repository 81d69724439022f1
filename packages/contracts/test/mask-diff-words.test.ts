import { describe, expect, it } from 'vitest';
import { ACCEPTANCE_LEVEL_METRICS, describeCheckDiff, LEVEL_METRICS, metricLabel, selfTestIssues, smoothingLabel } from '../src/index.js';

const M = '\u2212';
const changed = (before: Record<string, unknown>, after: Record<string, unknown>) => describeCheckDiff({ kind: String(after.kind), status: 'changed', before, after });

const envelope = (upper: { hz: number; db: number }[], extra: Record<string, unknown> = {}) => ({
  kind: 'magnitude-envelope',
  id: 'response',
  measure: 'transfer',
  upper,
  lower: [
    { hz: 20, db: -1 },
    { hz: 20000, db: -1 },
  ],
  ...extra,
});

describe('describeCheckDiff', () => {
  it('names a moved limit point by its frequency and the check unit', () => {
    const before = envelope([
      { hz: 20, db: 1.5 },
      { hz: 8000, db: 1.5 },
      { hz: 20000, db: 1.5 },
    ]);
    const after = envelope([
      { hz: 20, db: 1.5 },
      { hz: 8000, db: 1 },
      { hz: 20000, db: 1.5 },
    ]);
    expect(changed(before, after)).toEqual(['upper limit at 8 kHz: +1.50 → +1.00 dB']);
  });

  it('says which points were added or removed, in dBFS on a level spectrum', () => {
    const before = envelope([{ hz: 20, db: -90 }, { hz: 1000, db: -95 }, { hz: 20000, db: -90 }], { measure: 'level' });
    const after = envelope([{ hz: 20, db: -90 }, { hz: 12500, db: -92.5 }, { hz: 20000, db: -90 }], { measure: 'level' });
    expect(changed(before, after)).toEqual([
      `upper limit: point at 1 kHz removed (was ${M}95.00 dBFS)`,
      `upper limit: point added at 12.5 kHz, ${M}92.50 dBFS`,
    ]);
  });

  it('writes smoothing as 1/N octave and metrics as labels with units', () => {
    expect(changed(envelope([{ hz: 20, db: 1 }, { hz: 20000, db: 1 }], { smoothing: 6 }), envelope([{ hz: 20, db: 1 }, { hz: 20000, db: 1 }], { smoothing: 12 }))).toEqual([
      'smoothing: 1/6 octave → 1/12 octave',
    ]);
    expect(changed({ kind: 'level', id: 'lvl', metric: 'rms-dbfs', min: -21, max: -19 }, { kind: 'level', id: 'lvl', metric: 'peak-dbfs', min: -21, max: -18.5 })).toEqual([
      'metric: RMS level (dBFS) → Peak level (dBFS)',
      `max: ${M}19.00 → ${M}18.50 dBFS`,
    ]);
    expect(changed({ kind: 'distortion', id: 'thd', metric: 'thd-percent', max: 0.1 }, { kind: 'distortion', id: 'thd', metric: 'thd-percent', max: 0.05 })).toEqual(['max: 0.1 → 0.05 %']);
  });

  it('describes band limits, an added min and a removed limit', () => {
    const bands = (max: number, min?: number) => ({ kind: 'band-levels', id: 'b', fraction: 3, measure: 'level', bands: [{ centerHz: 1000, max, ...(min === undefined ? {} : { min }) }] });
    expect(changed(bands(-100), bands(-95, -120))).toEqual([`band at 1 kHz, min: none → ${M}120.00 dBFS`, `band at 1 kHz, max: ${M}100.00 → ${M}95.00 dBFS`]);
    expect(changed(envelope([{ hz: 20, db: 1 }, { hz: 20000, db: 1 }]), { ...envelope([]), upper: undefined })).toEqual(['upper limit removed']);
  });

  it('gives one sentence for added, removed and re-kinded checks, none when unchanged', () => {
    expect(describeCheckDiff({ kind: 'timing', status: 'added', before: null, after: { kind: 'timing', id: 't' } })).toEqual(['new timing check']);
    expect(describeCheckDiff({ kind: 'level', status: 'removed', before: { kind: 'level', id: 'l' }, after: null })).toEqual(['level check removed']);
    expect(describeCheckDiff({ kind: 'level', status: 'unchanged', before: { kind: 'level' }, after: { kind: 'level' } })).toEqual([]);
    expect(changed({ kind: 'level', id: 'x' }, { kind: 'timing', id: 'x' })).toEqual(['kind: Level → Timing (the check was replaced)']);
  });
});

describe('check labels', () => {
  it('shows metrics with their units, never the slug', () => {
    expect(metricLabel('rms-dbfs')).toBe('RMS level (dBFS)');
    expect(metricLabel('thdn-db')).toBe('THD+N (dB)');
    expect(metricLabel('dynamic-range-db')).toBe('Dynamic range (dB, A-weighted)');
    expect(metricLabel('clipped-samples')).toBe('Clipped samples (count)');
    expect(metricLabel('polarity')).toBe('Polarity (must be normal)');
    expect(metricLabel('h2-db')).toBe('2nd harmonic per band (dB, re fundamental)');
  });

  it('writes smoothing as a fraction of an octave', () => {
    expect([1, 3, 6, 24, undefined].map(smoothingLabel)).toEqual(['1 octave', '1/3 octave', '1/6 octave', '1/24 octave', 'none']);
  });

  it('keeps the engine self-test out of acceptance masks', () => {
    expect(ACCEPTANCE_LEVEL_METRICS).toEqual(LEVEL_METRICS.filter((m) => m !== 'energy-parseval'));
    const issues = selfTestIssues([{ kind: 'level', metric: 'rms-dbfs' }, { kind: 'level', metric: 'energy-parseval' }]);
    expect(issues).toHaveLength(1);
    expect(issues[0]?.path).toBe('checks.1.metric');
    expect(issues[0]?.message).toMatch(/engine self-test .* cannot be part of an acceptance mask/);
  });
});
