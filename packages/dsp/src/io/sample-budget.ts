import { AudioDecodeError } from './audio-decode-error.js';
import type { DecodeLimits } from './audio-limits.js';

/**
 * Refuses a capture whose frames × channels exceed the decode limit, before any sample buffer
 * is allocated (each sample costs 8 bytes decoded).
 * @throws AudioDecodeError `too-many-samples`
 */
export function assertWithinSampleBudget(frames: number, channels: number, limits: DecodeLimits): void {
  const samples = frames * channels;
  if (samples <= limits.maxSamples) return;
  throw new AudioDecodeError(
    'too-many-samples',
    `The capture holds ${samples.toLocaleString('en-US')} samples (${frames.toLocaleString('en-US')} frames × ${channels} channel(s)); ` +
      `Earmark analyses at most ${limits.maxSamples.toLocaleString('en-US')} samples per capture. ` +
      'Upload a shorter capture or fewer channels.',
  );
}
