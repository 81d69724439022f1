import { createHash } from 'node:crypto';
import type { StimulusSpec } from '@earmark/contracts';
import { createSeededRandom, stimulusAsPlayed } from '@earmark/dsp';
import { addNoise, applyBiquad, clip, delay, peakingEqCoefficients, scaleDb } from '@earmark/dsp/testing';
import type { CaptureShape, DemoCapture } from './demo-story.js';

/**
 * The demo's captures as a real rig would record them: the played stimulus through the unit's
 * audio path (component tolerances, half a millisecond of latency, a 24-bit converter's noise
 * floor), then whatever the build or the rig did to it. Deterministic: every random number
 * comes from a generator seeded by the unit's name or the build's SHA.
 */

const BASE_LATENCY_SAMPLES = 24;
const NOISE_FLOOR_DBFS = -110;

/** A seed from a name: the same name always gives the same unit and the same noise. */
export function seedOf(name: string): number {
  return createHash('sha256').update(name).digest().readUInt32LE(0);
}

/**
 * A unit's tolerance ripple: four gentle peaking sections with centres and gains drawn around
 * nominal (σ 0.2 dB each, so about ±0.2–0.5 dB across the band), plus an output gain offset of σ 0.15 dB (the amplifier's tolerance).
 * Capacitor and driver spread look like this: smooth, unit-specific, never identical.
 */
function unitPath(x: Float64Array, unit: string, fs: number): Float64Array {
  const random = createSeededRandom(seedOf(`unit/${unit}`));
  let y = scaleDb(x, 0.15 * random.nextGaussian());
  // Nothing below 300 Hz: the bass belongs to the adaptive EQ, whose creep is part of the story.
  for (const hz of [520, 1600, 4500, 11_000]) {
    const centre = hz * 2 ** (0.25 * random.nextGaussian());
    y = applyBiquad(y, peakingEqCoefficients(fs, centre, 0.2 * random.nextGaussian(), 1.1));
  }
  return y;
}

function firmware(x: Float64Array, shape: CaptureShape, fs: number): Float64Array {
  switch (shape.kind) {
    case 'quantised-eq':
      return applyBiquad(x, peakingEqCoefficients(fs, shape.hz, shape.gainDb, 3));
    case 'bass-creep':
      return applyBiquad(x, peakingEqCoefficients(fs, 70, shape.gainDb, 0.8));
    case 'limiter-overshoot': {
      const y = x.slice();
      const gain = 10 ** (shape.overshootDb / 20);
      const end = Math.round(shape.seconds * fs) + BASE_LATENCY_SAMPLES;
      for (let i = 0; i < end && i < y.length; i++) y[i] = y[i]! * gain;
      return clip(y, 1);
    }
    default:
      return x;
  }
}

const played = new Map<string, Float64Array>();
function playedStimulus(spec: StimulusSpec): Float64Array {
  const key = JSON.stringify(spec);
  let x = played.get(key);
  if (!x) played.set(key, (x = stimulusAsPlayed(spec).channels[0]!));
  return x;
}

/** The samples the rig records for `capture` of a test case whose stimulus is `spec`. */
export function demoCaptureAudio(spec: StimulusSpec, capture: DemoCapture, seed: number): Float64Array {
  const fs = spec.sampleRate;
  const { shape } = capture;
  if (spec.kind === 'silence') {
    const frames = Math.round(spec.seconds * fs);
    return addNoise(new Float64Array(frames), shape.kind === 'hiss' ? shape.dbfs : NOISE_FLOOR_DBFS, seed);
  }
  const played = playedStimulus(spec);
  const latency = shape.kind === 'latency' ? Math.round((shape.ms / 1000) * fs) : BASE_LATENCY_SAMPLES;
  // The firmware's digital output is what clips, so its effects come after the analogue noise floor.
  const recorded = firmware(addNoise(unitPath(delay(played, latency), capture.unit, fs), NOISE_FLOOR_DBFS, seed), shape, fs);
  return shape.kind === 'truncated' ? recorded.slice(0, Math.round(shape.seconds * fs)) : recorded;
}
