import type { JudgingSettings, MaskCheck, StimulusSpec } from '@earmark/contracts';
import type { AudioFormat, StoredCaptureFormat } from '@earmark/dsp';
import type { CapturePlotCore } from '../plots/render-capture-plot.js';

/** What the full decode of an upload tells the capture row (the samples stay in the thread). */
export interface UploadInspection {
  sampleRate: number;
  frames: number;
  channelCount: number;
  format: AudioFormat;
  /** SHA-256 (hex) of the uploaded bytes, hashed in the thread too. */
  sha256: string;
}

/** The tasks of `views.thread.ts`: their inputs and answers, shared by the callers and the thread. */
export interface ViewsTasks {
  inspectUpload: { input: { bytes: Uint8Array; encoding: { kind: 'wav' } | { kind: 'raw-float32'; sampleRate: number; channels: number } }; output: UploadInspection };
  renderPlot: { input: { bytes: Uint8Array; format: StoredCaptureFormat; settings: JudgingSettings; checks: MaskCheck[]; columns: number; channel: number; checkId?: string | null }; output: CapturePlotCore };
  renderCaptureWav: { input: { bytes: Uint8Array; format: StoredCaptureFormat; kind: 'capture' | 'residual'; stimulus: StimulusSpec | null }; output: Uint8Array };
  renderStimulusWav: { input: { spec: StimulusSpec }; output: { wav: Uint8Array; sha256: string } };
}

/** Where the pool loads the tasks from (TypeScript in development: the threads load it through tsx). */
export const VIEWS_THREAD_MODULE = new URL(`./views.thread.${import.meta.url.endsWith('.ts') ? 'ts' : 'js'}`, import.meta.url);

/** The part of a compute pool the services need: run a named task of `views.thread.ts`. */
export interface ViewsCompute {
  /** `transfer` moves buffers the caller gives up (see `ownBuffer`) instead of copying them. */
  run<K extends keyof ViewsTasks>(task: K, input: ViewsTasks[K]['input'], transfer?: ArrayBuffer[]): Promise<ViewsTasks[K]['output']>;
  /**
   * Decoded samples (frames × channels) a plot may be drawn from here. Larger captures get their
   * default plot from the worker's analysis thread only (it has the memory for them); other
   * views of them are refused rather than held for minutes at gigabytes.
   */
  maxPlotSamples?: number;
}

/** 2^22 samples (87 s mono or 44 s stereo at 48 kHz): about 350 MB at the ~84 bytes a sample drawing takes. */
export const DEFAULT_MAX_PLOT_SAMPLES = 2 ** 22;
