// Field reports 5–7: tones at the edges of the AES17 band, THD with no harmonic below Nyquist,
// and A-weighted SNR, through analyzeCapture and evaluateMask only.
import { describe, expect, it } from 'vitest';
import { analyzeCapture, evaluateMask } from '../../src/index.js';
import { addNoise } from '../../src/testing/index.js';
import { dbfs, tone, tpdfQuantise } from '../audio-band/capture-signals.js';
import { A_WEIGHTED_BANDWIDTH_HZ, BAND_POWER_SIGMA_DB, checkOf, db, inBandFraction, mask, sinePower, tpdfErrorPower } from './real-capture-helpers.js';

/** THD+N of a −1 dBFS tone over 24-bit TPDF dither: 10·log10(N/(P1 + N)), N = (Δ²/4)·B/(fs/2) (Lipshitz et al. 1992; AES17 §6.3). */
function ditherThdn(sampleRate: number): number {
  const noise = tpdfErrorPower(24) * inBandFraction(sampleRate);
  return db(noise / (sinePower(-1) + noise));
}

describe('report 5: tones on the band edges', () => {
  it('a tone at exactly 20 Hz (48 kHz) and its ±5·10⁻⁷ neighbours read the dither THD+N', () => {
    const fs = 48000;
    const freqs = [20, 20 * (1 - 5e-7), 20 * (1 + 5e-7)];
    const report = analyzeCapture({ sampleRate: fs, channels: freqs.map((f, i) => tpdfQuantise(tone(fs, fs, f, dbfs(-1)), 24, 20 + i)) });
    // −141.28 dB (closed form above) ± 4σ of the 1 s band-power reading: a tone on the edge is
    // in the band (AES17: 20 Hz … 20 kHz inclusive) and must not flip to null or to 0 dB.
    for (const c of report.channels) {
      expect(c.thdnDb).not.toBeNull();
      expect(Math.abs((c.thdnDb ?? 0) - ditherThdn(fs))).toBeLessThan(4 * BAND_POWER_SIGMA_DB.oneSecond);
    }
  });

  it('a tone at exactly 20 kHz (44.1 kHz) and its ±5·10⁻⁷ neighbours read the dither THD+N', () => {
    const fs = 44100;
    const freqs = [20000, 20000 * (1 - 5e-7), 20000 * (1 + 5e-7)];
    const report = analyzeCapture({ sampleRate: fs, channels: freqs.map((f, i) => tpdfQuantise(tone(fs, fs, f, dbfs(-1)), 24, 30 + i)) });
    // −140.91 dB: N over 19 980 Hz of the 22 050 Hz Nyquist band; ±4σ (1 s record).
    for (const c of report.channels) {
      expect(c.thdnDb).not.toBeNull();
      expect(Math.abs((c.thdnDb ?? 0) - ditherThdn(fs))).toBeLessThan(4 * BAND_POWER_SIGMA_DB.oneSecond);
    }
  });

  it('a 25 kHz tone at 96 kHz lies outside the band: THD+N is null and a warning says why', () => {
    const fs = 96000;
    const c = analyzeCapture({ sampleRate: fs, channels: [tpdfQuantise(tone(fs, fs, 25000, dbfs(-1)), 24, 40)] }).channels[0];
    // AES17 §5.2.5: the measurement band ends at 20 kHz, so an ultrasonic tone has no in-band THD+N.
    expect(c?.thdnDb).toBeNull();
    expect(c?.snrDb).toBeNull();
    expect(c?.warnings.some((w) => /25000(\.0+)? Hz/.test(w) && /outside the measurement band/.test(w))).toBe(true);
  });
});

describe('report 6: THD with no harmonic below Nyquist', () => {
  const fs = 44100;
  // 15 kHz: the 2nd harmonic (30 kHz) already lies above fs/2 = 22.05 kHz.
  const capture = { sampleRate: fs, channels: [tpdfQuantise(tone(fs, fs, 15000, dbfs(-1)), 24, 50)] };

  it('reports THD as null with a warning, not 0 %, while THD+N stays measured', () => {
    const c = analyzeCapture(capture).channels[0];
    expect(c?.thdPercent).toBeNull();
    expect(c?.warnings.some((w) => /THD is not reported/.test(w))).toBe(true);
    // THD+N needs no harmonic: −140.91 dB at 44.1 kHz (closed form above) ± 4σ.
    expect(Math.abs((c?.thdnDb ?? 0) - ditherThdn(fs))).toBeLessThan(4 * BAND_POWER_SIGMA_DB.oneSecond);
  });

  it('fails a thd-percent check with no value instead of passing it silently', () => {
    const result = evaluateMask({ capture }, mask({ id: 'thd', kind: 'distortion', metric: 'thd-percent', max: 0.01 }));
    const thd = checkOf(result, 'thd');
    // docs/masks.md: a measure that cannot be taken fails with no value (it is not an error).
    expect(thd.pass).toBe(false);
    expect(thd.measured).toBeNull();
    expect(thd.margin).toBeNull();
    expect(thd.error).toBeNull();
    expect(result.verdict).toBe('fail');
  });
});

describe('report 7: A-weighted SNR weights only the noise (AES17)', () => {
  it('reads the closed form for a −20 dBFS 100 Hz tone over −80 dBFS white noise', () => {
    const fs = 48000;
    const capture = { sampleRate: fs, channels: [addNoise(tone(2 * fs, fs, 100, dbfs(-20)), -80, 3)] };
    const result = evaluateMask(
      { capture },
      mask({ id: 'snr-a', kind: 'distortion', metric: 'snr-db', weighting: 'a', min: 0 }, { id: 'snr', kind: 'distortion', metric: 'snr-db', min: 0 }),
    );
    // addNoise scales the noise to variance σ² = 10^(−8)/2 exactly (AES17 dBFS). SNR_A = P1/N_A with
    // N_A = σ²·∫A²df/(fs/2) (the tone unweighted, AES17 §6.3 and its weighting filter after the
    // notch; IEC 61672-1 A weighting): 62.84 dB. Weighting the 100 Hz tone as well would take
    // A(100 Hz) = −19.1 dB off it (IEC 61672-1 table 3) and read 43.7 dB. ±4σ (A-weighted, 2 s).
    const sigma2 = sinePower(-80);
    const expectedA = db(sinePower(-20) / ((sigma2 * A_WEIGHTED_BANDWIDTH_HZ) / (fs / 2)));
    expect(Math.abs((checkOf(result, 'snr-a').measured ?? 0) - expectedA)).toBeLessThan(4 * BAND_POWER_SIGMA_DB.weighted2s);
    // Unweighted: N = σ²·(19 980/24 000) → 60.80 dB; ±4σ (2 s, unweighted).
    const expected = db(sinePower(-20) / (sigma2 * inBandFraction(fs)));
    expect(Math.abs((checkOf(result, 'snr').measured ?? 0) - expected)).toBeLessThan(4 * BAND_POWER_SIGMA_DB.twoSeconds);
  });
});
