import { describe, expect, it } from 'vitest';
import { analyzeCapture } from '../src/analyze/analyze-capture.js';
import { ENGINE_VERSION } from '../src/engine-version.js';
import { gaussian, quantise, sine } from './helpers/signals.js';
import { refusedBy } from './helpers/refused.js';

const FS = 48000;

describe('analyzeCapture', () => {
  it('reports every measure of a 16-bit 997 Hz tone at −20 dBFS per channel', () => {
    const n = 96000;
    const left = quantise(sine(n, FS, 997, 0.1), 16);
    const right = quantise(sine(n, FS, 997, 0.05), 16);
    const r = analyzeCapture({ sampleRate: FS, channels: [left, right] });
    expect(r.engineVersion).toBe(ENGINE_VERSION);
    expect(r.frames).toBe(n);
    expect(r.channels.map((c) => c.channel)).toEqual([0, 1]);
    const [a, b] = r.channels;
    // −20 dBFS and −26.02 dBFS by definition (AES17); quantisation shifts RMS by < 0.001 dB.
    expect(Math.abs((a?.rmsDbfs ?? 0) + 20)).toBeLessThan(1e-3);
    expect(Math.abs((b?.rmsDbfs ?? 0) + 26.0206)).toBeLessThan(1e-3);
    expect(Math.abs((a?.fundamentalHz ?? 0) - 997)).toBeLessThan(1e-6);
    // Parseval integrity check
    expect(a?.energy.relativeError).toBeLessThan(1e-9);
    // SNR of a −20 dBFS 16-bit tone: 98.09 − 20 + 0.796 (band 20 Hz…20 kHz) dB (Kester MT-001), ±0.3 dB
    expect(Math.abs((a?.snrDb ?? 0) - (6.0206 * 16 + 1.7609 - 20 + 10 * Math.log10(24000 / 19980)))).toBeLessThan(0.3);
    const band1k = a?.thirdOctaveBands.find((x) => x.centerHz === 1000);
    expect(Math.abs((band1k?.levelDbfs ?? 0) + 20)).toBeLessThan(0.05);
    expect(a?.thirdOctaveBands[0]?.centerHz).toBe(25);
    expect(a?.thirdOctaveBands.at(-1)?.centerHz).toBe(20000);
    expect(a?.transfer).toBeUndefined();
  });

  it('with a reference: latency exact, group delay = latency + (L−1)/2, magnitudes in dB', () => {
    const x = gaussian(2 ** 16, 21, 0.2);
    const taps = [0.25, 0.5, 0.25]; // symmetric: 1 sample of group delay, |H(0)| = 1
    const latency = 300;
    const y = new Float64Array(x.length + 1000);
    for (let n = 0; n < x.length; n++) {
      let s = 0;
      for (let k = 0; k < taps.length && k <= n; k++) s += (taps[k] as number) * (x[n - k] as number);
      y[n + latency] = s;
    }
    const r = analyzeCapture({ sampleRate: FS, channels: [y] }, { reference: { sampleRate: FS, channels: [x] } });
    const t = r.channels[0]?.transfer;
    // The cross-correlation peak sits on the larger centre tap: the bulk delay (300) plus the tap (1).
    // Sub-sample latency (GCC-PHAT, interpolated peak): the FIR's centre tap lands 1 sample late; within 1e-3 samples.
    expect(Math.abs((t?.latencySamples ?? 0) - (latency + 1))).toBeLessThan(1e-3);
    // Group delay (Oppenheim & Schafer, symmetric FIR): (L−1)/2 = 1 sample, plus 300 samples of latency.
    expect(Math.abs((t?.groupDelayMs.mean ?? 0) - (1000 * (latency + 1)) / FS)).toBeLessThan(1e-3);
    expect(t?.linearPhaseDeviationDeg).toBeLessThan(1);
    // |H| at 1 kHz: cos²(πf/fs) for taps [¼, ½, ¼] = 0.9957 → −0.037 dB (closed form), band average ±0.01 dB.
    const at1k = t?.magnitudeDb.find((m) => m.centerHz === 1000);
    expect(Math.abs((at1k?.db ?? 0) - 20 * Math.log10(Math.cos((Math.PI * 1000) / FS) ** 2))).toBeLessThan(0.01);
  });

  it('reports silence with null levels and no tone', () => {
    const r = analyzeCapture({ sampleRate: FS, channels: [new Float64Array(4800)] });
    const c = r.channels[0];
    expect(c?.rmsDbfs).toBeNull();
    expect(c?.fundamentalHz).toBeNull();
    expect(c?.energy.relativeError).toBe(0);
  });

  it('rejects bad input naming the function', () => {
    expect(() => analyzeCapture({ sampleRate: FS, channels: [] })).toThrow(refusedBy('analyzeCapture'));
    expect(() => analyzeCapture({ sampleRate: FS, channels: [Float64Array.of(0, Number.NaN, 0)] })).toThrow(refusedBy('analyzeCapture', /^sample 1 of capture channel 0 is NaN; only finite samples can be analysed$/));
    expect(() => analyzeCapture({ sampleRate: FS, channels: [new Float64Array(10)] }, { channels: [3] })).toThrow(/channel 3/);
  });
});
