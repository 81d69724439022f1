// Field report 17: coverage of formats — sample rates 44.1/96/192 kHz, 1, 2 and 8 channels, a
// 0.1 s and a 20 s record, silence, DC only, and a 24-bit capture of −140 dBFS noise — through
// analyzeCapture only. Tones are 24-bit TPDF-quantised, so every THD+N has a closed form.
import { describe, expect, it } from 'vitest';
import { analyzeCapture } from '../../src/index.js';
import { addNoise } from '../../src/testing/index.js';
import { dbfs, tone, tpdfQuantise } from '../audio-band/capture-signals.js';
import { BAND_POWER_SIGMA_DB, db, inBandFraction, sinePower, tpdfErrorPower } from './real-capture-helpers.js';

/** Closed-form THD+N of a tone at `levelDbfs` over 24-bit TPDF dither: 10·log10(N/(P1 + N)), N = (Δ²/4)·B/(fs/2) (Lipshitz et al. 1992; AES17 §6.3). */
function ditherThdn(sampleRate: number, levelDbfs: number): number {
  const noise = tpdfErrorPower(24) * inBandFraction(sampleRate);
  return db(noise / (sinePower(levelDbfs) + noise));
}

describe('report 17: formats', () => {
  for (const fs of [44100, 96000, 192000]) {
    it(`a 1 s −1 dBFS 997 Hz tone at ${fs / 1000} kHz reads the closed-form THD+N`, () => {
      const c = analyzeCapture({ sampleRate: fs, channels: [tpdfQuantise(tone(fs, fs, 997, dbfs(-1)), 24, 1)] }).channels[0];
      // 997 Hz exactly as built; a sine fit at −141 dB of noise resolves it far below 1e-4 Hz (IEEE 1241 §4.1.4).
      expect(Math.abs((c?.fundamentalHz ?? 0) - 997)).toBeLessThan(1e-4);
      expect(Math.abs((c?.rmsDbfs ?? 0) + 1)).toBeLessThan(1e-3);
      // −140.91 / −144.29 / −147.30 dB: the same dither spread over 22.05, 48 and 96 kHz; ±4σ (1 s).
      expect(Math.abs((c?.thdnDb ?? 0) - ditherThdn(fs, -1))).toBeLessThan(4 * BAND_POWER_SIGMA_DB.oneSecond);
    });
  }

  it('8 channels at 48 kHz: each channel its own tone and the closed-form SNR', () => {
    const fs = 48000;
    const freqs = [500, 750, 1000, 1250, 1500, 1750, 2000, 2250];
    const report = analyzeCapture({ sampleRate: fs, channels: freqs.map((f, i) => tpdfQuantise(tone(fs, fs, f, dbfs(-6)), 24, 60 + i)) });
    expect(report.channels.map((c) => c.channel)).toEqual([0, 1, 2, 3, 4, 5, 6, 7]);
    report.channels.forEach((c, i) => {
      expect(Math.abs((c.fundamentalHz ?? 0) - (freqs[i] as number))).toBeLessThan(1e-4);
      // SNR = 10·log10(P1/N) of a −6 dBFS tone over 24-bit dither at 48 kHz: 136.28 dB; ±4σ.
      expect(Math.abs((c.snrDb ?? 0) + ditherThdn(fs, -6))).toBeLessThan(4 * BAND_POWER_SIGMA_DB.oneSecond);
    });
  });

  it('2 channels, only channel 1 analysed: the report holds channel 1 alone', () => {
    const fs = 48000;
    const channels = [tpdfQuantise(tone(fs, fs, 997, dbfs(-1)), 24, 70), tpdfQuantise(tone(fs, fs, 440, dbfs(-20)), 24, 71)];
    const report = analyzeCapture({ sampleRate: fs, channels }, { channels: [1] });
    expect(report.channels.map((c) => c.channel)).toEqual([1]);
    // Channel 1 was built at −20 dBFS and 440 Hz (AES17 RMS level of a sine).
    expect(Math.abs((report.channels[0]?.rmsDbfs ?? 0) + 20)).toBeLessThan(1e-3);
    expect(Math.abs((report.channels[0]?.fundamentalHz ?? 0) - 440)).toBeLessThan(1e-4);
  });

  it('a 0.1 s record reads the closed-form THD+N within its wider spread', () => {
    const fs = 48000;
    const c = analyzeCapture({ sampleRate: fs, channels: [tpdfQuantise(tone(4800, fs, 997, dbfs(-1)), 24, 2)] }).channels[0];
    // −141.28 dB; 4σ of a 4 800-sample Kaiser reading is 0.72 dB.
    expect(Math.abs((c?.thdnDb ?? 0) - ditherThdn(fs, -1))).toBeLessThan(4 * BAND_POWER_SIGMA_DB.tenthSecond);
    expect(c?.steadySeconds).toEqual([0, 0.1]);
  });

  it('a 20 s mono record at 48 kHz (60 s takes longer than the test budget) reads the closed form', () => {
    const fs = 48000;
    const c = analyzeCapture({ sampleRate: fs, channels: [tpdfQuantise(tone(20 * fs, fs, 997, dbfs(-1)), 24, 3)] }).channels[0];
    // −141.28 dB; 4σ of a 960 000-sample reading is 0.05 dB (numpy, as in real-capture-helpers.ts: σ = 0.0130 dB).
    expect(Math.abs((c?.thdnDb ?? 0) - ditherThdn(fs, -1))).toBeLessThan(4 * 0.013);
    expect(c?.steadySeconds).toEqual([0, 20]);
  });

  it('digital silence: no throw, every level and tone measure null', () => {
    const c = analyzeCapture({ sampleRate: 48000, channels: [new Float64Array(48000)] }).channels[0];
    // JSON has no −∞: levels of silence are null (contracts/analysis.ts).
    for (const v of [c?.rmsDbfs, c?.peakDbfs, c?.fundamentalHz, c?.thdPercent, c?.thdnDb, c?.snrDb, c?.noiseFloorDbfs]) expect(v).toBeNull();
    expect(c?.clippedSamples).toBe(0);
    expect(c?.dropouts).toEqual([]);
    expect(c?.discontinuities).toEqual([]);
    expect(c?.warnings.length).toBeGreaterThan(0);
  });

  it('DC only: the level of the offset, no tone, no noise', () => {
    const c = analyzeCapture({ sampleRate: 48000, channels: [new Float64Array(48000).fill(0.25)] }).channels[0];
    // AES17: RMS dBFS = 20·log10(rms·√2) = 20·log10(0.25·√2) = −9.03; peak 20·log10(0.25) = −12.04.
    expect(Math.abs((c?.rmsDbfs ?? 0) - 20 * Math.log10(0.25 * Math.SQRT2))).toBeLessThan(1e-9);
    expect(Math.abs((c?.peakDbfs ?? 0) - 20 * Math.log10(0.25))).toBeLessThan(1e-9);
    expect(c?.dcOffset).toBe(0.25);
    expect(c?.fundamentalHz).toBeNull();
    expect(c?.thdnDb).toBeNull();
    expect(c?.clippedSamples).toBe(0);
  });

  it('a 24-bit capture of −140 dBFS noise reads its in-band noise floor', () => {
    const fs = 48000;
    const total = sinePower(-140);
    // (a) Gaussian noise of variance σ² − Δ²/4, quantised with TPDF dither (which adds Δ²/4):
    // the capture's noise is −140 dBFS in all. (b) −140 dBFS noise quantised on top: +Δ²/4.
    const a = tpdfQuantise(addNoise(new Float64Array(fs), db(2 * (total - tpdfErrorPower(24))), 5), 24, 6);
    const b = tpdfQuantise(addNoise(new Float64Array(fs), -140, 7), 24, 8);
    const [ca, cb] = analyzeCapture({ sampleRate: fs, channels: [a, b] }).channels;
    // Floor = 10·log10(2·σ²·B/(fs/2)): (a) −140 + 10·log10(19 980/24 000) = −140.80 dBFS,
    // (b) 10·log10(2·(σ² + Δ²/4)·B/(fs/2)) = −138.46 dBFS; ±4σ (1 s).
    expect(Math.abs((ca?.noiseFloorDbfs ?? 0) - db(2 * total * inBandFraction(fs)))).toBeLessThan(4 * BAND_POWER_SIGMA_DB.oneSecond);
    expect(Math.abs((cb?.noiseFloorDbfs ?? 0) - db(2 * (total + tpdfErrorPower(24)) * inBandFraction(fs)))).toBeLessThan(4 * BAND_POWER_SIGMA_DB.oneSecond);
    expect(ca?.thdnDb).toBeNull();
  });
});
