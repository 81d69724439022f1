/**
 * The API's compute thread: every task is a pure function of plain data (bytes in as a
 * Uint8Array, results as plain objects or bytes), so the event loop that answers requests never
 * decodes, transforms or renders audio. Loaded by `createComputePool` (packages/platform).
 */
import { createHash } from 'node:crypto';
import { setFlagsFromString } from 'node:v8';
import { runInNewContext } from 'node:vm';
import { JudgingSettings, MaskCheck, StimulusSpec } from '@earmark/contracts';
import { decodeCapture, decodeRawFloat32, decodeWav, encodeWav, listeningResidual, releaseFftPlans, stimulusAsPlayed, type StoredCaptureFormat } from '@earmark/dsp';
import { defineComputeTasks } from '@earmark/platform';
import { renderCapturePlot, type CapturePlotCore } from '../plots/render-capture-plot.js';
import type { UploadInspection, ViewsTasks } from './views-tasks.js';

// Hashing tens of megabytes takes a noticeable time too: done here, not on the event loop.
const sha256Of = (bytes: Uint8Array) => createHash('sha256').update(bytes).digest('hex');
const asFloat32Wav = (channels: Float64Array[], sampleRate: number) => encodeWav(channels, sampleRate, { encoding: 'float', bitsPerSample: 32 });

const tasks = {
  /** Decodes every sample of an upload (the full validation) and answers only what the row stores. */
  inspectUpload(input: ViewsTasks['inspectUpload']['input']): UploadInspection {
    const audio = input.encoding.kind === 'wav' ? decodeWav(input.bytes) : decodeRawFloat32(input.bytes, { sampleRate: input.encoding.sampleRate, channels: input.encoding.channels });
    return { sampleRate: audio.sampleRate, frames: audio.frames, channelCount: audio.channels.length, format: audio.format, sha256: sha256Of(input.bytes) };
  },
  renderPlot(input: ViewsTasks['renderPlot']['input']): CapturePlotCore {
    const audio = decodeCapture(input.bytes, input.format);
    return renderCapturePlot(audio, JudgingSettings.parse(input.settings), input.checks.map((c) => MaskCheck.parse(c)), { columns: input.columns, channel: input.channel, checkId: input.checkId ?? null });
  },
  /** The capture as 32-bit float WAV, or its residual against the stimulus as played. */
  renderCaptureWav(input: ViewsTasks['renderCaptureWav']['input']): Uint8Array {
    const audio = decodeCapture(input.bytes, input.format as StoredCaptureFormat);
    if (input.kind === 'capture') return asFloat32Wav(audio.channels, audio.sampleRate);
    const spec = StimulusSpec.parse(input.stimulus);
    return asFloat32Wav(listeningResidual(audio, spec.kind === 'silence' ? null : stimulusAsPlayed(spec), spec.kind), audio.sampleRate);
  },
  /** The stimulus exactly as rigs play it: 32-bit float WAV. */
  renderStimulusWav(input: ViewsTasks['renderStimulusWav']['input']): ViewsTasks['renderStimulusWav']['output'] {
    const { sampleRate, channels } = stimulusAsPlayed(StimulusSpec.parse(input.spec));
    const wav = asFloat32Wav(channels, sampleRate);
    return { wav, sha256: sha256Of(wav) };
  },
};

/**
 * After each large task, the engine's cached FFT plans are dropped and a full collection runs:
 * their buffers (hundreds of MB for a long capture or stimulus) live outside the V8 heap, so without it they stay resident until allocation in this
 * thread happens to trigger one, and the API's memory stays at its high-water mark. Synchronous,
 * because an idle pool thread sleeps in Atomics.wait and runs no timers.
 */
setFlagsFromString('--expose-gc');
const collect = runInNewContext('gc') as () => void;
const LARGE_TASK_BYTES = 8 * 1024 * 1024;
const collectingAfter =
  <I, O>(task: (input: I) => O, bytesOf: (input: I, output: O | undefined) => number) =>
  (input: I): O => {
    let output: O | undefined;
    try {
      output = task(input);
      return output;
    } finally {
      if (bytesOf(input, output) >= LARGE_TASK_BYTES) {
        releaseFftPlans();
        collect();
      }
    }
  };
const inputBytes = (input: { bytes: Uint8Array }) => input.bytes.byteLength;

export const { inspectUpload, renderPlot, renderCaptureWav, renderStimulusWav } = defineComputeTasks({
  inspectUpload: collectingAfter(tasks.inspectUpload, inputBytes),
  renderPlot: collectingAfter(tasks.renderPlot, inputBytes),
  renderCaptureWav: collectingAfter(tasks.renderCaptureWav, inputBytes),
  renderStimulusWav: collectingAfter(tasks.renderStimulusWav, (_, output) => output?.wav.byteLength ?? LARGE_TASK_BYTES),
});
