// A capture that does not contain its stimulus at all (the rig recorded idle noise, or another
// signal) must say so, with the correlation that decided it, instead of claiming a latency
// ("the capture starts … after the stimulus"). A capture whose stimulus really starts late keeps
// that message. Through evaluateMask only.
import { describe, expect, it } from 'vitest';
import { StimulusSpec } from '@earmark/contracts';
import { evaluateMask, stimulusAsPlayed } from '../../src/index.js';
import { STIMULUS_FOUND_MIN_CORRELATION } from '../../src/timing/latency.js';
import { gaussian, sine } from '../helpers/signals.js';
import { checkOf, checkWarnings, mask } from './real-capture-helpers.js';

const FS = 48000;
const SPEC = StimulusSpec.parse({ kind: 'sweep', sampleRate: FS, seconds: 2, levelDbfs: -6, from: 20, to: 20000, fadeInSeconds: 0.01, fadeOutSeconds: 0.01, silenceSeconds: 0.3 });
const REFERENCE = stimulusAsPlayed(SPEC);
const SWEEP = REFERENCE.channels[0] as Float64Array;
const CHECKS = mask(
  { id: 'env', kind: 'magnitude-envelope', measure: 'transfer', upper: [{ hz: 20, db: 10 }, { hz: 20000, db: 10 }], lower: [{ hz: 20, db: -10 }, { hz: 20000, db: -10 }] },
  { id: 'latency', kind: 'timing', metric: 'latency-ms', min: 0, max: 2000 },
);
/** "correlates at 0.009, under the 0.1": the figure that decided, read back from the sentence. */
const NOT_FOUND = /The stimulus was not found in the capture: its best alignment correlates at (\d\.\d{3}), under the 0\.1 a capture holding the stimulus reaches/;

const evaluate = (capture: Float64Array) => evaluateMask({ capture: { sampleRate: FS, channels: [capture] }, reference: REFERENCE }, CHECKS);

describe('a capture without its stimulus', () => {
  const cases: [string, Float64Array][] = [
    // White noise of σ = 0.1 (−17 dBFS, AES17), 0.1 s longer than the stimulus.
    ['pure noise', gaussian(SWEEP.length + 4800, 7, 0.1)],
    // A steady 440 Hz tone: periodic, so every lag correlates alike, and none with the sweep.
    ['an unrelated tone', sine(SWEEP.length + 4800, FS, 440, 0.3)],
  ];
  for (const [name, capture] of cases) {
    it(`${name}: the transfer and latency checks say the stimulus was not found, with the correlation under its threshold`, () => {
      const result = evaluate(capture);
      const env = checkOf(result, 'env');
      expect(env.measured).toBeNull();
      expect(env.error ?? '').toMatch(/^there is no transfer function to measure: /);
      const figure = Number(NOT_FOUND.exec(env.error ?? '')?.[1]);
      // Unrelated signals of ~10^5 samples: a few times 1/√N ≈ 0.003 at the best of the lags searched (0.000 for the tone).
      expect(figure).toBeGreaterThanOrEqual(0);
      expect(figure).toBeLessThan(STIMULUS_FOUND_MIN_CORRELATION);
      const latency = checkOf(result, 'latency');
      expect(latency.measured).toBeNull();
      expect(latency.error ?? '').toMatch(/^the latency of channel 0 cannot be measured: The stimulus was not found in the capture/);
      // Nothing claims a latency, a late start, a lead or a period that belong to noise.
      const said = [env.error, latency.error, ...checkWarnings(env), ...checkWarnings(latency)].join('\n');
      expect(said).not.toMatch(/after the stimulus starts|before the stimulus ends|leads the stimulus|ambiguous|Incomplete capture/);
      expect(result.verdict).toBe('error');
    });
  }

  it('a capture whose stimulus really starts late keeps the latency message', () => {
    // The recording began 0.2 s into the sweep (9600 samples): a real late start, not a missing stimulus.
    const late = SWEEP.slice(9600);
    const result = evaluate(late);
    const env = checkOf(result, 'env');
    expect(env.error ?? '').toMatch(
      /^the capture does not hold the whole stimulus after its latency, so H would be wrong where the stimulus is missing: Incomplete capture: the capture starts 9600 samples \(0\.200 s\) after the stimulus starts\./,
    );
    expect(env.error).not.toMatch(/not found/);
    // A copy of the stimulus from sample 9600 on: it leads by exactly 200 ms.
    expect(checkOf(result, 'latency').measured).toBeCloseTo(-200, 3);
  });
});
