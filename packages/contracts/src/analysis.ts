import { z } from 'zod';

/**
 * The report of `earmark analyze` and of the analysis engine's `analyzeCapture`.
 * Conventions (docs/analysis.md): levels in dBFS with a full-scale sine = 0 dBFS RMS (AES17),
 * so RMS dBFS = 20·log10(rms·√2); a level of a silent signal (−∞ dB) is `null`; channels are
 * numbered from 0; frequencies in Hz; phase in degrees; times in ms unless named otherwise.
 */

/** A level in dB, or null where the level is −∞ (no signal) or undefined. */
const Db = z.number().nullable();

export const EnergyCheck = z.object({
  /** Σx² over the channel's samples. */
  time: z.number(),
  /** (1/N)·Σ|X[k]|² over the zero-padded FFT; equals `time` by Parseval. */
  frequency: z.number(),
  /** |frequency − time|/time (0 for silence): the engine's integrity check. */
  relativeError: z.number(),
});
export type EnergyCheck = z.infer<typeof EnergyCheck>;

export const BandLevel = z.object({
  /** IEC 61260-1 nominal mid-band frequency. */
  centerHz: z.number(),
  /** Exact base-10 mid-band frequency 1000·10^(3x/30). */
  exactCenterHz: z.number(),
  levelDbfs: Db,
});
export type BandLevel = z.infer<typeof BandLevel>;

export const Dropout = z.object({ startSample: z.number().int(), lengthSamples: z.number().int() });
export type Dropout = z.infer<typeof Dropout>;

export const TransferMagnitude = z.object({
  /** IEC 61260-1 nominal 1/3-octave mid-band frequency. */
  centerHz: z.number(),
  /** Energy-weighted mean of |H|² over the band, in dB. */
  db: z.number(),
});
export type TransferMagnitude = z.infer<typeof TransferMagnitude>;

/** Harmonic distortion of one 1/3-octave band, from a sweep's harmonic impulse responses (Farina 2000). */
export const DistortionAtFrequency = z.object({
  /** IEC 61260-1 nominal 1/3-octave mid-band frequency of the fundamental. */
  centerHz: z.number(),
  h2Percent: z.number().nullable(),
  h3Percent: z.number().nullable(),
  /** Harmonics 2…5 below Nyquist, %. */
  thdPercent: z.number().nullable(),
});
export type DistortionAtFrequency = z.infer<typeof DistortionAtFrequency>;

export const TransferAnalysis = z.object({
  /**
   * Estimator: `h1` (Welch-averaged Gxy/Gxx, for noise and multitones) or `deconvolution`
   * (sweeps: the linear impulse response after Farina, windowed away from its harmonic responses).
   */
  method: z.enum(['h1', 'deconvolution']),
  /** Capture delay against the reference in samples, with a fractional part (interpolated correlation peak). */
  latencySamples: z.number(),
  latencyMs: z.number(),
  /** Sign of the capture against the stimulus. */
  polarity: z.enum(['normal', 'inverted']),
  /** Smallest H1 coherence γ² over the band (0…1); null for deconvolution. */
  coherenceMin: z.number().nullable(),
  /** H2, H3 and THD per 1/3-octave band inside the swept range (sweeps only, else empty). */
  distortionVsFrequency: z.array(DistortionAtFrequency),
  /** Clock drift of the capture against the stimulus in ppm; null when the record is too short to show it. */
  driftPpm: z.number().nullable(),
  /** Band where |H| is within 20 dB of its maximum (or the caller's band), Hz. */
  bandHz: z.tuple([z.number(), z.number()]).nullable(),
  groupDelayMs: z.object({
    /** Mean group delay (latency included), from the slope of the weighted best-fit phase line. */
    mean: z.number().nullable(),
    /** Largest |τ(f) − mean| over the band. */
    maxDeviation: z.number().nullable(),
  }),
  /** Largest deviation of the unwrapped phase from its |H|-weighted best-fit line, degrees. */
  linearPhaseDeviationDeg: z.number().nullable(),
  /** |H| at the 1/3-octave centres where the reference has energy. */
  magnitudeDb: z.array(TransferMagnitude),
});
export type TransferAnalysis = z.infer<typeof TransferAnalysis>;

export const ChannelAnalysis = z.object({
  /** Channel index, from 0. */
  channel: z.number().int().min(0),
  /**
   * The steady part [start, end] in seconds that every distortion and noise measure used (the
   * stimulus's own steady part shifted by the latency, or a level plateau); null when none was found.
   */
  steadySeconds: z.tuple([z.number(), z.number()]).nullable(),
  /** Plain-word notes on anything that makes a number here less reliable. */
  warnings: z.array(z.string()),
  rmsDbfs: Db,
  peakDbfs: Db,
  crestFactorDb: Db,
  dcOffset: z.number(),
  /** Samples in runs stuck at the record's extreme value (flat tops at any level, float above 1.0 too). */
  clippedSamples: z.number().int().min(0),
  energy: EnergyCheck,
  /** Fitted fundamental; null when the capture holds no dominant tone. */
  fundamentalHz: z.number().nullable(),
  fundamentalDbfs: Db,
  /** Harmonics 2…10 below Nyquist relative to the fundamental, %; null when none lies below Nyquist. */
  thdPercent: z.number().nullable(),
  /** THD+N relative to the total signal through the AES17 20 kHz low-pass (20 Hz…min(20 kHz, fs/2)), dB. */
  thdnDb: Db,
  thdnPercent: z.number().nullable(),
  /** Fundamental over in-band noise (DC and harmonics 2…10 excluded), dB. */
  snrDb: Db,
  sinadDb: Db,
  /** (SINAD − 1.76)/6.02, IEEE Std 1241. */
  enob: z.number().nullable(),
  /** In-band power of what remains after DC, fundamental and harmonics, in dBFS. */
  noiseFloorDbfs: Db,
  /** The same, A-weighted (IEC 61672-1). */
  noiseFloorDbfsA: Db,
  /** 1/3-octave band levels (IEC 61260-1) from 25 Hz up to the last band below fs/2. */
  thirdOctaveBands: z.array(BandLevel),
  /** Gaps far below the local signal level inside the capture (not touching its start or end). */
  dropouts: z.array(Dropout),
  /** Sample indices where the signal departs from its own short-term prediction (clicks, steps). */
  discontinuities: z.array(z.number().int()),
  transfer: TransferAnalysis.optional(),
});
export type ChannelAnalysis = z.infer<typeof ChannelAnalysis>;

export const AnalysisReport = z.object({
  /** Version of the analysis engine that computed every number here. */
  engineVersion: z.string(),
  sampleRate: z.number().positive(),
  frames: z.number().int().min(0),
  channels: z.array(ChannelAnalysis),
});
export type AnalysisReport = z.infer<typeof AnalysisReport>;
