// Field reports 8 and 14: exponential-sweep captures given the stimulus as plain samples (as a
// WAV holds it), with idle dither in the latency, a mild cubic nonlinearity, and a capture that
// ends before the stimulus does. Through analyzeCapture and evaluateMask only.
import { describe, expect, it } from 'vitest';
import { StimulusSpec } from '@earmark/contracts';
import { analyzeCapture, evaluateMask, stimulusAsPlayed } from '../../src/index.js';
import { addNoise } from '../../src/testing/index.js';
import { cubic, dbfs } from '../audio-band/capture-signals.js';
import { captureOf } from '../sweep/sweep-signals.js';
import { checkOf, checkWarnings, mask } from './real-capture-helpers.js';

const FS = 48000;
const LEVEL_DBFS = -6;
const SPEC = StimulusSpec.parse({ kind: 'sweep', sampleRate: FS, seconds: 2, levelDbfs: LEVEL_DBFS, from: 20, to: 20000, fadeInSeconds: 0.01, fadeOutSeconds: 0.01, silenceSeconds: 0.3 });
/** The sweep as a WAV would hand it over: samples only, no spec, no transferMethod. */
const REFERENCE = stimulusAsPlayed(SPEC);
const SWEEP = REFERENCE.channels[0] as Float64Array;

describe('report 8: a sweep reference given as plain samples', () => {
  const a = 0.02;
  // 10 ms of latency filled with 24-bit TPDF idle noise, then the sweep through y = x + 0.02·x³.
  const capture = { sampleRate: FS, channels: [captureOf(cubic(SWEEP, a), 480, 0, 1)] };

  it('is recognised as a sweep: deconvolution, latency 480 samples, H3 at the closed form, H2 ≈ 0', () => {
    const t = analyzeCapture(capture, { reference: REFERENCE, transferBandHz: [100, 10000] }).channels[0]?.transfer;
    expect(t?.method).toBe('deconvolution');
    // The capture was built 480 samples late; a memoryless nonlinearity adds no delay.
    expect(Math.abs((t?.latencySamples ?? 0) - 480)).toBeLessThan(0.05);
    // y = x + a·x³ on a sine of amplitude A: x³ = (3·sin − sin 3θ)·A³/4, so the fundamental is
    // A(1 + 3aA²/4) and the 3rd harmonic aA³/4: H3 = (aA²/4)/(1 + 3aA²/4) = 0.1251 % at −6 dBFS
    // (A = 0.501). Farina 2000: the 3rd harmonic response carries exactly this ratio at every f.
    const A = dbfs(LEVEL_DBFS);
    const h3 = (100 * (a * A * A)) / 4 / (1 + (3 * a * A * A) / 4);
    const bands = t?.distortionVsFrequency ?? [];
    const withH3 = bands.filter((b) => b.h3Percent !== null);
    expect(withH3.length).toBeGreaterThanOrEqual(15);
    // ±1 % of the ratio (0.09 dB): the 24-bit idle noise lies 75 dB under the H3 response.
    for (const b of withH3) expect(Math.abs((b.h3Percent ?? 0) / h3 - 1)).toBeLessThan(0.01);
    // A cubic has no even harmonic (closed form 0). Up to the 5 kHz band 3f stays below fs/2, so
    // no aliased product falls into the H2 window; allow 0.01 % (−80 dB re the fundamental).
    for (const b of bands.filter((x) => x.centerHz <= 5000)) expect(b.h2Percent ?? 0).toBeLessThan(0.01);
  });

  it('passes a 0.05 ms group-delay-variation check: the harmonics do not reach the linear response', () => {
    const result = evaluateMask({ capture, reference: REFERENCE }, mask({ id: 'gd', kind: 'phase-linearity', bandHz: [100, 10000], maxGroupDelayVariationMs: 0.05 }));
    const gd = checkOf(result, 'gd');
    // A memoryless path has a constant group delay (Oppenheim & Schafer §5.1): variation 0.
    expect(gd.error).toBeNull();
    expect(gd.pass).toBe(true);
    expect(gd.measured ?? Infinity).toBeLessThan(0.05);
  });

  it('reads a plain wire with −80 dBFS noise as far under 1 ms of group-delay variation', () => {
    const wire = { sampleRate: FS, channels: [addNoise(captureOf(SWEEP, 480, 0, 2), -80, 5)] };
    const t = analyzeCapture(wire, { reference: REFERENCE }).channels[0]?.transfer;
    // A wire: group delay = the latency, 10 ms, at every frequency (closed form), variation 0;
    // noise 74 dB under the sweep may add a little: under a tenth of the reported 1 ms.
    expect(t?.method).toBe('deconvolution');
    expect(Math.abs((t?.groupDelayMs.mean ?? 0) - 10)).toBeLessThan(0.01);
    expect(t?.groupDelayMs.maxDeviation ?? Infinity).toBeLessThan(0.1);
  });
});

describe('report 14: a sweep capture that ends before the stimulus does', () => {
  const n = SWEEP.length;
  const checks = mask(
    { id: 'env', kind: 'magnitude-envelope', measure: 'transfer', upper: [{ hz: 20, db: 1 }, { hz: 20000, db: 1 }], lower: [{ hz: 20, db: -1 }, { hz: 20000, db: -1 }] },
    { id: 'phase', kind: 'phase-linearity', bandHz: [100, 10000], maxDeviationDeg: 5 },
    { id: 'latency', kind: 'timing', metric: 'latency-ms', min: 0, max: 2000 },
  );
  /** A capture as long as the stimulus, started `latency` samples before the stimulus reached it. */
  const truncated = (latency: number) => ({ sampleRate: FS, channels: [captureOf(SWEEP, latency, 0, 3).subarray(0, n)] });

  for (const seconds of [1, 0.5]) {
    it(`${seconds} s of latency: transfer checks are errors that say the capture does not hold the stimulus`, () => {
      const result = evaluateMask({ capture: truncated(seconds * FS), reference: REFERENCE }, checks);
      // The stimulus ends with 0.3 s of silence, so the last `seconds` − 0.3 s of the sweep (its
      // top octaves) were never recorded: |H| and phase there would be fiction, so the checks cannot be evaluated (docs/masks.md, verdict rule 1).
      for (const id of ['env', 'phase']) {
        const c = checkOf(result, id);
        expect(c.measured, `${id} measured`).toBeNull();
        expect(c.error ?? '', `${id} error`).toMatch(/does not hold the whole stimulus/);
        expect(checkWarnings(c).some((w) => /Incomplete capture/.test(w))).toBe(true);
      }
      expect(result.verdict).toBe('error');
      // The latency itself is still measurable from the part that was recorded.
      expect(Math.abs((checkOf(result, 'latency').measured ?? 0) - seconds * 1000)).toBeLessThan(0.01);
    });
  }

  it('analyzeCapture reports the incomplete capture as a warning instead of throwing', () => {
    // 0.2 s of the sweep missing: the report must still come back (levels, integrity, …) with the warning.
    let report: ReturnType<typeof analyzeCapture> | undefined;
    expect(() => {
      report = analyzeCapture(truncated(0.5 * FS), { reference: REFERENCE });
    }).not.toThrow();
    expect(report?.channels[0]?.warnings.some((w) => /Incomplete capture/.test(w))).toBe(true);
  });
});
