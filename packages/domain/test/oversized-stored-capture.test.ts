import type { Capture, MaskRevision } from '@earmark/db';
import type { ObjectStore } from '@earmark/platform';
import { describe, expect, it } from 'vitest';
import { UnsupportedCaptureError } from '../src/errors.js';
import { judgeCapture } from '../src/judging/judge-capture.js';
import { CaptureAudioLoader } from '../src/services/capture-audio.js';

/**
 * A 64 MiB 8-bit mono WAV (67,108,864 samples) stored before the decoder had a sample bound.
 * Only the 44-byte header is written: the zero-filled pages behind it are never touched, so the
 * test costs no real memory unless the decoder reads the samples.
 */
function oversizedStoredWav(): Uint8Array {
  const dataBytes = 64 * 1024 * 1024;
  const bytes = new Uint8Array(44 + dataBytes);
  const v = new DataView(bytes.buffer);
  const ascii = (at: number, s: string) => [...s].forEach((c, i) => v.setUint8(at + i, c.charCodeAt(0)));
  ascii(0, 'RIFF');
  v.setUint32(4, 36 + dataBytes, true);
  ascii(8, 'WAVE');
  ascii(12, 'fmt ');
  v.setUint32(16, 16, true);
  v.setUint16(20, 1, true); // PCM
  v.setUint16(22, 1, true); // mono
  v.setUint32(24, 48000, true);
  v.setUint32(28, 48000, true);
  v.setUint16(32, 1, true); // block align
  v.setUint16(34, 8, true); // bits
  ascii(36, 'data');
  v.setUint32(40, dataBytes, true);
  return bytes;
}

const stimulus = { kind: 'sine', sampleRate: 48000, seconds: 0.25, frequency: 997, levelDbfs: -12 };
const capture = {
  id: 'c-oversized',
  objectKey: 'captures/alpha/abc/c-oversized.wav',
  format: { container: 'wav' },
  sampleRate: 48000,
  channelCount: 1,
  testCase: { key: 'tone', stimulus, analysis: {}, channelMap: [] },
  target: { key: 'board' },
} as unknown as Capture;
const mask = { checks: [{ id: 'level', kind: 'level', metric: 'rms-dbfs', min: -20, max: -6 }], settings: { stimulus, analysis: {}, channelMap: [] } } as unknown as MaskRevision;

describe('a stored capture over the decoder sample bound', () => {
  it('judges to an error verdict naming the count and the limit, instead of crashing the worker', () => {
    const judged = judgeCapture(oversizedStoredWav(), capture, mask);
    expect(judged.outcome).toBe('error');
    expect(judged.reason).toMatch(/^Analysis failed: The capture holds 67,108,864 samples \(67,108,864 frames × 1 channel\(s\)\); Earmark analyses at most 33,554,432 samples/);
  });

  it('is refused by the plot loader as an unsupported capture (422), not decoded', async () => {
    const bytes = Buffer.from(oversizedStoredWav().buffer);
    const store = { get: async () => bytes } as unknown as ObjectStore;
    const loading = new CaptureAudioLoader(store).load(capture);
    await expect(loading).rejects.toBeInstanceOf(UnsupportedCaptureError);
    await expect(loading).rejects.toMatchObject({
      kind: 'unsupported_capture',
      message: expect.stringMatching(/^Capture c-oversized cannot be analysed: The capture holds 67,108,864 samples .*at most 33,554,432/),
    });
  });
});
