import { describe, expect, it } from 'vitest';
import { measureCrosstalk } from '../../src/measures/crosstalk.js';
import { fractionalOctaveBands } from '../../src/measures/octave-bands.js';
import { generateStimulus } from '../../src/stimulus/generate-stimulus.js';
import { gaussian } from '../helpers/signals.js';
import { dither24, onePoleLowPass, onePolePower, withLeadIn } from './imd-signals.js';
import { refusedBy } from '../helpers/refused.js';

const LEAK = 10 ** (-60 / 20);

/** Mean of |H|² over a 1/3-octave band with weight w(f), by a fine midpoint sum (numerical closed form). */
function bandAverage(centerHz: number, cornerHz: number, fs: number, weight: (f: number) => number): number {
  const band = fractionalOctaveBands(3, centerHz * 0.999, centerHz * 1.001)[0];
  if (!band) throw new Error('no band');
  let num = 0;
  let den = 0;
  for (let i = 0; i < 2000; i++) {
    const f = band.lowerHz + ((i + 0.5) * (band.upperHz - band.lowerHz)) / 2000;
    num += weight(f) * onePolePower(f, cornerHz, fs);
    den += weight(f);
  }
  return num / den;
}

describe('measureCrosstalk', () => {
  it('reads −60 dB in the pass band of a −60 dB first-order leak, and its roll-off above (white noise, 48 kHz)', () => {
    const fs = 48000;
    const corner = 2000;
    const driven = gaussian(2 * fs, 1, 0.05);
    const leak = onePoleLowPass(driven, corner, fs).map((v) => v * LEAK);
    const r = measureCrosstalk([dither24(driven, 1), dither24(leak, 2)], fs, 0);
    expect(r.channels).toHaveLength(1);
    const ch = r.channels[0];
    if (!ch) throw new Error('no channel');
    expect(ch.channel).toBe(1);
    for (const b of ch.bands) {
      // separation = 60 dB − 10·log10(mean |H|² over the band); white drive → flat weight.
      // |H|² of the one-pole: closed form in imd-signals.ts. Tolerance 0.15 dB: Welch variance of
      // the per-bin drive spectrum in narrow bands.
      const expected = 60 - 10 * Math.log10(bandAverage(b.centerHz, corner, fs, () => 1));
      expect(Math.abs(b.separationDb - expected), `${b.nominalHz} Hz`).toBeLessThan(0.15);
      expect(b.crosstalkDb).toBe(-b.separationDb);
      expect(b.noiseLimited).toBe(false);
      expect(b.coherentFraction).toBeGreaterThan(0.99);
    }
    // Pass band: |H|² ≥ 0.99 below 200 Hz, so −60 dB within 0.05 dB.
    const low = ch.bands.filter((b) => b.centerHz < 200);
    expect(low.length).toBeGreaterThan(3);
    for (const b of low) expect(Math.abs(b.separationDb - 60)).toBeLessThan(0.05);
    // The leak falls with frequency, so the worst band is the lowest one reported (|H| ≈ 1 there).
    expect(ch.worst?.centerHz).toBe(ch.bands[0]?.centerHz);
    expect(Math.abs((ch.worst?.separationDb ?? 0) - 60)).toBeLessThan(0.05);
  });

  it('sweep drive at 96 kHz with a 0.2 s idle lead-in of 24-bit dither on both channels', () => {
    const fs = 96000;
    const corner = 5000;
    const sweep = generateStimulus({ kind: 'sweep', sampleRate: fs, channels: 1, seconds: 1.2, levelDbfs: -10, from: 20, to: 40000, silenceSeconds: 0.1, fadeInSeconds: 0.02, fadeOutSeconds: 0.01 }).channels[0] ?? new Float64Array();
    const driven = withLeadIn(sweep, Math.round(0.2 * fs));
    const leak = onePoleLowPass(driven, corner, fs).map((v) => v * LEAK);
    const r = measureCrosstalk([dither24(driven, 3), dither24(leak, 4)], fs, 0, { bandsHz: [20, 40000], worstRangeHz: [1000, 20000] });
    const ch = r.channels[0];
    if (!ch) throw new Error('no channel');
    expect(ch.bands.at(-1)?.nominalHz).toBe(40000); // its upper edge 44.9 kHz is below fs/2 = 48 kHz, but the sweep stops at 40 kHz…
    for (const b of ch.bands) {
      if (b.centerHz > 30000) continue; // …so the top bands are only partly driven
      // The reading is a weighted mean of 60 dB − 10·log10|H|² over the band's bins, with the drive's
      // band spectrum as weight (for a sweep, 1/f times the ripple of overlapping Hann² segments, as
      // each segment holds part of the sweep). Any positive weight keeps it between the band's
      // extremes of |H|² (closed form in imd-signals.ts).
      const band = fractionalOctaveBands(3, b.centerHz * 0.999, b.centerHz * 1.001)[0];
      if (!band) throw new Error('no band');
      const edges = [band.lowerHz, band.upperHz].map((f) => 60 - 10 * Math.log10(onePolePower(f, corner, fs)));
      expect(b.separationDb, `${b.nominalHz} Hz`).toBeGreaterThan(Math.min(...edges) - 0.02);
      expect(b.separationDb, `${b.nominalHz} Hz`).toBeLessThan(Math.max(...edges) + 0.02);
      expect(b.noiseLimited).toBe(false);
    }
    for (const b of ch.bands.filter((x) => x.centerHz >= 25 && x.centerHz <= 500)) expect(Math.abs(b.separationDb - 60)).toBeLessThan(0.05);
    // Worst over 1–20 kHz is at 1 kHz: |H(1 kHz)|² ≈ 1/(1 + 0.2²) → ≈ 60.2 dB.
    expect(ch.worst?.nominalHz).toBe(1000);
    expect(ch.worst?.separationDb).toBeGreaterThan(60.1);
    expect(ch.worst?.separationDb).toBeLessThan(60.3);
  });

  it('flags bands where the undriven channel sits at its noise floor and reads "at least"', () => {
    const fs = 48000;
    // Drive: white noise at −20 dBFS (RMS 0.1/√2). Undriven: a −130 dB leak under independent
    // white noise at −100 dBFS. Both spectra are flat, so the band ratio is the RMS ratio,
    // 80 dB (closed form), well below the true 130 dB: every band is noise-limited.
    const driven = gaussian(2 * fs, 5, 0.1 / Math.SQRT2);
    const noise = gaussian(2 * fs, 6, 1e-5 / Math.SQRT2);
    const undriven = driven.map((v, i) => v * 10 ** (-130 / 20) + (noise[i] as number));
    const r = measureCrosstalk([undriven, driven], fs, 1);
    const ch = r.channels[0];
    if (!ch) throw new Error('no channel');
    expect(ch.channel).toBe(0);
    expect(r.segments).toBeGreaterThanOrEqual(8);
    for (const b of ch.bands) {
      expect(b.noiseLimited, `${b.nominalHz} Hz`).toBe(true);
      expect(b.coherentFraction).toBeLessThan(0.5);
      expect(b.separationDb).toBeLessThan(130);
      // Ratio of two independent noise band powers: σ ≈ 4.34·√(4/dof) dB, about 1 dB for the
      // narrowest bands (a few bins × ~20 segments); 3 dB is ≈ 3σ.
      expect(Math.abs(b.separationDb - 80), `${b.nominalHz} Hz`).toBeLessThan(3);
    }
    const sorted = ch.bands.map((b) => b.separationDb).sort((p, q) => p - q);
    expect(Math.abs((sorted[Math.floor(sorted.length / 2)] ?? 0) - 80)).toBeLessThan(0.5);
    expect(ch.worst?.noiseLimited).toBe(true);
  });

  it('handles 8 channels with a different leak per channel in one pass', () => {
    const fs = 44100;
    const driven = gaussian(fs, 7, 0.05);
    const channels = [0, 1, 2, 3, 4, 5, 6, 7].map((c) => (c === 2 ? driven : driven.map((v) => v * 10 ** (-(40 + 5 * c) / 20))));
    const r = measureCrosstalk(channels, fs, 2, { bandsHz: [100, 16000] });
    expect(r.channels.map((c) => c.channel)).toEqual([0, 1, 3, 4, 5, 6, 7]);
    // A flat leak of −(40 + 5c) dB reads exactly that separation in every band (closed form).
    for (const ch of r.channels) for (const b of ch.bands) expect(b.separationDb).toBeCloseTo(40 + 5 * ch.channel, 6);
    // 44.1 kHz: the 20 kHz band (upper edge 22.4 kHz) is past fs/2 and left out; 16 kHz is the top.
    expect(r.channels[0]?.bands.at(-1)?.nominalHz).toBe(16000);
    expect(r.channels[0]?.bands[0]?.nominalHz).toBe(100);
  });

  it('rejects bad arguments with the function name', () => {
    const x = new Float64Array(48000);
    expect(() => measureCrosstalk([x], 48000, 0)).toThrow(refusedBy('measureCrosstalk', /^need at least 2 channels/));
    expect(() => measureCrosstalk([x, x], 48000, 2)).toThrow(refusedBy('measureCrosstalk', /^drivenChannel/));
    expect(() => measureCrosstalk([x, new Float64Array(10)], 48000, 0)).toThrow(refusedBy('measureCrosstalk', /^all channels/));
    expect(() => measureCrosstalk([x.subarray(0, 1000), x.subarray(0, 1000)], 48000, 0)).toThrow(refusedBy('measureCrosstalk', /^the record/));
  });
});
