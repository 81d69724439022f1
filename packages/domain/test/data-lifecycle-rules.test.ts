import { capturePurgedDetail, mebibytes } from '@earmark/contracts';
import { describe, expect, it } from 'vitest';
import { GoneError, assertAudioStored, effectiveQuota, retentionCutoff } from '../src/index.js';

describe('the storage quota in force', () => {
  it("is the project's own when set, 0 meaning unlimited; else the server default, 0 or unset meaning unlimited", () => {
    expect(effectiveQuota({ storageQuotaBytes: 5_000 }, 2_000)).toEqual({ bytes: 5_000, source: 'project' });
    expect(effectiveQuota({ storageQuotaBytes: 0 }, 2_000)).toEqual({ bytes: null, source: 'project' });
    expect(effectiveQuota({ storageQuotaBytes: null }, 2_000)).toEqual({ bytes: 2_000, source: 'default' });
    expect(effectiveQuota({ storageQuotaBytes: null }, 0)).toEqual({ bytes: null, source: 'default' });
    expect(effectiveQuota({ storageQuotaBytes: null }, undefined)).toEqual({ bytes: null, source: 'default' });
  });

  it('names sizes in MiB with one decimal', () => {
    expect(mebibytes(1_600_116)).toBe('1.5 MiB');
    expect(mebibytes(2 * 1024 * 1024)).toBe('2.0 MiB');
    expect(mebibytes(0)).toBe('0.0 MiB');
  });
});

describe('retention', () => {
  it('cuts off builds older than the limit in days; 0 keeps them forever', () => {
    const now = new Date('2027-03-31T12:00:00.000Z');
    expect(retentionCutoff(90, now)).toEqual(new Date('2026-12-31T12:00:00.000Z'));
    expect(retentionCutoff(0, now)).toBe('-infinity');
  });

  it('a purged capture reads as gone with the day it was purged', () => {
    expect(() => assertAudioStored({ purgedAt: null })).not.toThrow();
    const purged = () => assertAudioStored({ purgedAt: new Date('2027-03-01T23:59:00.000Z') });
    expect(purged).toThrow(GoneError);
    expect(purged).toThrow('The audio of this capture was removed by the retention policy on 2027-03-01; its verdict is kept.');
    expect(capturePurgedDetail('2027-03-01T23:59:00.000Z')).toBe('The audio of this capture was removed by the retention policy on 2027-03-01; its verdict is kept.');
  });
});
