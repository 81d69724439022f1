import { describe, expect, it } from 'vitest';
import { steadyToneRange } from '../../src/measures/imd-steady-range.js';
import { fitSinusoids, subtractSinusoids } from '../../src/measures/imd-tone-fit.js';
import { findStrongestTones } from '../../src/measures/imd-tone-search.js';
import { runPython, hasPythonScipy } from '../io/python-oracle.js';
import { gaussian } from '../helpers/signals.js';
import { dither24, plus, tone, withLeadIn } from './imd-signals.js';
import { refusedBy } from '../helpers/refused.js';

describe('fitSinusoids', () => {
  it('recovers amplitudes and phases of off-bin tones exactly (IEEE 1241 least squares)', () => {
    const fs = 48000;
    const n = 10007;
    const x = new Float64Array(n);
    // x = 0.01 + 0.3·cos(ω1 t) + 0.2·sin(ω2 t) − 0.001·cos(ω3 t) on the centred grid t = n − (N−1)/2.
    const t0 = -(n - 1) / 2;
    for (let i = 0; i < n; i++) {
      const t = t0 + i;
      x[i] = 0.01 + 0.3 * Math.cos((2 * Math.PI * 123.4 * t) / fs) + 0.2 * Math.sin((2 * Math.PI * 1234.5 * t) / fs) - 0.001 * Math.cos((2 * Math.PI * 1111.1 * t) / fs);
    }
    const fit = fitSinusoids(x, fs, [123.4, 1234.5, 1111.1]);
    expect(fit.dc).toBeCloseTo(0.01, 12);
    expect(fit.components[0]?.a).toBeCloseTo(0.3, 12);
    expect(fit.components[1]?.b).toBeCloseTo(0.2, 12);
    expect(fit.components[2]?.a).toBeCloseTo(-0.001, 12);
    subtractSinusoids(x, fs, fit);
    let worst = 0;
    for (const v of x) worst = Math.max(worst, Math.abs(v));
    expect(worst).toBeLessThan(1e-12);
  });

  it('merges frequencies closer than one bin into one column, reported for each', () => {
    const fs = 8000;
    const x = tone(8000, fs, 500, 0.5);
    const fit = fitSinusoids(x, fs, [500, 500.2, 1000]);
    expect(fit.components[0]?.column).toBe(fit.components[1]?.column);
    expect(fit.components[1]?.amplitude).toBeCloseTo(0.5, 12);
    subtractSinusoids(x, fs, fit); // subtracts the merged line once
    expect(Math.max(...Array.from(x, Math.abs))).toBeLessThan(1e-12);
  });

  it('rejects frequencies outside (0, fs/2 − fs/N)', () => {
    expect(() => fitSinusoids(new Float64Array(100), 1000, [499.9])).toThrow(refusedBy('fitSinusoids', /^frequency/));
    expect(() => fitSinusoids(new Float64Array(100), 1000, [])).toThrow(refusedBy('fitSinusoids', /^give at least one/));
  });

  it.skipIf(!hasPythonScipy())('agrees with numpy lstsq on a noisy two-tone record', () => {
    const fs = 44100;
    const x = plus(plus(tone(4410, fs, 60.5, 0.4), tone(4410, fs, 7000.3, 0.1)), gaussian(4410, 3, 0.01));
    const fit = fitSinusoids(x, fs, [60.5, 7000.3]);
    const r = runPython(
      'x = np.array(IN["x"]); n = len(x); t = np.arange(n) - (n - 1) / 2\nw = [2*np.pi*f/44100 for f in (60.5, 7000.3)]\nM = np.column_stack([np.ones(n)] + [np.cos(v*t) for v in w] + [np.sin(v*t) for v in w])\nc = np.linalg.lstsq(M, x, rcond=None)[0]\nprint(json.dumps([float(np.hypot(c[1], c[3])), float(np.hypot(c[2], c[4]))]))',
      { x },
    ) as [number, number];
    expect(fit.components[0]?.amplitude).toBeCloseTo(r[0], 10);
    expect(fit.components[1]?.amplitude).toBeCloseTo(r[1], 10);
  });
});

describe('findStrongestTones and steadyToneRange', () => {
  it('finds a 4:1 pair strongest first, within a small fraction of a bin', () => {
    const fs = 48000;
    const x = dither24(plus(tone(48000, fs, 60.25, 0.4), tone(48000, fs, 7001.7, 0.1)), 1);
    const [a, b] = findStrongestTones(x, fs, 2);
    // Search FFT: 32768 samples, bin 1.46 Hz; parabolic interpolation on Blackman-Harris: < 0.05 bin.
    expect(Math.abs((a ?? 0) - 60.25)).toBeLessThan(0.07);
    expect(Math.abs((b ?? 0) - 7001.7)).toBeLessThan(0.07);
  });

  it('skips an idle lead-in and a 0.2 s fade-in, and keeps a plain record whole', () => {
    const fs = 48000;
    const sig = tone(fs, fs, 1000, 0.5);
    for (let i = 0; i < 0.2 * fs; i++) sig[i] = (sig[i] as number) * 0.5 * (1 - Math.cos((Math.PI * i) / (0.2 * fs)));
    const x = dither24(withLeadIn(sig, 0.5 * fs), 2);
    const [start, end] = steadyToneRange(x, fs);
    // Gain ½(1 − cos πu) ≥ 10^(−0.5/20)… the steady run starts after u ≈ 0.87 of the fade, i.e.
    // after 0.5 + 0.17 s, plus one 50 ms margin block (closed form of the raised cosine).
    expect(start).toBeGreaterThanOrEqual(0.67 * fs);
    expect(start).toBeLessThanOrEqual(0.78 * fs);
    expect(end).toBeGreaterThan(1.4 * fs);
    expect(steadyToneRange(tone(fs, fs, 1000, 0.5), fs)).toEqual([0, fs]);
  });
});
