// Field reports 11–13: clipping, discontinuities and dropouts in realistic captures, through
// analyzeCapture and evaluateMask only. Expected positions and counts come from how each
// capture was built.
import { describe, expect, it } from 'vitest';
import { analyzeCapture, evaluateMask } from '../../src/index.js';
import { addNoise, clip } from '../../src/testing/index.js';
import { dbfs, roundQuantise, tone, tpdfQuantise } from '../audio-band/capture-signals.js';
import { add, fadedSweep, tpdfDither } from '../timing/timing-signals.js';
import { checkOf, mask } from './real-capture-helpers.js';

const FS = 48000;

/** Samples of A·sin(2π·997·n/fs + 0.3), n < fs, whose magnitude reaches `level`: those a clipper at `level` holds flat. */
function samplesAtOrAbove(amplitude: number, level: number): number {
  let count = 0;
  for (const v of tone(FS, FS, 997, amplitude)) if (Math.abs(v) >= level) count++;
  return count;
}

describe('report 11: clipped samples', () => {
  // Every sample a clipper at 0.9 FS holds: |sin θ| ≥ 0.9, counted on the unclipped sine. Closed
  // form: a share 1 − (2/π)·asin(0.9) = 0.28713 of the time, 13 782.4 of 48 000 samples.
  const heldAt09 = samplesAtOrAbove(1, 0.9);
  // A full-scale sine through a path that saturates at 0.9 FS, delivered in 24 bits (rounded).
  const flat = roundQuantise(clip(tone(FS, FS, 997, 1), 0.9), 24);

  it('counts none on a clean 0 dBFS 16-bit sine and every flat sample on clipped ones', () => {
    expect(Math.abs(heldAt09 / (FS * (1 - (2 / Math.PI) * Math.asin(0.9))) - 1)).toBeLessThan(1e-3);
    // 0 dBFS in 16 bits: the peak code is 32767 (AES17 §3: a sine reaching full scale is not clipped).
    const clean = tone(FS, FS, 997, 1).map((v) => Math.round(32767 * v) / 32768);
    // A float path whose limiter holds 1.5 (no fixed-point word to saturate at 1.0).
    const float = clip(tone(FS, FS, 997, 2), 1.5);
    const [a, b, c] = analyzeCapture({ sampleRate: FS, channels: [clean, flat, float] }).channels;
    expect(a?.clippedSamples).toBe(0);
    // Rounding cannot bring a neighbour of a flat top onto the clip code unless it lies within
    // ½ LSB (6·10⁻⁸) of 0.9, where the sine moves by ~0.06 per sample: the count is exact.
    expect(b?.clippedSamples).toBe(heldAt09);
    // |2·sin θ| ≥ 1.5: share 1 − (2/π)·asin(0.75) = 0.46011, 22 085.1 of 48 000.
    const heldAt15 = samplesAtOrAbove(2, 1.5);
    expect(Math.abs(heldAt15 / (FS * (1 - (2 / Math.PI) * Math.asin(0.75))) - 1)).toBeLessThan(1e-3);
    expect(c?.clippedSamples).toBe(heldAt15);
  });

  // KNOWN LIMITATION of engine 1.0 (it.fails: drop .fails once fixed): clipping is a run stuck at
  // one extreme value, so ±1 LSB of dither added after the clipper breaks the runs: 5 of 13,782
  // held samples are counted. Documented in docs/analysis.md (clippedSamples).
  it.fails('counts the flat samples when the path dithers its 24-bit output after the clipper', () => {
    // Word-length reduction with ±1 LSB TPDF dither after the clipper (common practice in a
    // firmware output stage): each flat top now wanders by ±1 LSB (2.4·10⁻⁷ FS) around 0.9 FS,
    // still the same 13 782 held samples. ±1 % allows for neighbours dither pushes onto the top.
    const dithered = tpdfQuantise(clip(tone(FS, FS, 997, 1), 0.9), 24, 1);
    const c = analyzeCapture({ sampleRate: FS, channels: [dithered] }).channels[0];
    expect(Math.abs((c?.clippedSamples ?? 0) / heldAt09 - 1)).toBeLessThan(0.01);
  });

  it('an integrity check reads the same count', () => {
    const result = evaluateMask({ capture: { sampleRate: FS, channels: [flat] } }, mask({ id: 'clip', kind: 'integrity', metric: 'clipped-samples', max: 0 }));
    expect(checkOf(result, 'clip').measured).toBe(heldAt09);
    expect(result.verdict).toBe('fail');
  });
});

describe('report 12: discontinuities', () => {
  // Each record is 2 s: a −6 dBFS exponential sweep (20 Hz … 20 kHz, 10 ms fades) over 24-bit
  // dither, a −6 dBFS 20 kHz tone in 24 bits, and −20 dBFS white noise.
  const sweep = fadedSweep(FS, 20, 20000, 2, dbfs(-6));
  const cleanSweep = add(sweep, tpdfDither(sweep.length, 24, 1));
  const cleanTone = tpdfQuantise(tone(sweep.length, FS, 20000, dbfs(-6)), 24, 2);
  const noise = addNoise(new Float64Array(sweep.length), -20, 9);

  it('finds a 0.2 FS spike on the sweep and a 0.05 FS glitch on the 20 kHz tone at their samples', () => {
    const spiked = Float64Array.from(cleanSweep);
    spiked[40000] = (spiked[40000] as number) + 0.2;
    const glitched = Float64Array.from(cleanTone);
    glitched[30000] = (glitched[30000] as number) + 0.05;
    const [a, b] = analyzeCapture({ sampleRate: FS, channels: [spiked, glitched] }).channels;
    // Inserted at samples 40 000 and 30 000.
    expect(a?.discontinuities).toEqual([40000]);
    expect(b?.discontinuities).toEqual([30000]);
    const result = evaluateMask({ capture: { sampleRate: FS, channels: [glitched] } }, mask({ id: 'clicks', kind: 'integrity', metric: 'discontinuities', max: 0 }));
    expect(checkOf(result, 'clicks').measured).toBe(1);
  });

  it('finds none on the clean sweep, the clean tone and white noise', () => {
    const report = analyzeCapture({ sampleRate: FS, channels: [cleanSweep, cleanTone, noise] });
    expect(report.channels.map((c) => c.discontinuities)).toEqual([[], [], []]);
  });
});

describe('report 13: dropouts', () => {
  it('finds a 10 ms gap down to a −140 dBFS noise floor inside a −20 dBFS tone', () => {
    const start = 20000;
    const length = 480;
    const gated = tone(FS, FS, 997, dbfs(-20));
    gated.fill(0, start, start + length);
    // The whole capture carries −140 dBFS white noise (AES17 RMS); in the gap only the noise remains.
    const capture = { sampleRate: FS, channels: [addNoise(gated, -140, 4)] };
    // Setup check: the tone is far from a zero crossing on both sides of the gap (> 10 % of its
    // amplitude, far above the gap's −40 dB threshold), so the gap's edges are exact.
    const sine = tone(FS, FS, 997, 1);
    expect(Math.abs(sine[start - 1] as number)).toBeGreaterThan(0.1);
    expect(Math.abs(sine[start + length] as number)).toBeGreaterThan(0.1);
    const c = analyzeCapture(capture).channels[0];
    expect(c?.dropouts).toEqual([{ startSample: start, lengthSamples: length }]);
    const result = evaluateMask({ capture }, mask({ id: 'dropouts', kind: 'integrity', metric: 'dropouts', max: 0 }));
    expect(checkOf(result, 'dropouts').measured).toBe(1);
  });
});
