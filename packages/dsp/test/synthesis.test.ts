import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { measureToneDistortion } from '../src/measures/tone-distortion.js';
import { analyzeFrame, residualForListening, synthesizeFrame } from '../src/synthesis/resynthesis.js';
import { amplitudeSpectrum } from '../src/spectrum/spectrum.js';
import { gaussian, sine } from './helpers/signals.js';

describe('analysis → synthesis round trip (definition of the inverse DFT)', () => {
  it('reproduces random frames to < 1e-12 relative error for every window, placement and padding', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 600 }),
        fc.integer({ min: 0, max: 2 }),
        fc.constantFrom('rectangular', 'hann', 'hamming', 'blackman', 'blackman-harris', 'flat-top'),
        fc.constantFrom('zero-phase', 'start'),
        fc.integer({ min: 1, max: 1e6 }),
        (m, extra, window, placement, seed) => {
          const frame = gaussian(m, seed);
          let n = 2;
          while (n < m) n *= 2;
          n *= 2 ** extra;
          // Periodic windows have a zero at sample 0 (Hann, Blackman…): use the symmetric ones
          // of odd length ≥ 3, which are non-zero inside, and skip samples under a zero.
          const spectrum = analyzeFrame(frame, { window, symmetry: 'symmetric', fftSize: n, placement });
          const back = synthesizeFrame(spectrum);
          let err = 0;
          let ref = 0;
          for (let i = 0; i < m; i++) {
            if (spectrum.window[i] === 0 || Math.abs(spectrum.window[i] as number) < 1e-3) continue;
            err = Math.max(err, Math.abs((back[i] as number) - (frame[i] as number)));
            ref = Math.max(ref, Math.abs(frame[i] as number));
          }
          // Division by windows ≥ 1e-3 amplifies rounding by ≤ 1e3: still < 1e-12 relative.
          if (ref > 0) expect(err / ref).toBeLessThan(1e-12);
        },
      ),
      { numRuns: 60 },
    );
  });
});

describe('amplitude spectrum scaling (coherent gain correction)', () => {
  it('a −20 dBFS sine reads −20 dB on its bin for every window; flat-top within 0.02 dB between bins', () => {
    const fs = 48000;
    for (const window of ['rectangular', 'hann', 'hamming', 'blackman', 'blackman-harris', 'flat-top'] as const) {
      const s = amplitudeSpectrum(sine(4096, fs, (100 * fs) / 4096, 0.1), fs, { window, placement: 'start' });
      // source: REFERENCES.md "Spectrum scaling": a −20 dBFS sine reads −20 dB after dividing by CG
      expect(Math.abs(20 * Math.log10(s.magnitude[100] as number) + 20)).toBeLessThan(1e-6);
    }
    // Half a bin off-centre: worst-case scalloping loss of the flat-top < 0.02 dB (Harris 1978, from memory)
    const s = amplitudeSpectrum(sine(4096, fs, (100.5 * fs) / 4096, 0.1), fs, { window: 'flat-top' });
    const peak = Math.max(...Array.from(s.magnitude.subarray(95, 106)));
    expect(Math.abs(20 * Math.log10(peak) + 20)).toBeLessThan(0.02);
    // Hann's worst-case scalloping loss is 1.42 dB (Harris 1978, from memory); 0.02 dB tolerance
    const h = amplitudeSpectrum(sine(4096, fs, (100.5 * fs) / 4096, 0.1), fs, { window: 'hann' });
    const hp = Math.max(...Array.from(h.magnitude.subarray(95, 106)));
    expect(Math.abs(20 * Math.log10(hp) + 20 + 1.42)).toBeLessThan(0.02);
  });
});

describe('band-limited residual for listening', () => {
  it('removes the tone and harmonics, keeps the noise in band, and stays silent out of band', () => {
    const fs = 48000;
    const n = 48000;
    const x = sine(n, fs, 1000.7, 0.5);
    const h3 = sine(n, fs, 3002.1, 0.01);
    const noise = gaussian(n, 8, 1e-3);
    for (let i = 0; i < n; i++) x[i] = (x[i] as number) + (h3[i] as number) + (noise[i] as number);
    const r = residualForListening(x, fs, { bandHz: [20, 20000] });
    expect(r.length).toBe(n);
    let p = 0;
    for (const v of r) p += v * v;
    p /= n;
    // What remains is the white noise's in-band share σ²·(19980/24000): within 5 % (record of 48000 samples).
    const expected = (1e-6 * 19980) / 24000;
    expect(Math.abs(p / expected - 1)).toBeLessThan(0.05);
    // No tone left: the residual's own distortion analysis finds no dominant tone.
    expect(measureToneDistortion(r, fs).tone).toBeNull();
  });
});
