import { StimulusSpec } from '@earmark/contracts';
import { generateStimulus } from '../src/index.js';

/** The big benchmark: a 10 s, 192 kHz, 8-channel capture of a sweep through eight slightly different paths. */
export const SWEEP_BENCH_RATE = 192000;
export const SWEEP_BENCH_CHANNELS = 8;

export function makeSweepCapture(): { reference: { sampleRate: number; channels: Float64Array[] }; capture: { sampleRate: number; channels: Float64Array[] } } {
  const fs = SWEEP_BENCH_RATE;
  const spec = StimulusSpec.parse({ kind: 'sweep', sampleRate: fs, seconds: 9.5, from: 20, to: 20000, levelDbfs: -6, silenceSeconds: 0.5, fadeInSeconds: 0.01, fadeOutSeconds: 0.01 });
  const ref = generateStimulus(spec).channels[0] as Float64Array;
  let s = 987654321;
  const channels = Array.from({ length: SWEEP_BENCH_CHANNELS }, (_, ch) => {
    // Latency of 100 + 7·ch samples, a gain per channel, mild cubic nonlinearity and dither-level noise.
    const lag = 100 + 7 * ch;
    const gain = 10 ** (-(ch * 0.25) / 20);
    const y = new Float64Array(ref.length);
    for (let i = 0; i < ref.length; i++) {
      s = (s * 1103515245 + 12345) % 2147483648;
      const v = i >= lag ? gain * (ref[i - lag] as number) : 0;
      y[i] = v + 0.01 * v * v * v + 2e-7 * (2 * (s / 2147483648) - 1);
    }
    return y;
  });
  return { reference: { sampleRate: fs, channels: [ref] }, capture: { sampleRate: fs, channels } };
}
