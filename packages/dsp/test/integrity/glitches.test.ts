import { describe, expect, it } from 'vitest';
import { detectGlitches } from '../../src/measures/glitches.js';
import { levinsonDurbin } from '../../src/measures/glitch-prediction.js';
import { applyFades } from '../../src/stimulus/fade.js';
import { multitoneWave, schroederPhases, toneFrequencies } from '../../src/stimulus/multitone.js';
import { pinkNoise } from '../../src/stimulus/pink-noise.js';
import { createSeededRandom } from '../../src/stimulus/seeded-random.js';
import { gaussian, quantise, sine } from '../helpers/signals.js';
import { add, fadedSweep, tpdfDither } from '../timing/timing-signals.js';

const RATES = [44100, 48000, 96000, 192000];

/** A tone with 10 ms raised-cosine fades after 50 ms of 24-bit dithered idle noise (a realistic capture). */
function fadedTone(fs: number, f: number, amplitude: number, seconds: number): Float64Array {
  const tone = sine(Math.round(seconds * fs), fs, f, amplitude);
  applyFades(tone, Math.round(0.01 * fs), Math.round(0.01 * fs));
  const lead = Math.round(0.05 * fs);
  const x = new Float64Array(tone.length + 2 * lead);
  x.set(tone, lead);
  return add(x, tpdfDither(x.length, 24, 99));
}

describe('levinsonDurbin', () => {
  it('recovers an AR(2) model from its exact autocorrelation', () => {
    // x[n] = 1.5x[n−1] − 0.7x[n−2] + w[n]: Yule–Walker gives r1/r0 = a1/(1 − a2) and
    // r2 = a1·r1 + a2·r0 (closed form); with r0 = 1: r1 = 1.5/1.7, r2 = 1.5·r1 − 0.7.
    const r1 = 1.5 / 1.7;
    const r = Float64Array.of(1, r1, 1.5 * r1 - 0.7);
    const a = new Float64Array(3);
    levinsonDurbin(r, 2, a);
    expect(a[1]).toBeCloseTo(1.5, 12);
    expect(a[2]).toBeCloseTo(-0.7, 12);
  });
});

describe('detectGlitches', () => {
  it('finds a 0.2 FS spike on a −6 dBFS sweep that the old whole-record rule missed', () => {
    const fs = 48000;
    const x = fadedSweep(fs, 20, 20000, 2, 0.5);
    const at = 70000; // ≈ 1.46 s into the sweep, about 4.5 kHz
    x[at] = (x[at] as number) + 0.2;
    // Before engine 1.0 the whole-record rule (detectDiscontinuities) flagged nothing here.
    const events = detectGlitches(x, fs);
    expect(events.length).toBe(1);
    expect(events[0]?.sample).toBe(at); // the spike's own sample: e[n] = x[n] − x̂[n] jumps there first
  });

  it('finds a spike near 20 kHz, high in the sweep', () => {
    const fs = 48000;
    const x = fadedSweep(fs, 20, 20000, 2, 0.5);
    const at = 2 * fs - 2000; // ≈ 19 kHz
    x[at] = (x[at] as number) - 0.2;
    const events = detectGlitches(x, fs);
    expect(events.map((e) => e.sample)).toEqual([at]);
  });

  it('finds a 0.05 FS step and a 0.05 FS spike on a 20 kHz tone at 48 kHz (the old rule missed both)', () => {
    const fs = 48000;
    const step = sine(fs, fs, 20000, 0.5);
    for (let i = 30000; i < step.length; i++) step[i] = (step[i] as number) + 0.05;
    // Before engine 1.0 detectDiscontinuities flagged nothing here.
    const s = detectGlitches(step, fs);
    expect(s.length).toBe(1);
    expect(s[0]?.sample).toBe(30000);
    const spike = sine(fs, fs, 20000, 0.5);
    spike[20000] = (spike[20000] as number) + 0.05;
    // Before engine 1.0 detectDiscontinuities flagged nothing here either.
    expect(detectGlitches(spike, fs).map((e) => e.sample)).toEqual([20000]);
  });

  it('finds a lost block of 17 samples in a 16-bit 997 Hz tone', () => {
    const fs = 44100;
    const tone = quantise(sine(fs, fs, 997, 0.9), 16);
    const spliced = new Float64Array(fs - 17);
    spliced.set(tone.subarray(0, 30000));
    spliced.set(tone.subarray(30017), 30000);
    const events = detectGlitches(spliced, fs);
    expect(events.length).toBe(1);
    expect(Math.abs((events[0]?.sample as number) - 30000)).toBeLessThanOrEqual(1);
  });

  it.each(RATES)('flags nothing on clean sweeps, tones, noise and multitones, float, 24- and 16-bit, at %i Hz', (fs) => {
    const signals: [string, Float64Array][] = [
      ['sweep', fadedSweep(fs, 20, 20000, 1, 0.5)],
      ['tone 20 Hz', fadedTone(fs, 20, 0.5, 0.5)],
      ['tone 997 Hz', fadedTone(fs, 997, 1, 0.25)],
      ['tone 20 kHz', fadedTone(fs, 20000, 0.5, 0.25)],
      ['white', gaussian(Math.round(0.25 * fs), 4, 0.1)],
      ['pink', pinkNoise(Math.round(0.25 * fs), fs, 0.1, createSeededRandom(5))],
      ['multitone', multitoneWave(Math.round(0.25 * fs), fs, toneFrequencies(20, 20000, 31, 'log'), schroederPhases(31), 0.05)],
    ];
    for (const [name, x] of signals) {
      for (const [form, y] of [['float', x], ['24-bit', quantise(x, 24)], ['16-bit', quantise(x, 16)]] as const) {
        expect({ name, form, events: detectGlitches(y, fs) }).toEqual({ name, form, events: [] });
      }
    }
  });

  it('handles silence, DC and a tiny record without throwing', () => {
    expect(detectGlitches(new Float64Array(48000), 48000)).toEqual([]);
    expect(detectGlitches(new Float64Array(48000).fill(0.3), 48000)).toEqual([]);
    expect(detectGlitches(new Float64Array(5), 48000)).toEqual([]);
  });

  it('runs 10 s at 192 kHz in well under 1 s of CPU time', () => {
    const fs = 192000;
    const x = gaussian(10 * fs, 8, 0.1);
    const c0 = process.cpuUsage();
    detectGlitches(x, fs);
    const c = process.cpuUsage(c0);
    expect((c.user + c.system) / 1000).toBeLessThan(1000); // the brief's speed budget
  });
});
