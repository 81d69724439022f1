import type { Capture, MaskRevision } from '@earmark/db';
import { encodeWav } from '@earmark/dsp';
import { describe, expect, it } from 'vitest';
import { judgeCapture } from '../src/judging/judge-capture.js';
import { judgingSettingsFor, settingsToRecord } from '../src/judging/judging-settings.js';

/** judgeCapture reads stimulus, analysis settings and channel map from the revision it judges under. */
const stimulus = { kind: 'sine', sampleRate: 48000, seconds: 0.25, frequency: 997, levelDbfs: -12 };
const sine = (dbfs: number, frames = 12000) => Float64Array.from({ length: frames }, (_, i) => 10 ** (dbfs / 20) * Math.sin((2 * Math.PI * 997 * i) / 48000));
// Channel 0 at −12 dBFS, channel 1 at −30 dBFS: the channel map decides which one is measured.
const bytes = encodeWav([sine(-12), sine(-30)], 48000);

const capture = {
  format: { container: 'wav' },
  sampleRate: 48000,
  channelCount: 2,
  testCase: { key: 'tone', stimulus, analysis: {}, channelMap: [0] },
  target: { key: 'board' },
} as unknown as Capture;

const mask = (channelMap: number[]) =>
  ({ checks: [{ id: 'level', kind: 'level', metric: 'rms-dbfs', min: -20, max: -6 }], settings: { stimulus, analysis: {}, channelMap } }) as unknown as MaskRevision;

describe('judgeCapture', () => {
  it("measures the revision's channel map, not the test case's", () => {
    const underTestCaseMap = judgeCapture(bytes, capture, mask([0]));
    const underRevisionMap = judgeCapture(bytes, capture, mask([1]));
    expect(underTestCaseMap.outcome).toBe('pass');
    expect(underRevisionMap.outcome).toBe('fail');
    expect(underRevisionMap.checks).toHaveLength(1);
    expect(underRevisionMap.checks[0]!.details.channel).toBe(1);
    // The reason gives the margin in the shared formatter's words: a dBFS level's margin is in dB.
    expect(underRevisionMap.reason).toMatch(/^1 of 1 checks failed: level \(margin \u22121[03]\.\d\d dB\)$/);
    // 30 dB quieter: the sine's level on channel 1 (AES17 or plain RMS, the difference is what matters).
    expect(underTestCaseMap.checks[0]!.measured! - underRevisionMap.checks[0]!.measured!).toBeCloseTo(18, 1);
  });

  it("renders the revision's stimulus as the reference, not the test case's", () => {
    const at96k = { ...mask([0]), settings: { stimulus: { ...stimulus, sampleRate: 96000 }, analysis: {}, channelMap: [0] } } as unknown as MaskRevision;
    const judged = judgeCapture(bytes, capture, at96k);
    // The test case's 48 kHz tone would have judged this 48 kHz capture; the revision's 96 kHz one cannot.
    expect(judged.outcome).toBe('error');
    expect(judged.reason).toContain('the capture is sampled at 48000 Hz but the stimulus is rendered at 96000 Hz');
  });

  it('answers error with the reason when no mask is in force', () => {
    const judged = judgeCapture(bytes, capture, null);
    expect(judged).toMatchObject({ outcome: 'error', reason: 'No approved mask is in force for test case tone on target board.', checks: [] });
  });
});

describe('the settings a verdict records', () => {
  it("are the revision's with the schema defaults filled in, or the test case's when there is no mask", () => {
    expect(settingsToRecord(capture.testCase, mask([1]))).toEqual({
      stimulus: { ...stimulus, channels: 1, fadeInSeconds: 0, fadeOutSeconds: 0 },
      analysis: {},
      channelMap: [1],
    });
    expect(judgingSettingsFor(capture.testCase, null).channelMap).toEqual([0]);
  });

  it('are recorded as stored when they no longer fit the schemas (the verdict then says why it is an error)', () => {
    const broken = { ...mask([0]), settings: { stimulus: { kind: 'warble' }, analysis: {}, channelMap: [0] } } as unknown as MaskRevision;
    expect(settingsToRecord(capture.testCase, broken)).toEqual({ stimulus: { kind: 'warble' }, analysis: {}, channelMap: [0] });
    expect(judgeCapture(bytes, capture, broken)).toMatchObject({ outcome: 'error', reason: expect.stringMatching(/^Analysis failed: /) });
  });
});
