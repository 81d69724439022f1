// The mask file format (contracts' MaskDocument): what it accepts and what it rejects, with
// the path of each problem. Every JSON example in docs/masks.md must parse.
import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { CHECK_KINDS, MaskDocument, limitAt } from '@earmark/contracts';
import { interpolateLimit, nearestOctaveBand } from '../../src/index.js';

function issues(json: unknown): { path: string; message: string }[] {
  const r = MaskDocument.safeParse(json);
  return r.success ? [] : r.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message }));
}

const env = (id: string) => ({ id, kind: 'magnitude-envelope', measure: 'transfer', upper: [{ hz: 20, db: 1 }, { hz: 20000, db: 1 }] });

describe('MaskDocument schema', () => {
  it('rejects duplicate check ids at the second occurrence', () => {
    expect(issues({ checks: [env('flat'), env('other'), env('flat')] })).toEqual([{ path: 'checks.2.id', message: 'duplicate check id "flat" (also checks[0])' }]);
  });

  it('rejects an unknown kind, naming the path and the kinds it knows', () => {
    const found = issues({ checks: [env('a'), { id: 'b', kind: 'loudness' }] });
    expect(found).toHaveLength(1);
    expect(found[0]?.path).toBe('checks.1.kind');
    for (const kind of CHECK_KINDS) expect(found[0]?.message).toContain(kind);
  });

  it('rejects limit points whose frequencies do not strictly increase', () => {
    const bad = { ...env('a'), upper: [{ hz: 20, db: 1 }, { hz: 1000, db: 1 }, { hz: 1000, db: 2 }] };
    expect(issues({ checks: [bad] })).toEqual([{ path: 'checks.0.upper.2.hz', message: 'frequencies must strictly increase (1000 Hz follows 1000 Hz)' }]);
    const reversed = { ...env('a'), lower: [{ hz: 500, db: -1 }, { hz: 100, db: -1 }] };
    expect(issues({ checks: [reversed] })[0]?.path).toBe('checks.0.lower.1.hz');
  });

  it('rejects an upper limit below the lower limit, unknown fields, bad slugs and empty masks', () => {
    expect(issues({ checks: [{ ...env('a'), lower: [{ hz: 20, db: 0 }, { hz: 20000, db: 2 }] }] })[0]?.message).toMatch(/upper limit .* falls below the lower limit .* at 20000 Hz/);
    expect(issues({ checks: [{ ...env('a'), tolerance: 3 }] })[0]?.path).toBe('checks.0');
    expect(issues({ checks: [env('Flat Response')] })[0]?.path).toBe('checks.0.id');
    expect(issues({ checks: [] })[0]?.message).toBe('a mask needs at least one check');
    expect(issues({ checks: [{ ...env('a'), smoothing: 5 }] })[0]?.message).toBe('smoothing must be 1, 3, 6, 12 or 24 (1/N octave)');
  });

  it('checks kind-specific rules', () => {
    expect(issues({ checks: [{ id: 'p', kind: 'level', metric: 'energy-parseval', min: 0, max: 1e-9 }] })[0]?.path).toBe('checks.0.min');
    expect(issues({ checks: [{ id: 'l', kind: 'level', metric: 'rms-dbfs' }] })[0]?.message).toBe('give min, max or both');
    expect(issues({ checks: [{ id: 'l', kind: 'level', metric: 'rms-dbfs', min: 0, max: -1 }] })[0]?.path).toBe('checks.0.min');
    expect(issues({ checks: [{ id: 'c', kind: 'integrity', metric: 'clipped-samples', max: 0.5 }] })[0]?.path).toBe('checks.0.max');
    expect(issues({ checks: [{ id: 't', kind: 'distortion', metric: 'thd-percent', max: 1, weighting: 'a' }] })[0]?.path).toBe('checks.0.weighting');
    expect(issues({ checks: [{ id: 'e', kind: 'magnitude-envelope', measure: 'level', referenceHz: 1000, upper: [{ hz: 20, db: 0 }, { hz: 30, db: 0 }] }] })[0]?.path).toBe('checks.0.referenceHz');
    expect(issues({ checks: [{ id: 'p', kind: 'phase-linearity' }] })[0]?.path).toBe('checks.0.maxDeviationDeg');
    // 31.5 (nominal) and 31.62 (exact) name the same 1/3-octave band.
    expect(issues({ checks: [{ id: 'b', kind: 'band-levels', fraction: 3, measure: 'level', bands: [{ centerHz: 31.5, max: 0 }, { centerHz: 31.62, max: 0 }] }] })[0]?.path).toBe('checks.0.bands.1.centerHz');
  });

  it('every JSON example in docs/masks.md parses, and together they cover every kind', () => {
    const doc = readFileSync(join(dirname(fileURLToPath(import.meta.url)), '../../../../docs/masks.md'), 'utf8');
    const blocks = [...doc.matchAll(/```json\n([\s\S]*?)```/g)].map((m) => JSON.parse(m[1] as string) as unknown);
    const kinds = new Set<string>();
    for (const block of blocks) {
      const parsed = MaskDocument.safeParse(block);
      expect(parsed.success, JSON.stringify(parsed.error?.issues)).toBe(true);
      for (const c of parsed.data?.checks ?? []) kinds.add(c.kind);
    }
    expect([...kinds].sort()).toEqual([...CHECK_KINDS].sort());
  });
});

describe('limit interpolation (linear in dB over log frequency)', () => {
  const curve = [{ hz: 100, db: 0 }, { hz: 1000, db: -20 }, { hz: 10000, db: -20 }];

  it('halfway in log frequency is halfway in dB: √(100·1000) = 316.2 Hz reads −10 dB', () => {
    expect(interpolateLimit(curve, Math.sqrt(100 * 1000))).toBeCloseTo(-10, 12);
    // −20 dB/decade = −6.02 dB/octave: one octave above 100 Hz reads −20·log10(2) dB.
    expect(interpolateLimit(curve, 200)).toBeCloseTo(-20 * Math.log10(2), 12);
    expect(interpolateLimit(curve, 5000)).toBe(-20);
  });

  it('does not apply outside the breakpoints, and agrees with the contracts helper the editor uses', () => {
    expect(interpolateLimit(curve, 99.9)).toBeNull();
    expect(interpolateLimit(curve, 10001)).toBeNull();
    for (const f of [100, 150, 316.2, 999, 1000, 4321, 10000]) expect(interpolateLimit(curve, f)).toBeCloseTo(limitAt(curve, f) as number, 12);
  });

  it('matches band labels to the nearest IEC 61260-1 exact centre', () => {
    // Base-10 1/3-octave: f_m = 1000·10^(x/10); nominal 31.5 → x = −15 → 31.62 Hz; 1250 → 1258.9 Hz.
    expect(nearestOctaveBand(3, 31.5).centerHz).toBeCloseTo(1000 * 10 ** -1.5, 9);
    expect(nearestOctaveBand(3, 1250).centerHz).toBeCloseTo(1000 * 10 ** 0.1, 9);
    // Even b (1/6 octave): f_m = 1000·G^((2x+1)/12), G = 10^0.3; 1000 Hz lies on an edge, 1059 Hz is x = 0's centre.
    expect(nearestOctaveBand(6, 1060).centerHz).toBeCloseTo(1000 * 10 ** (0.3 / 12), 9);
  });
});
