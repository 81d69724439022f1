import { MaskDocument } from '@earmark/contracts';
import { ENGINE_VERSION, decodeCapture, evaluateMask, stimulusAsPlayed, type DecodedAudio } from '@earmark/dsp';
import type { Capture, MaskRevision } from '@earmark/db';
import { errorJudgement, type Judgement } from './judgement.js';
import { judgingSettingsFor } from './judging-settings.js';

/** Decodes the stored bytes the way the API validated them. */
export function decodeStoredCapture(bytes: Uint8Array, capture: Pick<Capture, 'format' | 'sampleRate' | 'channelCount'>): DecodedAudio {
  const container = capture.format.container === 'raw-f32le' ? 'raw-f32le' : 'wav';
  return decodeCapture(bytes, { container, sampleRate: capture.sampleRate, channels: capture.channelCount });
}

/**
 * Analyses one capture against a mask revision with that revision's settings (stimulus,
 * analysis settings, channel map), never the test case's current ones: what a reviewer
 * approved is what judges. Pure: bytes in, judgement out. Any error of the analysis itself
 * becomes an `error` verdict.
 */
export function judgeCapture(bytes: Uint8Array, capture: Capture, mask: MaskRevision | null): Judgement {
  if (!mask) {
    return errorJudgement(`No approved mask is in force for test case ${capture.testCase.key} on target ${capture.target.key}.`, ENGINE_VERSION);
  }
  try {
    const audio = decodeStoredCapture(bytes, capture);
    const { stimulus: spec, analysis: settings, channelMap } = judgingSettingsFor(capture.testCase, mask);
    const reference = stimulusAsPlayed(spec);
    const document = MaskDocument.parse({ checks: mask.checks });
    const evaluation = evaluateMask(
      {
        capture: audio,
        reference,
        transferMethod: settings.transferMethod ?? (spec.kind === 'sweep' ? 'deconvolution' : 'h1'),
        ...(channelMap.length ? { channels: channelMap } : {}),
        ...(settings.transferBandHz ? { transferBandHz: settings.transferBandHz } : {}),
      },
      document,
    );
    return {
      outcome: evaluation.verdict,
      reason: evaluation.reason,
      engineVersion: evaluation.engineVersion,
      checks: evaluation.checks.map(({ channel, error, details, ...check }) => ({ ...check, details: { ...details, channel, ...(error ? { error } : {}) } })),
    };
  } catch (error) {
    return errorJudgement(`Analysis failed: ${error instanceof Error ? error.message : String(error)}`, ENGINE_VERSION);
  }
}
