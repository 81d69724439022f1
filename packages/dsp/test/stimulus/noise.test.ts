import { describe, expect, it } from 'vitest';
import { generateStimulus } from '../../src/stimulus/index.js';
import { hasPythonScipy, runPython } from '../io/python-oracle.js';
import { pinkSpec, rms, whiteSpec } from './spec-fixtures.js';

/**
 * Welch-style PSD at chosen frequencies, computed here without any library: Hann-windowed
 * segments of 4096 samples, half overlap, |DFT|² averaged over segments and over ±3 bins.
 */
function welchAt(x: Float64Array, fs: number, freqs: number[]): number[] {
  const n = 4096;
  const w = Float64Array.from({ length: n }, (_, i) => 0.5 - 0.5 * Math.cos((2 * Math.PI * i) / n));
  return freqs.map((f) => {
    const centre = Math.round((f * n) / fs);
    let total = 0;
    let count = 0;
    for (let k = centre - 3; k <= centre + 3; k++) {
      const c = Float64Array.from({ length: n }, (_, i) => Math.cos((2 * Math.PI * k * i) / n) * (w[i] ?? 0));
      const s = Float64Array.from({ length: n }, (_, i) => Math.sin((2 * Math.PI * k * i) / n) * (w[i] ?? 0));
      for (let start = 0; start + n <= x.length; start += n / 2) {
        let re = 0;
        let im = 0;
        for (let i = 0; i < n; i++) {
          const v = x[start + i] ?? 0;
          re += v * (c[i] ?? 0);
          im += v * (s[i] ?? 0);
        }
        total += re * re + im * im;
        count++;
      }
    }
    return total / count;
  });
}

/** Least-squares slope of y over x. */
function slope(x: number[], y: number[]): number {
  const mx = x.reduce((a, b) => a + b, 0) / x.length;
  const my = y.reduce((a, b) => a + b, 0) / y.length;
  let num = 0;
  let den = 0;
  x.forEach((xi, i) => {
    num += (xi - mx) * ((y[i] ?? 0) - my);
    den += (xi - mx) ** 2;
  });
  return num / den;
}

const octaves = [100, 200, 400, 800, 1600, 3200, 6400, 10000];

describe('white and pink noise', () => {
  it('same seed → identical samples, different seed → different samples', () => {
    for (const make of [whiteSpec, pinkSpec]) {
      const a = generateStimulus(make({ seed: 11 })).channels[0];
      const b = generateStimulus(make({ seed: 11 })).channels[0];
      const c = generateStimulus(make({ seed: 12 })).channels[0];
      expect(Array.from(a ?? [])).toEqual(Array.from(b ?? []));
      expect(Array.from(a ?? [])).not.toEqual(Array.from(c ?? []));
    }
  });

  it('has the RMS 10^(L/20)/√2 (AES17 dBFS), exactly', () => {
    for (const make of [whiteSpec, pinkSpec]) {
      const x = generateStimulus(make({ levelDbfs: -23 })).channels[0] ?? new Float64Array();
      expect(rms(x)).toBeCloseTo(10 ** (-23 / 20) / Math.SQRT2, 12);
    }
  });

  it('copies one noise to every channel, or gives each its own stream on request', () => {
    const shared = generateStimulus(whiteSpec({ channels: 3 })).channels;
    expect(Array.from(shared[2] ?? [])).toEqual(Array.from(shared[0] ?? []));
    const own = generateStimulus(whiteSpec({ channels: 3, independentChannels: true })).channels;
    expect(Array.from(own[0] ?? [])).toEqual(Array.from(shared[0] ?? []));
    expect(Array.from(own[1] ?? [])).not.toEqual(Array.from(own[0] ?? []));
    // Independent streams are uncorrelated: |ρ| of two 24000-sample streams ≈ 1/√n ≈ 0.006.
    let dot = 0;
    own[0]?.forEach((v, i) => (dot += v * (own[1]?.[i] ?? 0)));
    expect(Math.abs(dot / (own[0]?.length ?? 1) / rms(own[0] ?? new Float64Array()) ** 2)).toBeLessThan(0.03);
  });

  it('pink noise falls 3 dB per octave from 100 Hz to 10 kHz (in-test Welch estimate)', () => {
    const x = generateStimulus(pinkSpec({ seconds: 3 })).channels[0] ?? new Float64Array();
    const psd = welchAt(x, 48000, octaves);
    const s = slope(octaves.map(Math.log2), psd.map((p) => 10 * Math.log10(p)));
    expect(s).toBeGreaterThan(-3.4);
    expect(s).toBeLessThan(-2.6);
  });

  it('white noise is flat (in-test Welch estimate, slope within ±0.4 dB/octave)', () => {
    const x = generateStimulus(whiteSpec({ seconds: 3 })).channels[0] ?? new Float64Array();
    const psd = welchAt(x, 48000, octaves);
    expect(Math.abs(slope(octaves.map(Math.log2), psd.map((p) => 10 * Math.log10(p))))).toBeLessThan(0.4);
  });

  it.skipIf(!hasPythonScipy())('pink slope is −3 dB/octave ± 0.25 and white is flat by scipy.signal.welch', () => {
    const pink = generateStimulus(pinkSpec({ seconds: 10, seed: 3 })).channels[0] ?? new Float64Array();
    const white = generateStimulus(whiteSpec({ seconds: 10, seed: 3 })).channels[0] ?? new Float64Array();
    const r = runPython(
      `from scipy.signal import welch
out = {}
for name in ["pink", "white"]:
    f, p = welch(IN[name], fs=48000, nperseg=8192)
    band = (f >= 100) & (f <= 10000)
    fit = np.polyfit(np.log2(f[band]), 10 * np.log10(p[band]), 1)
    resid = 10 * np.log10(p[band]) - np.polyval(fit, np.log2(f[band]))
    out[name] = dict(slope=float(fit[0]), worst=float(np.max(np.abs(resid))))
print(json.dumps(out))`,
      { pink, white },
    ) as Record<'pink' | 'white', { slope: number; worst: number }>;
    expect(r.pink.slope).toBeGreaterThan(-3.25);
    expect(r.pink.slope).toBeLessThan(-2.75);
    expect(Math.abs(r.white.slope)).toBeLessThan(0.1);
  });
});
