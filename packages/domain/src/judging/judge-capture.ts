import { MaskDocument, type JudgingSettings } from '@earmark/contracts';
import { ENGINE_VERSION, decodeCapture, evaluateMask, maskContext, stimulusAsPlayed, type CaptureContext, type DecodedAudio, type StoredCaptureFormat } from '@earmark/dsp';
import type { Capture, MaskRevision } from '@earmark/db';
import { errorJudgement, failReason, type Judgement } from './judgement.js';
import { judgingSettingsFor } from './judging-settings.js';
import type { PlayedStimulus } from './stimulus-cache.js';

/** How the capture row says its bytes are stored, as the decoder needs it. */
export function storedFormatOf(capture: Pick<Capture, 'format' | 'sampleRate' | 'channelCount'>): StoredCaptureFormat {
  return { container: capture.format.container === 'raw-f32le' ? 'raw-f32le' : 'wav', sampleRate: capture.sampleRate, channels: capture.channelCount };
}

/** Decodes the stored bytes the way the API validated them. */
export function decodeStoredCapture(bytes: Uint8Array, capture: Pick<Capture, 'format' | 'sampleRate' | 'channelCount'>): DecodedAudio {
  return decodeCapture(bytes, storedFormatOf(capture));
}

/**
 * Everything the analysis of one capture needs besides its bytes, as plain data (it crosses
 * to a compute thread): the stored format, and the mask revision's settings and checks.
 */
export interface JudgeRequest {
  format: StoredCaptureFormat;
  settings: JudgingSettings;
  mask: MaskDocument;
}

/**
 * What judging a capture under `mask` needs, read from the rows (on the thread that holds
 * them): the revision's settings, never the test case's current ones — what a reviewer
 * approved is what judges. Answers the `error` judgement at once when there is nothing to
 * analyse against or the stored settings or checks no longer parse.
 */
export function judgeRequestFor(capture: Capture, mask: MaskRevision | null): JudgeRequest | Judgement {
  if (!mask) {
    return errorJudgement(`No approved mask is in force for test case ${capture.testCase.key} on target ${capture.target.key}.`, ENGINE_VERSION);
  }
  try {
    return { format: storedFormatOf(capture), settings: judgingSettingsFor(capture.testCase, mask), mask: MaskDocument.parse({ checks: mask.checks }) };
  } catch (error) {
    return analysisFailed(error);
  }
}

export const isJudgement = (plan: JudgeRequest | Judgement): plan is Judgement => 'outcome' in plan;

/** An error of the analysis itself, as the `error` judgement that records it. */
export const analysisFailed = (error: unknown): Judgement =>
  errorJudgement(`Analysis failed: ${error instanceof Error ? error.message : String(error)}`, ENGINE_VERSION);

/**
 * The capture context judging reads: pass it to `judgeAudio` and then to `renderDefaultPlot`, and
 * the plot reuses the verdict's measures (the transfer estimate) rather than computing them again.
 * @throws EngineInputError on input the engine refuses
 */
export function judgingContext(audio: DecodedAudio, reference: PlayedStimulus, request: JudgeRequest): CaptureContext {
  const { stimulus: spec, analysis: settings, channelMap } = request.settings;
  return maskContext({
    capture: audio,
    reference,
    transferMethod: settings.transferMethod ?? (spec.kind === 'sweep' ? 'deconvolution' : 'h1'),
    ...(channelMap.length ? { channels: channelMap } : {}),
    ...(settings.transferBandHz ? { transferBandHz: settings.transferBandHz } : {}),
  });
}

/**
 * Evaluates decoded audio against the request's checks and the played stimulus.
 * @throws EngineInputError and StimulusError on input the engine refuses
 */
export function judgeAudio(audio: DecodedAudio, reference: PlayedStimulus, request: JudgeRequest, context: CaptureContext = judgingContext(audio, reference, request)): Judgement {
  const evaluation = evaluateMask(context.input, request.mask, context);
  const checks = evaluation.checks.map(({ channel, error, details, ...check }) => ({ ...check, details: { ...details, channel, ...(error ? { error } : {}) } }));
  return {
    outcome: evaluation.verdict,
    reason: evaluation.verdict === 'fail' ? failReason(checks) : evaluation.reason,
    engineVersion: evaluation.engineVersion,
    checks,
  };
}

/**
 * Analyses one capture against a mask revision on the calling thread. Pure: bytes in,
 * judgement out; any error of the analysis itself becomes an `error` verdict. The worker runs
 * the same steps in a compute thread (`compute/analysis.thread.ts`, with a stimulus cache).
 */
export function judgeCapture(bytes: Uint8Array, capture: Capture, mask: MaskRevision | null): Judgement {
  const request = judgeRequestFor(capture, mask);
  if (isJudgement(request)) return request;
  try {
    return judgeAudio(decodeCapture(bytes, request.format), stimulusAsPlayed(request.settings.stimulus), request);
  } catch (error) {
    return analysisFailed(error);
  }
}
