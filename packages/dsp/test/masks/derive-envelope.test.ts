// Deriving an envelope from golden captures. Expected statistics come from the captures'
// construction (gains with an exact mean and sample standard deviation; RBJ cookbook peaking EQ,
// whose |H(f0)| equals its gain), the simplification's guarantees from its definition
// (Ramer 1972; Douglas & Peucker 1973) and the contracts' MaskCheck schema.
import { describe, expect, it } from 'vitest';
import { MaskCheck, MaskDocument } from '@earmark/contracts';
import { deriveEnvelope, evaluateMask, sampleLimit, simplifyPolyline, twoDigitHz, type LimitBreakpoint } from '../../src/index.js';
import { applyBiquad, mapChannels, peakingEqCoefficients, scaleDb } from '../../src/testing/index.js';
import { FS, SWEEP } from './mask-fixtures.js';
import { refusedBy } from '../helpers/refused.js';

const input = (captures: (typeof SWEEP)[]) => ({ captures, reference: SWEEP, transferMethod: 'deconvolution' as const });

/** Eight gains, four at +a and four at −a: mean 0 and sample σ = a·√(8/7), so a = σ·√(7/8) gives σ exactly. */
/** Breakpoints a reviewer can read: frequencies of at most two significant digits, levels in whole 0.1 dB steps. */
function expectRounded(limit: readonly LimitBreakpoint[]): void {
  for (const { hz, db } of limit) {
    expect(Number(hz.toPrecision(2))).toBe(hz);
    expect(Math.abs(db * 10 - Math.round(db * 10))).toBeLessThan(1e-9);
    expect(Number(db.toFixed(1))).toBe(db);
  }
}

function gainsWithSigma(sigma: number): number[] {
  const a = sigma * Math.sqrt(7 / 8);
  return [a, -a, a, -a, a, -a, a, -a];
}

describe('deriveEnvelope: statistics', () => {
  it('reproduces mean ± (kσ + guard) of broadband gains with a known σ (N = 8, σ = 0.5 dB)', () => {
    const captures = gainsWithSigma(0.5).map((g) => mapChannels(SWEEP, (x) => scaleDb(x, g)));
    const k = 3;
    const guardDb = 0.5;
    const d = deriveEnvelope(input(captures), { measure: 'transfer', referenceHz: null, k, guardDb, maxSegments: 8, bandHz: [50, 16000] });
    expect(d.hz.length).toBeGreaterThan(1000);
    for (let j = 0; j < d.hz.length; j++) {
      // Scaling by g shifts |H| by exactly g dB at every frequency, so σ is the gains' σ to float
      // precision; the mean is 0 dB up to the deconvolution ripple of the unscaled sweep (±0.05 dB).
      expect(Math.abs((d.std[j] as number) - 0.5)).toBeLessThan(1e-6);
      expect(Math.abs(d.mean[j] as number)).toBeLessThan(0.05);
      expect(Math.abs((d.upperRaw[j] as number) - (0 + k * 0.5 + guardDb))).toBeLessThan(0.1);
      expect(Math.abs((d.lowerRaw[j] as number) - (0 - k * 0.5 - guardDb))).toBeLessThan(0.1);
    }
    expect(d.unit).toBe('dB');
    // The golden captures sit at most a·√(7/8)… inside: margin ≥ kσ + guard − max|g| ≈ 2.0 − 0.47 dB.
    expect(d.worstGoldenMarginDb).toBeGreaterThan(1.4);
  });

  it('finds a frequency-dependent σ: peaking EQ at 2 kHz with gains of σ = 1 dB, flat elsewhere', () => {
    const gains = gainsWithSigma(1).map((g) => g + 2); // mean +2 dB at f0
    const captures = gains.map((g) => mapChannels(SWEEP, (x) => applyBiquad(x, peakingEqCoefficients(FS, 2000, g, 2))));
    const d = deriveEnvelope(input(captures), { measure: 'transfer', referenceHz: null, k: 2, guardDb: 0.25, maxSegments: 16, bandHz: [50, 16000] });
    let j0 = 0;
    for (let j = 0; j < d.hz.length; j++) if (Math.abs((d.hz[j] as number) - 2000) < Math.abs((d.hz[j0] as number) - 2000)) j0 = j;
    // RBJ peakingEQ: |H(f0)| = gain dB exactly, so at f0 the mean is 2 dB and σ is 1 dB (the bin
    // nearest 2 kHz lies within 1 Hz of it, where a Q-2 peak is flat to < 0.01 dB).
    expect(Math.abs((d.mean[j0] as number) - 2)).toBeLessThan(0.1);
    expect(Math.abs((d.std[j0] as number) - 1)).toBeLessThan(0.1);
    expect(Math.abs((d.upperRaw[j0] as number) - (2 + 2 * 1 + 0.25))).toBeLessThan(0.1);
    // Two octaves away the peaks have died out: σ < 0.1 dB and the mean ~0 dB.
    const far = d.hz.findIndex((f) => f >= 8000);
    expect(d.std[far] as number).toBeLessThan(0.1);
    expect(Math.abs(d.mean[far] as number)).toBeLessThan(0.15);
  });
});

describe('deriveEnvelope: simplification', () => {
  const gains = gainsWithSigma(1).map((g) => g + 3);
  const captures = gains.map((g) => mapChannels(SWEEP, (x) => applyBiquad(applyBiquad(x, peakingEqCoefficients(FS, 2000, g, 2)), peakingEqCoefficients(FS, 200, -g / 2, 1))));

  for (const maxSegments of [3, 6, 12, 24]) {
    it(`keeps to ${maxSegments} segments, bounds the raw limits and reports its deviation`, () => {
      const d = deriveEnvelope(input(captures), { measure: 'transfer', k: 3, guardDb: 0.5, maxSegments, smoothing: 6, bandHz: [50, 16000] });
      const check = MaskCheck.parse(d.check);
      expect(check.kind).toBe('magnitude-envelope');
      if (check.kind !== 'magnitude-envelope') return;
      expect(check.upper!.length).toBeLessThanOrEqual(maxSegments + 1);
      expect(check.lower!.length).toBeLessThanOrEqual(maxSegments + 1);
      expectRounded(check.upper!);
      expectRounded(check.lower!);
      const up = sampleLimit(check.upper!, d.hz);
      const lo = sampleLimit(check.lower!, d.hz);
      let devUp = 0;
      let devLo = 0;
      for (let j = 0; j < d.hz.length; j++) {
        // Never inside the raw limits (the guarantee), to float precision.
        expect(up[j] as number).toBeGreaterThanOrEqual((d.upperRaw[j] as number) - 1e-9);
        expect(lo[j] as number).toBeLessThanOrEqual((d.lowerRaw[j] as number) + 1e-9);
        devUp = Math.max(devUp, Math.abs((up[j] as number) - (d.upperRaw[j] as number)));
        devLo = Math.max(devLo, Math.abs((lo[j] as number) - (d.lowerRaw[j] as number)));
      }
      expect(d.maxStrayDb).toBe(0);
      expect(d.maxDeviationDb.upper).toBeCloseTo(devUp, 9);
      expect(d.maxDeviationDb.lower).toBeCloseTo(devLo, 9);
      // Every golden capture passes its own proposal (k = 3 with N = 8 covers each one).
      for (const c of captures) expect(evaluateMask({ capture: c, reference: SWEEP, transferMethod: 'deconvolution' }, MaskDocument.parse({ checks: [check] })).verdict).toBe('pass');
    });
  }

  it('deviates less with a larger budget', () => {
    const coarse = deriveEnvelope(input(captures), { measure: 'transfer', k: 3, guardDb: 0.5, maxSegments: 4, smoothing: 6, bandHz: [50, 16000] });
    const fine = deriveEnvelope(input(captures), { measure: 'transfer', k: 3, guardDb: 0.5, maxSegments: 32, smoothing: 6, bandHz: [50, 16000] });
    expect(fine.maxDeviationDb.overall).toBeLessThan(coarse.maxDeviationDb.overall);
    expect(fine.maxDeviationDb.overall).toBeLessThan(0.5);
  });

  it('decimates the statistics for plotting', () => {
    const d = deriveEnvelope(input(captures), { measure: 'transfer', k: 3, guardDb: 0.5, maxSegments: 8, bandHz: [50, 16000], columns: 64 });
    expect(d.plot.hz.length).toBeGreaterThan(32);
    expect(d.plot.hz.length).toBeLessThanOrEqual(64);
    expect(d.plot.mean.length).toBe(d.plot.hz.length);
    for (let i = 1; i < d.plot.hz.length; i++) expect(d.plot.hz[i]!).toBeGreaterThan(d.plot.hz[i - 1]!);
  });
});

describe('deriveEnvelope: rounded breakpoints', () => {
  it('turns a flat ±0.5 dB golden set into a few breakpoints at rounded frequencies, never tighter than the raw limits', () => {
    // Eight identical captures: σ = 0, so the raw limits are the mean (0 dB up to the ±0.05 dB
    // deconvolution ripple) ± 0.5 dB, the flat case that came out as 13 breakpoints.
    const captures = gainsWithSigma(0).map((g) => mapChannels(SWEEP, (x) => scaleDb(x, g)));
    const d = deriveEnvelope(input(captures), { measure: 'transfer', referenceHz: null, k: 3, guardDb: 0.5, maxSegments: 12, bandHz: [20, 20000] });
    const check = MaskCheck.parse(d.check);
    if (check.kind !== 'magnitude-envelope') throw new Error('expected a magnitude envelope');
    const upper = check.upper!;
    const lower = check.lower!;
    expect(upper.length).toBeLessThanOrEqual(3);
    expect(lower.length).toBeLessThanOrEqual(3);
    expectRounded(upper);
    expectRounded(lower);
    // The ends are rounded outward in frequency, so the limits still span every measured frequency.
    expect(upper[0]!.hz).toBeLessThanOrEqual(d.hz[0]!);
    expect(upper.at(-1)!.hz).toBeGreaterThanOrEqual(d.hz.at(-1)!);
    // Rounded outward: 0.5 dB plus the ripple becomes 0.6 dB (−0.6 dB below, except near the
    // first measured frequency, 90 Hz here, where the ripple lifts the raw lower limit above −0.5 dB).
    expect(upper).toEqual([{ hz: 90, db: 0.6 }, { hz: 20000, db: 0.6 }]);
    expect(lower).toEqual([{ hz: 90, db: -0.5 }, { hz: 120, db: -0.6 }, { hz: 20000, db: -0.6 }]);
    const up = sampleLimit(upper, d.hz);
    const lo = sampleLimit(lower, d.hz);
    for (let j = 0; j < d.hz.length; j++) {
      expect(up[j]!).toBeGreaterThanOrEqual(d.upperRaw[j]!);
      expect(lo[j]!).toBeLessThanOrEqual(d.lowerRaw[j]!);
    }
  });

  it('rounds frequencies to two significant digits, down, up or to the nearest', () => {
    expect(twoDigitHz(20.1416015625, 'nearest')).toBe(20);
    expect(twoDigitHz(20.1416015625, 'up')).toBe(21);
    expect(twoDigitHz(19996, 'up')).toBe(20000);
    expect(twoDigitHz(9540, 'nearest')).toBe(9500);
    expect(twoDigitHz(10499, 'nearest')).toBe(10000);
    expect(twoDigitHz(99.6, 'nearest')).toBe(100);
    expect(twoDigitHz(1.234, 'down')).toBe(1.2);
    expect(twoDigitHz(0.0567, 'up')).toBe(0.057);
    // Already round: unchanged in every mode.
    for (const mode of ['down', 'up', 'nearest'] as const) expect(twoDigitHz(12000, mode)).toBe(12000);
  });
});

describe('simplifyPolyline (Ramer–Douglas–Peucker with a segment budget)', () => {
  it('returns exactly the corners of a polyline given as many segments as it has', () => {
    // A polyline with corners at x = 0, 3, 7, 10 sampled every 0.5: three segments reproduce it.
    const corners = [[0, 0], [3, 6], [7, -2], [10, 1]] as const;
    const xs: number[] = [];
    const ys: number[] = [];
    for (let x = 0; x <= 10; x += 0.5) {
      xs.push(x);
      const s = x <= 3 ? 0 : x <= 7 ? 1 : 2;
      const [xa, ya] = corners[s]!;
      const [xb, yb] = corners[s + 1]!;
      ys.push(ya + ((yb - ya) * (x - xa)) / (xb - xa));
    }
    expect(simplifyPolyline(Float64Array.from(xs), Float64Array.from(ys), 3).map((i) => xs[i])).toEqual([0, 3, 7, 10]);
    expect(simplifyPolyline(Float64Array.from(xs), Float64Array.from(ys), 10).map((i) => xs[i])).toEqual([0, 3, 7, 10]);
    expect(simplifyPolyline(Float64Array.from(xs), Float64Array.from(ys), 1)).toEqual([0, xs.length - 1]);
  });

  it('names itself in its errors', () => {
    expect(() => simplifyPolyline(Float64Array.of(1), Float64Array.of(1), 2)).toThrow(refusedBy('simplifyPolyline'));
    expect(() => deriveEnvelope(input([SWEEP]), { measure: 'transfer', k: 1, guardDb: 0, maxSegments: 4, bandHz: [50, 16000] })).toThrow(refusedBy('deriveEnvelope'));
  });
});
