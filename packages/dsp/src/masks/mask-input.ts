import type { AudioBuffers } from '../analyze/analyze-capture.js';
import { precondition, requirePositive } from '../util/preconditions.js';
import { EngineInputError } from '../util/engine-input-error.js';

/** What a mask is evaluated on: a capture and, for checks that need it, the stimulus it answers. */
export interface EvaluateMaskInput {
  capture: AudioBuffers;
  /** The stimulus as played; mono applies to every capture channel. */
  reference?: AudioBuffers;
  /** Transfer estimator (default `h1`; `deconvolution` for sweeps), as in `analyzeCapture`. */
  transferMethod?: 'h1' | 'deconvolution';
  /** Channels analysed (default all), 0-based; a check without `channels` covers these. */
  channels?: readonly number[];
  /** Default band of phase-linearity checks that give none (the test case's transfer band). */
  transferBandHz?: readonly [number, number];
}

/**
 * Checks the parts of the input every evaluation relies on. Problems a single check can have
 * (a missing reference, a channel a check names that the capture lacks) are not thrown here:
 * they become that check's `error`.
 * @throws EngineInputError (a RangeError whose `fn` is the caller's name) on a bad sample rate, no channels, unequal channel lengths,
 *   non-finite samples, a reference at another sample rate or too short, or a bad channel list
 */
export function validateMaskInput(input: EvaluateMaskInput, fn: string): number[] {
  const { capture, reference } = input;
  requirePositive(capture.sampleRate, fn, "the capture's sample rate");
  precondition(capture.channels.length >= 1, fn, 'the capture has no channels');
  const frames = capture.channels[0]?.length ?? 0;
  precondition(frames >= 2, fn, `the capture must hold at least 2 frames (got ${frames})`);
  capture.channels.forEach((c, i) => {
    precondition(c.length === frames, fn, `capture channel ${i} holds ${c.length} frames, channel 0 holds ${frames}`);
    for (let j = 0; j < c.length; j++) if (!Number.isFinite(c[j] as number)) throw new EngineInputError(fn, `sample ${j} of capture channel ${i} is ${c[j]}; only finite samples can be analysed`);
  });
  if (reference) {
    precondition(reference.sampleRate === capture.sampleRate, fn, `the capture is sampled at ${capture.sampleRate} Hz but the stimulus is rendered at ${reference.sampleRate} Hz`);
    precondition(reference.channels.length >= 1 && (reference.channels[0]?.length ?? 0) >= 16, fn, 'the stimulus must hold at least 16 frames');
    reference.channels.forEach((c, i) => {
      for (let j = 0; j < c.length; j++) if (!Number.isFinite(c[j] as number)) throw new EngineInputError(fn, `sample ${j} of stimulus channel ${i} is ${c[j]}; only finite samples can be analysed`);
    });
  }
  if (input.transferBandHz) {
    const [lo, hi] = input.transferBandHz;
    precondition(lo > 0 && hi > lo, fn, `the transfer band must satisfy 0 < low < high (got ${lo}…${hi} Hz)`);
  }
  const selected = input.channels ? [...input.channels] : capture.channels.map((_, i) => i);
  precondition(selected.length >= 1, fn, 'the channel map must name at least one channel');
  for (const c of selected) precondition(Number.isInteger(c) && c >= 0 && c < capture.channels.length, fn, `the channel map names channel ${c} (counting from 0) but the capture has ${capture.channels.length} channel${capture.channels.length === 1 ? '' : 's'}`);
  return selected;
}
