import type { StimulusSpec } from '@earmark/contracts';
import { generateStimulus } from './generate-stimulus.js';

/**
 * The stimulus as a rig plays it: generated from its spec and rounded to float32, because
 * the API serves stimuli as 32-bit float WAV. Captures are analysed against exactly this.
 * @throws StimulusError for an invalid spec
 */
export function stimulusAsPlayed(spec: StimulusSpec): { sampleRate: number; channels: Float64Array[] } {
  const { sampleRate, channels } = generateStimulus(spec);
  return { sampleRate, channels: channels.map((c) => Float64Array.from(c, Math.fround)) };
}
