import { StimulusSpec } from '@earmark/contracts';
import type { StoredJudgingSettings, TestCase } from '@earmark/db';
import { UnsupportedCaptureError } from '../errors.js';

/** What a capture of a test case must be for the judge to analyse it. */
export interface CaptureRequirements {
  /** The rate the stimulus is rendered at; the judge compares the capture with that reference sample by sample. */
  sampleRate: number;
  /** Channels the channel map reads (highest 0-based index + 1); 1 when the map is empty (every channel is analysed). */
  minChannels: number;
  /** The channel map as read, for messages. */
  channelMap: readonly number[];
}

/**
 * What a capture must be under the settings it will be judged with: those of the mask revision
 * in force for its target (`storedSettingsFor`), the test case's own when no mask exists.
 */
export function captureRequirementsOf(settings: Pick<StoredJudgingSettings, 'stimulus' | 'channelMap'>): CaptureRequirements {
  const { sampleRate } = StimulusSpec.parse(settings.stimulus);
  const channelMap = settings.channelMap;
  return { sampleRate, minChannels: channelMap.length ? Math.max(...channelMap) + 1 : 1, channelMap };
}

/**
 * Refuses a decoded capture the judge could only answer with `error`: one sampled at another
 * rate than the test case's stimulus, or with fewer channels than its channel map reads.
 * @throws UnsupportedCaptureError `sample-rate-mismatch` or `channel-count-mismatch`
 */
export function assertCaptureFitsTestCase(
  audio: { sampleRate: number; channelCount: number },
  testCase: Pick<TestCase, 'key'>,
  settings: Pick<StoredJudgingSettings, 'stimulus' | 'channelMap'>,
): void {
  const needs = captureRequirementsOf(settings);
  if (audio.sampleRate !== needs.sampleRate) {
    throw new UnsupportedCaptureError(
      `The capture is sampled at ${audio.sampleRate} Hz but test case ${testCase.key}'s stimulus is rendered at ${needs.sampleRate} Hz.`,
      'sample-rate-mismatch',
    );
  }
  if (audio.channelCount < needs.minChannels) {
    const has = `${audio.channelCount} channel${audio.channelCount === 1 ? '' : 's'}`;
    throw new UnsupportedCaptureError(
      `The capture has ${has} but test case ${testCase.key}'s channel map [${needs.channelMap.join(', ')}] reads channel ${needs.minChannels - 1} (counting from 0), so it needs at least ${needs.minChannels}.`,
      'channel-count-mismatch',
    );
  }
}
