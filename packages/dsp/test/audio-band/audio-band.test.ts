import { describe, expect, it } from 'vitest';
import { audioBandPower, audioBandToneResponse, createAudioBandPlan, resolveAudioBand } from '../../src/measures/audio-band.js';
import { besselI0, kaiserMainLobeHalfWidth, kaiserTransform, kaiserWindow } from '../../src/measures/kaiser-window.js';
import { expectAllClose } from '../helpers/approx.js';
import { gaussian } from '../helpers/signals.js';
import { bandNoise, dbfs, tone } from './capture-signals.js';
import { refusedBy } from '../helpers/refused.js';

const db = (p: number): number => 10 * Math.log10(p);

describe('Kaiser window (Kaiser & Schafer 1980)', () => {
  it('matches numpy.kaiser and scipy.special.i0', () => {
    // python3 -c "import numpy as np; print([float(v) for v in np.kaiser(8,20)])"
    expectAllClose(kaiserWindow(8, 20), [2.295774629389451e-8, 0.002962822476574609, 0.15283431898990307, 0.8188040362574364, 0.8188040362574364, 0.15283431898990307, 0.002962822476574609, 2.295774629389451e-8], 1e-13);
    // python3 -c "import numpy as np; print([float(v) for v in np.kaiser(7,8.6)])"
    expectAllClose(kaiserWindow(7, 8.6), [0.0013325139979024198, 0.13040194654166437, 0.6304119273359405, 1.0, 0.6304119273359405, 0.13040194654166437, 0.0013325139979024198], 1e-13);
    // python3 -c "import scipy.special as sp; print([sp.i0(v) for v in (1.0, 3.75, 10.0, 20.0)])"
    expectAllClose([1, 3.75, 10, 20].map(besselI0), [1.2660658777520082, 9.118945860844567, 2815.716628466254, 43558282.559553534], 1e-14);
  });

  it('continuous transform follows the DTFT of the sampled window (main lobe and first null)', () => {
    const m = 257;
    const w = kaiserWindow(m, 20);
    const dtft = (nu: number): number => {
      let re = 0;
      for (let n = 0; n < m; n++) re += (w[n] as number) * Math.cos(2 * Math.PI * nu * (n - (m - 1) / 2));
      return re;
    };
    // Inside the main lobe the two agree to 1e-9 relative (the window ends are 1/I0(20) = 2.3e-8).
    for (const nu of [0, 0.3 / m, 2 / m, 5 / m]) expect(Math.abs(kaiserTransform(2 * Math.PI * nu, m, 20) / dtft(nu) - 1)).toBeLessThan(1e-6);
    // First zero at √(β² + π²)/(π(M − 1)): the DTFT there is below −150 dB of its peak.
    const nu0 = kaiserMainLobeHalfWidth(m, 20);
    expect(db((dtft(nu0) / dtft(0)) ** 2)).toBeLessThan(-150);
  });
});

describe('audio-band power (AES17-2020 §5.2.5 standard low-pass, exact band by FFT)', () => {
  it('reads white noise in proportion to the summed bandwidth', () => {
    const fs = 48000;
    const n = 48000;
    const x = gaussian(n, 21, 1e-3);
    let ms = 0;
    for (const v of x) ms += v * v;
    ms /= n;
    const plan = createAudioBandPlan(n, fs);
    // Summed band = 20 Hz − h … 20 kHz + h, h = √(20² + π²)·fs/(π(N−1)) = 6.444 Hz (closed form,
    // Kaiser & Schafer 1980), so white noise reads (19980 + 2h)/24000 of its mean square.
    const h = (Math.sqrt(400 + Math.PI ** 2) * fs) / (Math.PI * (n - 1));
    expect(plan.mainLobeHalfWidthHz).toBeCloseTo(h, 9);
    expect(Math.abs(plan.whiteNoiseFraction.power / ((19980 + 2 * h) / 24000) - 1)).toBeLessThan(1e-3);
    // Estimate spread: ~1/√(dof), dof ≈ 2·19980 Hz·1 s/ENBW(≈2.5 bins) → ±1.1 % (0.05 dB); 0.15 dB allowed.
    expect(Math.abs(db(plan.measure(x).power) - db(ms * (19980 + 2 * h) / 24000))).toBeLessThan(0.15);
    // A-weighted: white noise over 20 Hz…20 kHz at 48 kHz keeps 0.51947 of its power:
    // numpy: f=np.linspace(20,20000,2000001); np.trapezoid((ra(f)/ra(1000))**2, f)/24000 with the
    // IEC 61672-1 annex E poles (a-weighting.ts) → 0.5194659862291258.
    expect(Math.abs(plan.whiteNoiseFraction.powerA / 0.5194659862291258 - 1)).toBeLessThan(2e-3);
    expect(Math.abs(db(audioBandPower(x, fs, { weighting: 'a' })) - db(ms * 0.5194659862291258))).toBeLessThan(0.15);
  });

  it('ignores a −40 dBFS 30 kHz pilot that the old zero-padded rectangular sum leaked into the band', () => {
    const fs = 96000;
    const n = 96000;
    const pilot = tone(n, fs, 30000, dbfs(-40), 1.1);
    const trueMs = dbfs(-40) ** 2 / 2;
    // Before engine 1.0 the zero-padded rectangular sum (inBandPower over a 131072-point FFT) read
    // the pilot about −50 dB below itself here (above −80 dB): the rectangular window's sidelobes
    // 10 kHz from the band edge (≈ 1/(π·N·Δf/fs)) brought it back into the band.
    // Kaiser β = 20: every sidelobe is below −159 dB (numpy: np.fft.rfft(np.kaiser(4096,20), 65536)),
    // and 30 kHz is 10 kHz past the summed band's edge.
    expect(db(createAudioBandPlan(n, fs).measure(pilot).power / trueMs)).toBeLessThan(-159);
  });

  it('ignores a −60 dBFS noise shelf at 25–45 kHz (noise-shaped DAC output)', () => {
    const fs = 96000;
    const n = 96000;
    const shelf = bandNoise(n, fs, 25000, 45000, dbfs(-60) ** 2 / 2, 3);
    // Band-limited to 25–45 kHz by construction, so nothing belongs in 20 Hz–20 kHz: the reading
    // must sit more than 100 dB below the shelf (AES17 asks ≥ 60 dB from 24 kHz).
    expect(db(createAudioBandPlan(n, fs).measure(shelf).power / (dbfs(-60) ** 2 / 2))).toBeLessThan(-150);
  });

  it('tone response agrees with the measured power of real tones (phase-averaged by a cos/sin pair)', () => {
    for (const [fs, n] of [
      [48000, 4800],
      [96000, 9600],
    ] as const) {
      const plan = createAudioBandPlan(n, fs);
      const h = plan.mainLobeHalfWidthHz;
      for (const f of [20, 997, 19990, 20000, 20000 + h, 20000 + 1.5 * h, 20000 + 1.9 * h]) {
        if (f >= fs / 2) continue;
        const measured = (plan.measure(tone(n, fs, f, 1, 0)).power + plan.measure(tone(n, fs, f, 1, Math.PI / 2)).power) / 2 / 0.5;
        const predicted = plan.toneResponse(f);
        // The pair average cancels the ±f cross term exactly; the continuous-window transform is
        // accurate to ~1e-6 in the main lobe (test above).
        if (predicted > 1e-10) expect(Math.abs(db(measured) - db(predicted))).toBeLessThan(0.01);
        else expect(db(measured)).toBeLessThan(-100);
      }
    }
  });

  it('A weighting applies to the tone response: 0 dB at 1 kHz, −19.1 dB at 100 Hz', () => {
    const plan = createAudioBandPlan(48000, 48000);
    // IEC 61672-1:2013 table 3: A weighting −19.1 dB at 100 Hz, 0 dB at 1 kHz.
    expect(db(plan.toneResponse(1000, 'a'))).toBeCloseTo(0, 2);
    expect(db(plan.toneResponse(100, 'a'))).toBeCloseTo(-19.1, 1);
    expect(audioBandToneResponse(100, 48000, 48000, { weighting: 'a' })).toBe(plan.toneResponse(100, 'a'));
  });

  it('rejects bad input with the function name', () => {
    expect(() => createAudioBandPlan(10, 48000)).toThrow(refusedBy('createAudioBandPlan'));
    expect(() => audioBandPower(new Float64Array(10), 48000)).toThrow(refusedBy('audioBandPower'));
    expect(() => resolveAudioBand(48000, [500, 100])).toThrow(refusedBy('resolveAudioBand'));
    expect(() => createAudioBandPlan(100, 48000).measure(new Float64Array(99))).toThrow(refusedBy('AudioBandPlan.measure'));
    expect(resolveAudioBand(44100)).toEqual([20, 20000]);
    expect(resolveAudioBand(32000)).toEqual([20, 16000]);
  });
});

describe('AES17 standard low-pass mask (AES17-2020 §5.2.5: ±0.1 dB to 20 kHz, ≥ 60 dB from 24 kHz; we aim ≥ 100 dB)', () => {
  for (const fs of [44100, 48000, 96000, 192000]) {
    it(`holds at ${fs} Hz for 0.1 s, 1 s and 10 s records`, () => {
      for (const seconds of [0.1, 1, 10]) {
        const plan = createAudioBandPlan(Math.round(seconds * fs), fs);
        // Pass band: 20 Hz … 20 kHz on a log grid, both edges included.
        for (let i = 0; i <= 40; i++) {
          const f = 20 * 1000 ** (i / 40);
          const r = db(plan.toneResponse(f));
          if (Math.abs(r) > 0.1) expect.fail(`${fs} Hz, ${seconds} s: ${r.toFixed(3)} dB at ${f.toFixed(1)} Hz`);
        }
        // Stop band: 24 kHz … fs/2 (at 48 kHz only fs/2 itself; at 44.1 kHz it lies above Nyquist).
        for (let f = 24000; f <= fs / 2; f += 1000) {
          const r = db(plan.toneResponse(f));
          if (r > -100) expect.fail(`${fs} Hz, ${seconds} s: only ${(-r).toFixed(1)} dB attenuation at ${f} Hz`);
        }
      }
    });
  }
});
