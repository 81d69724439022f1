import type { MultitoneSpec, StimulusSpec, SweepSpec } from '@earmark/contracts';
import { applyFades } from './fade.js';
import { rmsFromDbfs, sineAmplitudeFromDbfs } from './level.js';
import { multitoneWave, randomPhases, schroederPhases, toneFrequencies } from './multitone.js';
import { pinkNoise } from './pink-noise.js';
import { createSeededRandom } from './seeded-random.js';
import { sineWave } from './sine.js';
import { StimulusError } from './stimulus-error.js';
import { exponentialSweep, farinaInverseFilter } from './sweep.js';
import { twoToneAmplitudes, twoToneWave } from './two-tone.js';
import { validateStimulusSpec } from './validate-stimulus-spec.js';
import { whiteNoise } from './white-noise.js';

/** A generated stimulus: one Float64Array per channel, full scale ±1. */
export interface GeneratedStimulus {
  sampleRate: number;
  channels: Float64Array[];
}

function frames(seconds: number, sampleRate: number): number {
  return Math.round(seconds * sampleRate);
}

function faded(x: Float64Array, spec: { fadeInSeconds: number; fadeOutSeconds: number; sampleRate: number }): Float64Array {
  const fin = frames(spec.fadeInSeconds, spec.sampleRate);
  const fout = Math.min(frames(spec.fadeOutSeconds, spec.sampleRate), x.length - fin);
  applyFades(x, fin, fout);
  return x;
}

/** The sweep as played, before trailing silence: level, then fades. */
function sweepBody(spec: SweepSpec): Float64Array {
  const x = exponentialSweep(spec.sampleRate, spec.from, spec.to, spec.seconds, sineAmplitudeFromDbfs(spec.levelDbfs));
  return faded(x, spec);
}

function multitoneFrequencies(spec: MultitoneSpec): Float64Array {
  if (spec.frequencies !== undefined) return Float64Array.from(spec.frequencies);
  return toneFrequencies(spec.from ?? 0, spec.to ?? 0, spec.count ?? 1, spec.spacing);
}

/** One channel (or, for independent noise, every channel) of the stimulus. */
function generateChannels(spec: StimulusSpec): Float64Array[] {
  const n = frames(spec.seconds, spec.sampleRate);
  switch (spec.kind) {
    case 'silence':
      return [new Float64Array(n)];
    case 'impulse': {
      const x = new Float64Array(n);
      x[spec.delaySamples] = sineAmplitudeFromDbfs(spec.levelDbfs);
      return [x];
    }
    case 'sine':
      return [faded(sineWave(n, spec.sampleRate, spec.frequency, sineAmplitudeFromDbfs(spec.levelDbfs)), spec)];
    case 'multitone': {
      const freqs = multitoneFrequencies(spec);
      const phases = spec.phases === 'schroeder' ? schroederPhases(freqs.length) : randomPhases(freqs.length, createSeededRandom(spec.seed));
      // Each tone gets amplitude 10^(L/20)/√K, so the sum has the RMS of one sine at L dBFS.
      const amplitude = sineAmplitudeFromDbfs(spec.levelDbfs) / Math.sqrt(freqs.length);
      return [faded(multitoneWave(n, spec.sampleRate, freqs, phases, amplitude), spec)];
    }
    case 'sweep': {
      const out = new Float64Array(n + frames(spec.silenceSeconds, spec.sampleRate));
      out.set(sweepBody(spec));
      return [out];
    }
    case 'white-noise':
    case 'pink-noise': {
      const random = createSeededRandom(spec.seed);
      const count = spec.independentChannels ? spec.channels : 1;
      const rms = rmsFromDbfs(spec.levelDbfs);
      const out: Float64Array[] = [];
      for (let c = 0; c < count; c++) {
        const x = spec.kind === 'white-noise' ? whiteNoise(n, rms, random) : pinkNoise(n, spec.sampleRate, rms, random);
        out.push(faded(x, spec));
      }
      return out;
    }
    case 'imd-smpte':
    case 'imd-twin-tone': {
      // Combined peak A_low + A_high at the level's sine peak; the twin tone is the 1:1 case.
      const a = twoToneAmplitudes(sineAmplitudeFromDbfs(spec.levelDbfs), spec.kind === 'imd-smpte' ? spec.ratio : 1);
      return [faded(twoToneWave(n, spec.sampleRate, spec.lowFrequency, a.low, spec.highFrequency, a.high), spec)];
    }
  }
}

/**
 * Generates a stimulus from its spec, deterministically: the same spec (seed included) gives
 * the same samples on every machine (IEEE-754 arithmetic; Math.sin/cos/exp may differ in the
 * last bit between JavaScript engines). Levels follow AES17: a sine at L dBFS has amplitude
 * 10^(L/20); noise and multitones have RMS 10^(L/20)/√2; an impulse's level is its peak; the
 * two-tone IMD signals have a combined peak A_low + A_high = 10^(L/20).
 * Every channel carries the same signal unless noise asks for `independentChannels` (channel
 * 1 is then the same as in the shared case). Methods: see sine.ts, multitone.ts (Schroeder
 * 1970), sweep.ts (Farina 2000), white-noise.ts, pink-noise.ts, two-tone.ts (IEC 60268-3).
 *
 * @throws StimulusError `invalid-spec` (names the field), `level-above-full-scale`
 *   (levelDbfs > 0) or `would-clip` (the signal's peak would exceed full scale, e.g. noise or
 *   a multitone at a level near 0 dBFS; the message gives the highest level that fits).
 */
export function generateStimulus(spec: StimulusSpec): GeneratedStimulus {
  validateStimulusSpec(spec);
  const made = generateChannels(spec);
  let peak = 0;
  for (const ch of made) for (let i = 0; i < ch.length; i++) peak = Math.max(peak, Math.abs(ch[i] as number));
  if (peak > 1 && spec.kind !== 'silence') {
    const over = 20 * Math.log10(peak);
    throw new StimulusError(
      'would-clip',
      `This ${spec.kind} at ${spec.levelDbfs} dBFS peaks ${over.toFixed(2)} dB above full scale and would clip; set levelDbfs to ${(Math.floor((spec.levelDbfs - over) * 100) / 100).toFixed(2)} or lower`,
    );
  }
  const channels: Float64Array[] = [];
  for (let c = 0; c < spec.channels; c++) {
    const source = made[c] ?? (made[0] as Float64Array);
    channels.push(c < made.length ? source : Float64Array.from(source));
  }
  return { sampleRate: spec.sampleRate, channels };
}

/**
 * The inverse filter of a sweep spec (Farina 2000): the sweep as played (level and fades
 * included, trailing silence excluded) time-reversed with a −6 dB/octave envelope, scaled so
 * that sweep ⊛ inverse has unit gain (0 dB) at the band centre √(from·to). Its length equals
 * the sweep's; the linear impulse response of a capture ⊛ inverse lands at index
 * round(seconds·fs) − 1 plus the system's latency.
 *
 * @throws StimulusError as generateStimulus does, for a spec that is not a valid sweep.
 */
export function sweepInverseFilter(spec: SweepSpec): Float64Array {
  if (spec.kind !== 'sweep') throw new StimulusError('invalid-spec', `Only a sweep has an inverse filter; this stimulus is a ${(spec as { kind: string }).kind}.`);
  validateStimulusSpec(spec);
  return farinaInverseFilter(sweepBody(spec), spec.sampleRate, spec.from, spec.to, spec.seconds);
}
