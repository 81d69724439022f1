import { describe, expect, it } from 'vitest';
import { captureSteadyWindow, stimulusSteadyWindow } from '../../src/measures/steady-window.js';
import { generateStimulus } from '../../src/stimulus/generate-stimulus.js';
import { addInto, dbfs, delayed, tone, tpdfQuantise } from './capture-signals.js';
import { refusedBy } from '../helpers/refused.js';

/** The stimulus generator's 2 s, −1 dBFS, 997 Hz sine with 0.05 s raised-cosine fades. */
function fadedSine(fs: number): Float64Array {
  const s = generateStimulus({ kind: 'sine', sampleRate: fs, channels: 1, seconds: 2, levelDbfs: -1, frequency: 997, fadeInSeconds: 0.05, fadeOutSeconds: 0.05 });
  return s.channels[0] as Float64Array;
}

describe('steady window from the stimulus', () => {
  it('starts after the fade-in and ends before the fade-out, shifted by a fractional latency', () => {
    const fs = 48000;
    const stim = fadedSine(fs);
    const latency = 123.4;
    const w = stimulusSteadyWindow(stim, stim.length + 200, fs, { latencySamples: latency });
    // Fades are 0.05·48000 = 2400 samples (generate-stimulus.ts); the plateau is [2400, 93600).
    // Rounded inward: start ≥ ceil(2400 + 123.4) = 2524, end ≤ floor(93600 + 123.4) = 93723.
    expect(w.start).toBeGreaterThanOrEqual(2524);
    expect(w.end).toBeLessThanOrEqual(93723);
    // A sample within 0.001 dB of the crest occurs within a few periods (48.1 samples each) of the fade end.
    expect(w.start).toBeLessThan(2524 + 10 * 48.1);
    expect(w.end).toBeGreaterThan(93723 - 10 * 48.1);
    expect(w.trimmedLeadIn).toBe(true);
    expect(w.trimmedTail).toBe(true);
    expect(w.reason).toMatch(/fade-in/);
  });

  it('pink noise with fades: stated fade lengths give the exact plateau (found ones are approximate)', () => {
    const spec = { kind: 'pink-noise', sampleRate: 48000, channels: 1, seconds: 1, levelDbfs: -20, fadeInSeconds: 0.05, fadeOutSeconds: 0.05, seed: 1, independentChannels: false } as const;
    const stim = generateStimulus(spec).channels[0] as Float64Array;
    // Fades of 0.05·48000 = 2400 samples at both ends of the 48000-sample stimulus (fade.ts).
    const w = stimulusSteadyWindow(stim, 48000, 48000, { fadeSamples: [2400, 2400], latencySamples: 0.5 });
    expect([w.start, w.end]).toEqual([2401, 45600]); // ceil(2400.5), floor(45600.5)
  });

  it('an unfaded stimulus covering the capture gives the whole capture', () => {
    const stim = tone(4800, 48000, 997, 0.5);
    const w = stimulusSteadyWindow(stim, 4800, 48000);
    expect([w.start, w.end, w.trimmedLeadIn, w.trimmedTail]).toEqual([0, 4800, false, false]);
  });

  it('clips to the capture and handles a silent stimulus', () => {
    const stim = fadedSine(48000);
    const w = stimulusSteadyWindow(stim, 50000, 48000, { latencySamples: 10 });
    expect(w.end).toBe(50000);
    expect(w.trimmedTail).toBe(false);
    const s = stimulusSteadyWindow(new Float64Array(100), 300, 48000);
    expect([s.start, s.end]).toEqual([0, 300]);
  });

  it('rejects bad options with the function name', () => {
    expect(() => stimulusSteadyWindow(new Float64Array(10), 10, 0)).toThrow(refusedBy('stimulusSteadyWindow'));
    expect(() => stimulusSteadyWindow(new Float64Array(10), 10, 48000, { toleranceDb: 0 })).toThrow(refusedBy('stimulusSteadyWindow'));
    expect(() => stimulusSteadyWindow(new Float64Array(10), 10, 48000, { latencySamples: NaN })).toThrow(refusedBy('stimulusSteadyWindow'));
  });
});

describe('steady window from the capture alone (band-limited level plateau)', () => {
  it('trims a latency gap of 16-bit dithered idle noise before a −60 dBFS tone', () => {
    const fs = 48000;
    const latency = 4800;
    const x = tpdfQuantise(delayed(tone(fs, fs, 997, dbfs(-60)), latency), 16, 9);
    // Before engine 1.0 the 1 %-of-peak threshold (steadyStateRange, −100 dBFS here) sat below the
    // dither's peaks, so nothing was trimmed: it returned start 0 here.
    const w = captureSteadyWindow(x, fs);
    // The tone starts at 4800; the window must start after it, within the smoothing half-width
    // (2 blocks of 480) plus settling (480) plus one block of rounding.
    expect(w.start).toBeGreaterThanOrEqual(latency);
    expect(w.start).toBeLessThanOrEqual(latency + 4 * 480);
    expect(w.end).toBe(x.length);
    expect(w.trimmedLeadIn).toBe(true);
    expect(w.trimmedTail).toBe(false);
  });

  it('sees a 63-sample latency gap under a −40 dBFS 30 kHz pilot at 96 kHz', () => {
    const fs = 96000;
    const n = 96000;
    const x = delayed(tone(n, fs, 997, dbfs(-1)), 63);
    addInto(x, tone(n + 63, fs, 30000, dbfs(-40), 0.2));
    const q = tpdfQuantise(x, 24, 11);
    // Before engine 1.0 steadyStateRange returned start 0 here: the pilot's −40 dBFS peaks reach
    // 1 % of the tone's peak, so the gap was not seen.
    const w = captureSteadyWindow(q, fs);
    expect(w.start).toBeGreaterThanOrEqual(63);
    expect(w.trimmedLeadIn).toBe(true);
    expect(w.end).toBe(q.length);
  });

  it('trims the generator fades from the capture alone', () => {
    const stim = fadedSine(48000);
    const w = captureSteadyWindow(tpdfQuantise(stim, 24, 3), 48000);
    // Fades end at 2400 and start at 93600 (0.05 s at 48 kHz).
    expect(w.start).toBeGreaterThanOrEqual(2400);
    expect(w.end).toBeLessThanOrEqual(93600);
    expect(w.end - w.start).toBeGreaterThan(0.9 * 96000);
  });

  it('returns a record that is all steady whole: tone, low tone, stationary noise, idle dither, silence', () => {
    const fs = 44100;
    const cases: [string, Float64Array][] = [
      ['997 Hz tone', tpdfQuantise(tone(fs, fs, 997, dbfs(-1)), 24, 1)],
      ['20 Hz tone', tpdfQuantise(tone(fs, fs, 20, dbfs(-1)), 24, 2)],
      ['idle 16-bit dither', tpdfQuantise(new Float64Array(fs), 16, 3)],
      ['silence', new Float64Array(fs)],
    ];
    for (const [name, x] of cases) {
      const w = captureSteadyWindow(x, fs);
      if (w.start !== 0 || w.end !== x.length) expect.fail(`${name}: window ${w.start}…${w.end} (${w.reason})`);
    }
  });

  it('runs in one O(N) pass: 10 s at 192 kHz well under a second', () => {
    const fs = 192000;
    const x = tone(10 * fs, fs, 997, 0.5);
    const t = performance.now();
    const w = captureSteadyWindow(x, fs);
    // NOTE: about 0.1 s on an idle core; the bound leaves room for a loaded test machine.
    expect(performance.now() - t).toBeLessThan(1500);
    expect([w.start, w.end]).toEqual([0, x.length]);
  });

  it('rejects bad options with the function name', () => {
    expect(() => captureSteadyWindow(new Float64Array(10), -1)).toThrow(refusedBy('captureSteadyWindow'));
    expect(() => captureSteadyWindow(new Float64Array(10), 48000, { smoothingBlocks: 4 })).toThrow(refusedBy('captureSteadyWindow'));
  });
});
