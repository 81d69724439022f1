// Field reports 1–4: tone captures whose THD+N, SNR, dynamic range and noise floor must come
// out at the closed form of the quantiser's noise, through analyzeCapture and evaluateMask only.
// Every capture is what a rig returns: generator fades, dithered idle latency, ultrasonic
// pilots and noise shelves, 16- and 24-bit words.
import { describe, expect, it } from 'vitest';
import { StimulusSpec } from '@earmark/contracts';
import { analyzeCapture, evaluateMask, generateStimulus, stimulusAsPlayed } from '../../src/index.js';
import { addInto, bandNoise, dbfs, delayed, roundQuantise, tone, tpdfQuantise } from '../audio-band/capture-signals.js';
import { tpdfDither } from '../timing/timing-signals.js';
import { A_WEIGHTED_BANDWIDTH_HZ, BAND_POWER_SIGMA_DB, checkOf, db, inBandFraction, mask, roundingErrorPower, sinePower, tpdfErrorPower } from './real-capture-helpers.js';

describe('report 1: the generator’s faded 997 Hz sine, rounded to 24 bits', () => {
  const fs = 48000;
  const spec = StimulusSpec.parse({ kind: 'sine', sampleRate: fs, seconds: 2, levelDbfs: -1, frequency: 997, fadeInSeconds: 0.05, fadeOutSeconds: 0.05 });
  const generated = generateStimulus(spec).channels[0] as Float64Array;
  const capture = { sampleRate: fs, channels: [roundQuantise(generated, 24)] };
  // THD+N = 10·log10(N/(P1 + N)) with N = Δ²/12 · (20 kHz − 20 Hz)/(fs/2) (Bennett 1948; AES17
  // §6.3 band) and P1 of a −1 dBFS sine: −146.05 dB. The old engine read −27 dB (the fades as noise).
  const noise = roundingErrorPower(24) * inBandFraction(fs);
  const expectedThdn = db(noise / (sinePower(-1) + noise));

  it('reads THD+N at the rounding floor (≈ −146 dB) on a steady part that leaves the fades out', () => {
    const c = analyzeCapture(capture).channels[0];
    const steady = c?.steadySeconds ?? [0, 0];
    // The closed form's premise, checked on this very record: the rounding error against the
    // exact sine has power Δ²/12 within 5 % (undithered, it is deterministic, not random).
    let e2 = 0;
    const w = (2 * Math.PI * 997) / fs;
    const from = Math.round(steady[0] * fs);
    const to = Math.round(steady[1] * fs);
    for (let n = from; n < to; n++) e2 += ((capture.channels[0] as Float64Array)[n] as number - dbfs(-1) * Math.sin(w * n)) ** 2;
    expect(Math.abs(e2 / (to - from) / roundingErrorPower(24) - 1)).toBeLessThan(0.05);
    // −146.05 dB; 4σ of the Kaiser band-power reading (0.17 dB) plus 0.1 dB for the
    // deterministic error's departure from Δ²/12 (5 % = 0.21 dB at most, 0.08 dB here).
    expect(c?.thdnDb).not.toBeNull();
    expect(Math.abs((c?.thdnDb ?? 0) - expectedThdn)).toBeLessThan(4 * BAND_POWER_SIGMA_DB.faded2s + 0.1);
    // The fades are 0.05 s raised cosines (docs/stimuli.md): the steady part starts after the
    // fade-in and ends before the fade-out, and keeps at least 1.8 s of the 1.9 s plateau.
    expect(steady[0]).toBeGreaterThanOrEqual(0.05);
    expect(steady[1]).toBeLessThanOrEqual(1.95);
    expect(steady[1] - steady[0]).toBeGreaterThanOrEqual(1.8);
    expect(c?.warnings.some((x) => /lead-in/.test(x) && /tail/.test(x))).toBe(true);
  });

  it('reads the same THD+N through a thdn-db check given the stimulus as played', () => {
    const result = evaluateMask({ capture, reference: stimulusAsPlayed(spec) }, mask({ id: 'thdn', kind: 'distortion', metric: 'thdn-db', max: -140 }));
    const check = checkOf(result, 'thdn');
    expect(result.verdict).toBe('pass');
    // Same closed form and tolerance as above.
    expect(Math.abs((check.measured ?? 0) - expectedThdn)).toBeLessThan(4 * BAND_POWER_SIGMA_DB.faded2s + 0.1);
    const steady = check.details.steadySeconds as [number, number];
    expect(steady[0]).toBeGreaterThanOrEqual(0.05);
    expect(steady[1]).toBeLessThanOrEqual(1.95);
  });
});

describe('report 2: dynamic range of a −60 dBFS tone after dithered idle latency (16-bit TPDF)', () => {
  const fs = 48000;
  const spec = StimulusSpec.parse({ kind: 'sine', sampleRate: fs, seconds: 1.5, levelDbfs: -60, frequency: 997 });
  const stimulus = stimulusAsPlayed(spec);
  // 0.1 s of latency: idle zeros that the 16-bit TPDF quantiser turns into dither noise.
  const capture = { sampleRate: fs, channels: [tpdfQuantise(delayed(stimulus.channels[0] as Float64Array, 4800), 16, 7)] };
  // AES17-2020 §6.4.1: DR = −(A-weighted THD+N) − L_tone = full scale over the A-weighted noise,
  // −10·log10(2·N_A) with N_A = (Δ²/4)·∫A²df/(fs/2) (Lipshitz et al. 1992 for Δ²/4; IEC 61672-1
  // A weighting): Δ = 2⁻¹⁵ → 96.16 dB. The old engine read 68.9 dB (the silent lead-in as distortion).
  const expected = -db(2 * tpdfErrorPower(16) * (A_WEIGHTED_BANDWIDTH_HZ / (fs / 2)));
  const check = { id: 'dr', kind: 'distortion' as const, metric: 'dynamic-range-db' as const, min: 90 };

  it('reads ≈ 96.2 dB from the capture alone', () => {
    const result = evaluateMask({ capture }, mask(check));
    const dr = checkOf(result, 'dr');
    expect(dr.error).toBeNull();
    // ±4σ of the A-weighted band-power reading over the 1.47 s steady part.
    expect(Math.abs((dr.measured ?? 0) - expected)).toBeLessThan(4 * BAND_POWER_SIGMA_DB.weighted1470ms);
    // The tone starts at 0.1 s: the steady part must not include the idle lead-in.
    expect((dr.details.steadySeconds as number[])[0]).toBeGreaterThanOrEqual(0.1);
  });

  it('reads the same with the stimulus given', () => {
    const dr = checkOf(evaluateMask({ capture, reference: stimulus }, mask(check)), 'dr');
    expect(dr.error).toBeNull();
    expect(Math.abs((dr.measured ?? 0) - expected)).toBeLessThan(4 * BAND_POWER_SIGMA_DB.weighted1470ms);
  });
});

describe('report 3: 96 kHz tone with a −40 dBFS 30 kHz pilot and 24-bit TPDF dither', () => {
  it('SNR and THD+N sit at the dither floor and the 63-sample gap under the pilot is trimmed', () => {
    const fs = 96000;
    const n = 2 * fs;
    const gap = 63;
    // The pilot runs throughout; the tone arrives 63 samples late (the path's latency).
    const x = delayed(tone(n - gap, fs, 997, dbfs(-1)), gap);
    addInto(x, tone(n, fs, 30000, dbfs(-40), 0.1));
    const c = analyzeCapture({ sampleRate: fs, channels: [tpdfQuantise(x, 24, 3)] }).channels[0];
    // N = (Δ²/4)·(19980/48000), Δ = 2⁻²³ (Lipshitz et al. 1992; AES17 band); P1 of −1 dBFS:
    // SNR = 10·log10(P1/N) = 144.29 dB, THD+N = 10·log10(N/(P1 + N)) = −144.29 dB; ±4σ (2 s record).
    const noise = tpdfErrorPower(24) * inBandFraction(fs);
    expect(Math.abs((c?.snrDb ?? 0) - db(sinePower(-1) / noise))).toBeLessThan(4 * BAND_POWER_SIGMA_DB.twoSeconds);
    expect(Math.abs((c?.thdnDb ?? 0) - db(noise / (sinePower(-1) + noise)))).toBeLessThan(4 * BAND_POWER_SIGMA_DB.twoSeconds);
    expect(c?.steadySeconds?.[0] ?? 0).toBeGreaterThanOrEqual(gap / fs);
  });
});

describe('report 4: a −60 dBFS noise shelf at 25–45 kHz on a 96 kHz tone capture', () => {
  const fs = 96000;
  const n = fs;
  // AES17 dBFS: a noise at −60 dBFS has mean square 10^(−60/10)/2.
  const shelfPower = sinePower(-60);
  // In-band floor 10·log10(2·N), N = (Δ²/4)·(19980/48000), Δ = 2⁻²³: −145.29 dBFS.
  const ditherFloor = db(2 * tpdfErrorPower(24) * inBandFraction(fs));

  // KNOWN LIMITATION of engine 1.0 (it.fails keeps it visible; it fails the run once fixed, so
  // drop the .fails then): the unwindowed least-squares fit of the tone and its harmonics picks up
  // a little of a broadband ultrasonic shelf, and subtracting the fit leaves it in band: measured
  // −144.8 dBFS against −145.3 (0.3…6.5 dB too high by shelf realisation, 1 s at 96 kHz). A fit on
  // a band-limited copy that keeps unity gain at the fitted frequencies is the likely fix.
  it.fails('reads the 24-bit dither floor, not the shelf, for three shelf realisations', () => {
    const channels = [0, 1, 2, 3].map((seed) => {
      const x = tone(n, fs, 997, dbfs(-1));
      if (seed > 0) addInto(x, bandNoise(n, fs, 25000, 45000, shelfPower, seed));
      return tpdfQuantise(x, 24, 10 + seed);
    });
    const floors = analyzeCapture({ sampleRate: fs, channels }).channels.map((c) => c.noiseFloorDbfs ?? 0);
    // Channel 0 has no shelf (the control). The shelf lies ≥ 5 kHz above the band, where the
    // Kaiser (β = 20) reading's sidelobes are below −180 dB, so every channel must read the
    // dither floor within 4σ of the 1 s band-power reading (0.23 dB).
    const worst = Math.max(...floors.map((f) => Math.abs(f - ditherFloor)));
    expect(worst, `floors ${floors.map((f) => f.toFixed(3)).join(', ')} dBFS against ${ditherFloor.toFixed(3)}`).toBeLessThan(4 * BAND_POWER_SIGMA_DB.oneSecond);
  });

  it.fails('does not move the reading when only the shelf is added (same dither, same tone)', () => {
    const base = tone(n, fs, 997, dbfs(-1));
    addInto(base, tpdfDither(n, 24, 2));
    const withShelf = Float64Array.from(base);
    addInto(withShelf, bandNoise(n, fs, 25000, 45000, shelfPower, 52));
    const [a, b] = analyzeCapture({ sampleRate: fs, channels: [base, withShelf] }).channels;
    // Both records share every sample below 25 kHz, so an ideal reading differs by nothing; allow
    // 2σ of the reading's own spread (0.12 dB): a shelf moving it further is leaking into the band.
    expect(Math.abs((b?.noiseFloorDbfs ?? 0) - (a?.noiseFloorDbfs ?? 0))).toBeLessThan(2 * BAND_POWER_SIGMA_DB.oneSecond);
  });
});
