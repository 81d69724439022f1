import { precondition } from '../util/preconditions.js';

/** Inputs of `checkStimulusCoverage`, all in samples of the capture's rate. */
export interface CoverageInput {
  stimulusLength: number;
  captureLength: number;
  /** Measured latency (fractional allowed; negative when the capture started late). */
  latencySamples: number;
  /** Decay the capture must also hold after the stimulus ends (default 0). */
  tailSamples?: number;
  /** When given, the warning also states seconds. */
  sampleRate?: number;
}

/** Whether a capture holds the whole stimulus once it is aligned. */
export interface StimulusCoverage {
  /** True when nothing of the stimulus (and tail) falls outside the capture. */
  covered: boolean;
  /** Stimulus samples played before the capture started (whole samples, rounded up). */
  missingAtStart: number;
  /** Stimulus (and tail) samples played after the capture ended (whole samples, rounded up). */
  missingAtEnd: number;
  /** Plain-word explanation, or null when covered. */
  warning: string | null;
}

function span(samples: number, sampleRate: number | undefined): string {
  return sampleRate !== undefined ? `${samples} samples (${(samples / sampleRate).toFixed(3)} s)` : `${samples} samples`;
}

/**
 * Checks that the aligned stimulus lies inside the capture: stimulus sample n sits at capture
 * index n + latency, so the capture must span [latency, latency + stimulusLength + tail). Why:
 * a transfer function computed from a capture that lost the end of a sweep lost its highest
 * frequencies (the sweep reaches them last) and reads tens of dB low there with no other sign.
 * @throws RangeError on negative or non-whole lengths, or a non-finite latency
 * @see closed form of the overlap of two intervals (no published method needed)
 */
export function checkStimulusCoverage(input: CoverageInput): StimulusCoverage {
  const fn = 'checkStimulusCoverage';
  const { stimulusLength, captureLength, latencySamples, sampleRate } = input;
  const tail = input.tailSamples ?? 0;
  precondition(Number.isInteger(stimulusLength) && stimulusLength >= 0, fn, `stimulusLength must be a whole number ≥ 0 (got ${stimulusLength})`);
  precondition(Number.isInteger(captureLength) && captureLength >= 0, fn, `captureLength must be a whole number ≥ 0 (got ${captureLength})`);
  precondition(Number.isInteger(tail) && tail >= 0, fn, `tailSamples must be a whole number ≥ 0 (got ${tail})`);
  precondition(Number.isFinite(latencySamples), fn, `latencySamples must be finite (got ${latencySamples})`);
  precondition(sampleRate === undefined || (Number.isFinite(sampleRate) && sampleRate > 0), fn, `sampleRate must be > 0 (got ${sampleRate})`);
  const needed = stimulusLength + tail;
  // A 1e-9 slack so a latency like 100.0000000001 from interpolation does not cost a sample.
  const missingAtStart = Math.min(needed, Math.max(0, Math.ceil(-latencySamples - 1e-9)));
  const missingAtEnd = Math.min(needed, Math.max(0, Math.ceil(latencySamples + needed - captureLength - 1e-9)));
  const covered = missingAtStart === 0 && missingAtEnd === 0;
  const parts: string[] = [];
  if (missingAtEnd > 0) {
    parts.push(
      `the capture ends ${span(missingAtEnd, sampleRate)} before the ${tail > 0 ? 'stimulus and its decay end' : 'stimulus ends'} ` +
        `(latency ${latencySamples.toFixed(2)} samples, stimulus ${stimulusLength}, capture ${captureLength})`,
    );
  }
  if (missingAtStart > 0) parts.push(`the capture starts ${span(missingAtStart, sampleRate)} after the stimulus starts`);
  const warning = covered
    ? null
    : `Incomplete capture: ${parts.join('; ')}. Results for the missing part of the stimulus (for a sweep, its highest or lowest frequencies) are not valid; record longer.`;
  return { covered, missingAtStart, missingAtEnd, warning };
}
