// Mask evaluation on captures made from real stimuli with the @earmark/dsp/testing helpers.
// Expected values come from the filters' analytic responses (RBJ Audio EQ Cookbook), the
// definition of the dB, AES17 and the signals' construction; each is named beside its check.
import { describe, expect, it } from 'vitest';
import { MaskEvaluation } from '@earmark/contracts';
import { evaluateMask } from '../../src/index.js';
import { applyBiquad, applyFir, biquadResponse, clip, lowPassBiquadCoefficients, mapChannels, peakingEqCoefficients, scaleDb, windowedSincLowPass } from '../../src/testing/index.js';
import { FS, MULTITONE, SWEEP, flatEnvelope, mask, rmsDbfs } from './mask-fixtures.js';
import { refusedBy } from '../helpers/refused.js';

const sweepInput = (capture: typeof SWEEP) => ({ capture, reference: SWEEP, transferMethod: 'deconvolution' as const });

/** Stimulus-power-weighted mean |H|² of a biquad over [lo, hi), in dB, on a fine grid (the normalisation the evaluator applies, computed analytically). */
function analyticBandGainDb(coeffs: ReturnType<typeof peakingEqCoefficients>, lo: number, hi: number): number {
  // A Farina sweep has a pink spectrum: power per Hz ∝ 1/f.
  let num = 0;
  let den = 0;
  for (let f = lo; f < hi; f += 0.25) {
    const w = 1 / f;
    num += w * 10 ** (biquadResponse(coeffs, FS, f).magnitudeDb / 10);
    den += w;
  }
  return 10 * Math.log10(num / den);
}

describe('evaluateMask: magnitude envelope', () => {
  it('passes a sweep through a gentle filter (+0.5 dB, 3 kHz, Q 1) against ±1 dB', () => {
    const coeffs = peakingEqCoefficients(FS, 3000, 0.5, 1);
    const capture = mapChannels(SWEEP, (x) => applyBiquad(x, coeffs));
    const result = evaluateMask(sweepInput(capture), mask(flatEnvelope('flat', 1)));
    expect(MaskEvaluation.parse(result).verdict).toBe('pass');
    const check = result.checks[0];
    // The filter's largest excursion is +0.5 dB at 3 kHz (cookbook peakingEQ: |H(f0)| = gain); the
    // curve is normalised by its analytic level around 1 kHz (g1k, ~0.06 dB for this wide bump), so
    // the margin is 1 − (0.5 − g1k), found at 3 kHz; deconvolution ripple and bin grid: ±0.02 dB.
    const g1k = analyticBandGainDb(coeffs, 1000 / 10 ** (0.3 / 6), 1000 * 10 ** (0.3 / 6));
    expect(Math.abs((check?.margin ?? 0) - (1 - (0.5 - g1k)))).toBeLessThan(0.02);
    expect(Math.abs((check?.worstHz ?? 0) / 3000 - 1)).toBeLessThan(0.05);
    expect(check?.unit).toBe('dB');
  });

  it('fails a +2 dB peaking bump at 8 kHz (Q 2) against ±1 dB, worst at 8 kHz with margin ≈ −1 dB', () => {
    const coeffs = peakingEqCoefficients(FS, 8000, 2, 2);
    const capture = mapChannels(SWEEP, (x) => applyBiquad(x, coeffs));
    const result = evaluateMask(sweepInput(capture), mask(flatEnvelope('flat', 1)));
    expect(result.verdict).toBe('fail');
    const check = result.checks[0];
    expect(check?.pass).toBe(false);
    // Cookbook peakingEQ: |H| at f0 = 8 kHz is exactly +2 dB, its maximum. The curve is normalised
    // to its level over the 1/3 octave around 1 kHz (a few thousandths of a dB here, computed from
    // the same analytic response). Expected margin = 1 − (2 − g1k) ≈ −0.993 dB; tolerance 0.03 dB
    // for the deconvolution's ripple and the bin grid (0.73 Hz).
    const g1k = analyticBandGainDb(coeffs, 1000 / 10 ** (0.3 / 6), 1000 * 10 ** (0.3 / 6));
    expect(biquadResponse(coeffs, FS, 8000).magnitudeDb).toBeCloseTo(2, 12);
    expect(Math.abs((check?.margin ?? 0) - (1 - (2 - g1k)))).toBeLessThan(0.03);
    expect(Math.abs((check?.worstHz ?? 0) / 8000 - 1)).toBeLessThan(0.05);
    expect(check?.limit).toBe(1);
    // The failing region straddles 8 kHz: the bump exceeds +1 dB between its analytic +1 dB points.
    const regions = check?.details.failingRegions as { fromHz: number; toHz: number }[];
    expect(regions.some((r) => r.fromHz < 8000 && r.toHz > 8000)).toBe(true);
    expect(result.reason).toBe('1 of 1 checks failed: flat');
  });

  it('measures the same bump with H1 on a multitone, at the tones only', () => {
    const coeffs = peakingEqCoefficients(FS, 8000, 2, 2);
    const capture = mapChannels(MULTITONE, (x) => applyBiquad(x, coeffs));
    const check = evaluateMask({ capture, reference: MULTITONE, transferMethod: 'h1' }, mask(flatEnvelope('flat', 1))).checks[0];
    // The tone nearest 8 kHz is a few % away, so the worst |H| is a little under +2 dB: margin in
    // (−1, −0.9) by the analytic response at ±3 % of f0 (≥ +1.9 dB).
    expect(check?.margin).toBeLessThan(-0.9);
    expect(check?.margin).toBeGreaterThan(-1.02);
    expect(Math.abs((check?.worstHz ?? 0) / 8000 - 1)).toBeLessThan(0.05);
    // Only bins carrying stimulus energy are measured: far fewer than the 8192-point grid holds.
    expect(check?.details.pointsEvaluated as number).toBeLessThan(1000);
  });

  it('1/3-octave smoothing averages the bump: the worst value drops below the peak', () => {
    const capture = mapChannels(SWEEP, (x) => applyBiquad(x, peakingEqCoefficients(FS, 8000, 2, 2)));
    const raw = evaluateMask(sweepInput(capture), mask(flatEnvelope('flat', 1))).checks[0];
    const smooth = evaluateMask(sweepInput(capture), mask({ ...flatEnvelope('flat', 1), smoothing: 3 } as Parameters<typeof mask>[0])).checks[0];
    // A mean of |H|² over a 1/3 octave around the peak is below the peak and above 0 dB.
    expect(smooth?.measured ?? 0).toBeLessThan(raw?.measured ?? 0);
    expect(smooth?.measured ?? 0).toBeGreaterThan(1);
  });

  it('checks the level spectrum in dBFS without a reference: a −20 dBFS 1 kHz sine against a −19 dBFS ceiling', () => {
    const sine = { sampleRate: FS, channels: [Float64Array.from({ length: FS }, (_, n) => 0.1 * Math.sin((2 * Math.PI * 1000 * n) / FS))] };
    const check = evaluateMask({ capture: sine }, mask({ id: 'ceiling', kind: 'magnitude-envelope', measure: 'level', upper: [{ hz: 20, db: -19 }, { hz: 20000, db: -19 }] })).checks[0];
    // Amplitude 0.1 = −20 dBFS (AES17); 1 kHz falls on bin 1000/(48000/65536) = 1365.3, between bins,
    // so the Hann spectrum reads up to 1.42 dB low (Harris 1978 scalloping loss): margin in [1, 2.42] dB.
    expect(check?.unit).toBe('dBFS');
    expect(check?.pass).toBe(true);
    expect(check?.margin).toBeGreaterThanOrEqual(1 - 1e-6);
    expect(check?.margin).toBeLessThan(2.43);
    expect(Math.abs((check?.worstHz ?? 0) - 1000)).toBeLessThan(2);
  });
});

describe('evaluateMask: level, integrity, energy', () => {
  it('fails a −20 dB level change with margin equal to the overshoot', () => {
    const expected = rmsDbfs(MULTITONE.channels[0] as Float64Array);
    const capture = mapChannels(MULTITONE, (x) => scaleDb(x, -20));
    const check = evaluateMask({ capture }, mask({ id: 'level', kind: 'level', metric: 'rms-dbfs', min: expected - 1, max: expected + 1 })).checks[0];
    // −20 dB of gain lowers the RMS level by exactly 20 dB (definition of the dB), so the
    // capture reads expected − 20 and the margin against min = expected − 1 is −19 dB.
    expect(check?.measured).toBeCloseTo(expected - 20, 9);
    expect(check?.limit).toBeCloseTo(expected - 1, 12);
    expect(check?.margin).toBeCloseTo(-19, 9);
    expect(check?.unit).toBe('dBFS');
  });

  it('fails clipped-samples on a capture driven 12 dB into full-scale clipping', () => {
    const capture = mapChannels(SWEEP, (x) => clip(scaleDb(x, 12), 1));
    const result = evaluateMask({ capture }, mask({ id: 'no-clip', kind: 'integrity', metric: 'clipped-samples', max: 0 }));
    // The −6 dBFS sweep (peak 0.5) at +12 dB peaks at 2 and is clipped to ±1. Clipped samples are
    // those in runs of ≥ 2 consecutive samples stuck at the same extreme (docs/analysis.md): a
    // peak that touches ±1 for a single sample (the sweep's top octave) is not distinguishable
    // from a clean peak. Counted here directly from the clipped signal.
    const y = capture.channels[0] as Float64Array;
    let expected = 0;
    for (let i = 0; i < y.length; ) {
      let j = i;
      while (j < y.length && Math.abs(y[j] as number) === 1 && y[j] === y[i]) j++;
      if (j - i >= 2) expected += j - i;
      i = Math.max(j, i + 1);
    }
    expect(expected).toBeGreaterThan(1000);
    expect(result.verdict).toBe('fail');
    expect(result.checks[0]?.measured).toBe(expected);
    expect(result.checks[0]?.margin).toBe(-expected);
    expect(result.checks[0]?.unit).toBe('count');
    // The unclipped stimulus passes the same check (peak 0.5 < 32767/32768).
    expect(evaluateMask({ capture: SWEEP }, mask({ id: 'no-clip', kind: 'integrity', metric: 'clipped-samples', max: 0 })).verdict).toBe('pass');
  });

  it('energy-parseval agrees to better than 1e-9 (Parseval: Σx² = (1/N)·Σ|X_k|²)', () => {
    const check = evaluateMask({ capture: MULTITONE }, mask({ id: 'parseval', kind: 'level', metric: 'energy-parseval', max: 1e-9 })).checks[0];
    expect(check?.pass).toBe(true);
    expect(check?.measured).toBeLessThan(1e-9);
    expect(check?.unit).toBe('ratio');
  });

  it('reports DC offset in full-scale units and counts dropouts', () => {
    // 1 kHz over exactly 1000 cycles has zero mean; +0.01 DC; 96 samples (2 ms, two whole cycles)
    // zeroed: mean = 0.01·(48000 − 96)/48000.
    const x = Float64Array.from({ length: FS }, (_, n) => 0.25 * Math.sin((2 * Math.PI * 1000 * n) / FS) + 0.01);
    x.fill(0, 10000, 10000 + 96);
    const result = evaluateMask({ capture: { sampleRate: FS, channels: [x] } }, mask(
      { id: 'dc', kind: 'integrity', metric: 'dc-offset', max: 0.001 },
      { id: 'dropouts', kind: 'integrity', metric: 'dropouts', max: 0 },
    ));
    const [dc, dropouts] = result.checks;
    expect(dc?.measured).toBeCloseTo((0.01 * (FS - 96)) / FS, 12);
    expect(dc?.unit).toBe('FS');
    expect(dc?.pass).toBe(false);
    expect(dropouts?.measured).toBe(1);
    expect(dropouts?.details.dropouts).toEqual([{ startSample: 10000, lengthSamples: 96 }]);
  });
});

describe('evaluateMask: phase linearity', () => {
  const phaseMask = mask({ id: 'phase', kind: 'phase-linearity', bandHz: [100, 6000], maxDeviationDeg: 1 });
  const fir = windowedSincLowPass(FS, 8000, 63);
  const iir = lowPassBiquadCoefficients(FS, 8000);

  it('passes a linear-phase FIR and fails a minimum-phase low-pass of similar magnitude', () => {
    const linear = evaluateMask(sweepInput(mapChannels(SWEEP, (x) => applyFir(x, fir))), phaseMask).checks[0];
    const minimum = evaluateMask(sweepInput(mapChannels(SWEEP, (x) => applyBiquad(x, iir))), phaseMask).checks[0];
    // Symmetric taps: phase exactly linear (Oppenheim & Schafer §5.7); what remains is estimation
    // error, well under 1°. The Butterworth biquad's phase −atan(√2·r/(1 − r²)), r = f/8 kHz, bends
    // by degrees from any straight line over 100 Hz…6 kHz.
    expect(linear?.pass).toBe(true);
    expect(linear?.measured).toBeLessThan(0.3);
    expect(minimum?.pass).toBe(false);
    expect(minimum?.measured).toBeGreaterThan(1.5);
    expect(minimum?.unit).toBe('deg');
    // The FIR's mean group delay is its (63 − 1)/2 = 31 samples = 0.6458 ms (latency included).
    expect(linear?.details.meanGroupDelayMs as number).toBeCloseTo((1000 * 31) / FS, 4);
  });

  it('checks group-delay variation in ms: the FIR is flat, the biquad is not', () => {
    const gdMask = mask({ id: 'gd', kind: 'phase-linearity', bandHz: [100, 6000], maxGroupDelayVariationMs: 0.005 });
    const linear = evaluateMask({ capture: mapChannels(MULTITONE, (x) => applyFir(x, fir)), reference: MULTITONE }, gdMask).checks[0];
    const minimum = evaluateMask({ capture: mapChannels(MULTITONE, (x) => applyBiquad(x, iir)), reference: MULTITONE }, gdMask).checks[0];
    expect(linear?.unit).toBe('ms');
    expect(linear?.measured).toBeLessThan(0.001);
    expect(minimum?.pass).toBe(false);
    // Analytic group delay of the biquad (from its coefficients) varies by more than 5 µs about
    // its mean over the band: at 100 Hz and 6 kHz it differs by tens of µs.
    const tau = (f: number): number => {
      const d = 1;
      return -(biquadResponse(iir, FS, f + d).phaseRad - biquadResponse(iir, FS, f - d).phaseRad) / (2 * Math.PI * 2 * d);
    };
    expect(1000 * (tau(6000) - tau(100))).toBeGreaterThan(0.01);
    expect(minimum?.measured).toBeGreaterThan(0.005);
  });
});

describe('evaluateMask: verdicts and errors', () => {
  it('a check that needs the stimulus reports an error without one, and the verdict is error', () => {
    const result = evaluateMask({ capture: SWEEP }, mask(flatEnvelope('flat', 1), { id: 'rms', kind: 'level', metric: 'rms-dbfs', max: 0 }));
    expect(result.verdict).toBe('error');
    expect(result.checks[0]?.pass).toBe(false);
    expect(result.checks[0]?.error).toMatch(/no stimulus \(reference\) was given/);
    expect(result.checks[1]?.pass).toBe(true);
    expect(result.reason).toMatch(/^check "flat" could not be evaluated: /);
  });

  it('fails if any channel fails and reports the worst channel', () => {
    const ch0 = MULTITONE.channels[0] as Float64Array;
    const capture = { sampleRate: FS, channels: [ch0, scaleDb(ch0, -3), scaleDb(ch0, -1)] };
    const level = rmsDbfs(ch0);
    const result = evaluateMask({ capture }, mask({ id: 'rms', kind: 'level', metric: 'rms-dbfs', min: level - 2 }));
    const check = result.checks[0];
    expect(check?.pass).toBe(false);
    expect(check?.channel).toBe(1);
    // Channel 1 is 3 dB down: margin −1 dB against min = level − 2 (definition of the dB).
    expect(check?.margin).toBeCloseTo(-1, 9);
    expect((check?.details.perChannel as unknown[]).length).toBe(3);
    // Restricting the check to channels 0 and 2 makes it pass.
    expect(evaluateMask({ capture }, mask({ id: 'rms', kind: 'level', metric: 'rms-dbfs', min: level - 2, channels: [0, 2] })).verdict).toBe('pass');
  });

  it('a channel the capture lacks is that check\'s error; a bad capture throws naming evaluateMask', () => {
    const result = evaluateMask({ capture: MULTITONE }, mask({ id: 'rms', kind: 'level', metric: 'rms-dbfs', max: 0, channels: [3] }));
    expect(result.checks[0]?.error).toMatch(/channel 3 does not exist/);
    expect(() => evaluateMask({ capture: { sampleRate: FS, channels: [] } }, mask({ id: 'rms', kind: 'level', metric: 'rms-dbfs', max: 0 }))).toThrow(refusedBy('evaluateMask'));
    expect(() => evaluateMask({ capture: MULTITONE, reference: { sampleRate: 44100, channels: MULTITONE.channels } }, mask({ id: 'rms', kind: 'level', metric: 'rms-dbfs', max: 0 }))).toThrow(refusedBy('evaluateMask', /^the capture is sampled at 48000 Hz but the stimulus is rendered at 44100 Hz$/));
  });
});
