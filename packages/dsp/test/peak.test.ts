import { describe, expect, it } from 'vitest';
import { amplitudeSpectrum } from '../src/spectrum/spectrum.js';
import { argMax, refinePeak } from '../src/spectrum/peak.js';
import { sine } from './helpers/signals.js';
import { refusedBy } from './helpers/refused.js';

describe('peak refinement: zero padding + parabolic interpolation (Jacobsen & Kootsookos 2007)', () => {
  const fs = 48000;
  const m = 4096;
  for (const offset of [0, 0.17, 0.33, 0.5]) {
    it(`a Hann-windowed tone ${offset} bin off-centre, 4× zero padding`, () => {
      const f = ((200 + offset) * fs) / m;
      const s = amplitudeSpectrum(sine(m, fs, f, 0.25), fs, { window: 'hann', fftSize: 4 * m });
      const k = argMax(s.magnitude, 1, s.magnitude.length - 1);
      const p = refinePeak(s.magnitude, k);
      // With 4× padding the parabola on dB is biased by < 0.5 % of a padded bin for Hann
      // (Smith, "Spectral Audio Signal Processing", quadratic interpolation: bias falls with
      // padding): frequency within 0.005 original bins, amplitude within 0.01 dB.
      expect(Math.abs(p.bin * s.binHz - f) / (fs / m)).toBeLessThan(0.005);
      expect(Math.abs(20 * Math.log10(p.magnitude / 0.25))).toBeLessThan(0.01);
      // Without refinement the nearest padded bin can be off by up to 1/8 original bin.
      expect(Math.abs(k * s.binHz - f) / (fs / m)).toBeLessThanOrEqual(0.125 + 1e-9);
    });
  }
  it('returns edges unrefined and rejects out-of-range bins naming the function', () => {
    const mag = Float64Array.of(3, 2, 1);
    expect(refinePeak(mag, 0)).toEqual({ bin: 0, magnitude: 3 });
    expect(() => refinePeak(mag, 3)).toThrow(refusedBy('refinePeak'));
  });
});
