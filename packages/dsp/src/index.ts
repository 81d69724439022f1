/** Earmark's analysis engine: pure signal processing over Float64Array, no I/O. */
export { ENGINE_VERSION } from './engine-version.js';
export { EngineInputError } from './util/engine-input-error.js';

export * from './io/index.js';
export * from './stimulus/index.js';

// FFT
export { createComplexFftPlan, type ComplexFftPlan } from './fft/complex-fft.js';
export { createRealFftPlan, releaseFftPlans, type RealFftPlan } from './fft/real-fft.js';
// Spectra
export { WINDOW_KINDS, applyWindow, coherentGain, createWindow, equivalentNoiseBandwidth, type WindowKind, type WindowSymmetry } from './spectrum/windows.js';
export { extractZeroPhase, placeZeroPhase, zeroPhaseCentre } from './spectrum/zero-phase.js';
export { amplitudeToDb, dbToAmplitude, magnitudesToDb, meanSquareToDbfs, powerToDb, rmsToDbfs } from './spectrum/db.js';
export { unwrapPhase } from './spectrum/unwrap.js';
export { amplitudeSpectrum, phaseOf, type AmplitudeSpectrum, type AmplitudeSpectrumOptions } from './spectrum/spectrum.js';
export { welchCrossSpectrum, welchPsd, type WelchCrossResult, type WelchOptions, type WelchResult } from './spectrum/welch.js';
export { argMax, refinePeak, type RefinedPeak } from './spectrum/peak.js';
// Measures
export { measureLevels, spectralEnergy, type SignalLevels } from './measures/levels.js';
export { fitHarmonics, fitSineFourParameter, subtractHarmonics, type HarmonicComponent, type HarmonicFit, type SineFit } from './measures/sine-fit.js';
export { defaultBand, estimatePeakFrequency, harmonicResidual } from './measures/distortion.js';
export { AUDIO_BAND_KAISER_BETA, audioBandPower, audioBandToneResponse, createAudioBandPlan, resolveAudioBand, type AudioBandPlan, type AudioBandPower, type NoiseWeighting } from './measures/audio-band.js';
export { besselI0, kaiserMainLobeHalfWidth, kaiserTransform, kaiserWindow } from './measures/kaiser-window.js';
export { BAND_EDGE_TOLERANCE, computeToneMeasures, dynamicRangeDb, inBandInclusive, type ToneMeasures, type ToneMeasuresResult } from './measures/tone-measures.js';
export { captureSteadyWindow, stimulusSteadyWindow, type CaptureWindowOptions, type SteadyWindow, type StimulusWindowOptions } from './measures/steady-window.js';
export { measureToneDistortion, type ToneDistortionOptions, type ToneDistortionResult } from './measures/tone-distortion.js';
export { measureImdSmpte, type ImdSidebandPair, type ImdSmpteOptions, type ImdSmpteResult } from './measures/imd-smpte.js';
export { measureImdTwinTone, type ImdProduct, type ImdTwinToneOptions, type ImdTwinToneResult } from './measures/imd-twin-tone.js';
export { fitSinusoids, subtractSinusoids, type SinusoidComponent, type SinusoidFit } from './measures/imd-tone-fit.js';
export { measureCrosstalk, type CrosstalkBand, type CrosstalkChannel, type CrosstalkOptions, type CrosstalkResult } from './measures/crosstalk.js';
export { aWeightingDb, aWeightingGain } from './measures/a-weighting.js';
export { OCTAVE_RATIO, REFERENCE_FREQUENCY, bandLevels, fractionalOctaveBands, octaveBandCenter, type BandLevel, type OctaveBand, type OctaveFraction } from './measures/octave-bands.js';
export { detectClipping, type ClippingOptions, type ClippingReport } from './measures/clipping.js';
export { detectGlitches, type GlitchEvent, type GlitchOptions } from './measures/glitches.js';
export { levinsonDurbin, predictionResidual, type PredictionResidualOptions } from './measures/glitch-prediction.js';
export { detectDropoutGaps, type DropoutGap, type DropoutGapOptions } from './measures/dropout-gaps.js';
// Timing
export { measureLatency, type LatencyEstimate, type LatencyOptions } from './timing/latency.js';
export { interChannelDelay, interChannelDelays, type InterChannelOptions } from './timing/inter-channel.js';
export { measureClockDrift, type ClockDrift, type ClockDriftOptions } from './timing/clock-drift.js';
export { checkStimulusCoverage, type CoverageInput, type StimulusCoverage } from './timing/coverage.js';
export { weightedCrossCorrelation, type CorrelationPeak, type CorrelationWeighting, type WeightedCorrelationOptions } from './timing/weighted-cross-correlation.js';// Transfer
export { estimateLatency, fftConvolve, fftCrossCorrelate, type CrossCorrelation } from './transfer/fft-convolution.js';
export { filterGroupDelay, groupDelayFromPhase } from './transfer/group-delay.js';
export { estimateTransferFunction, impulseResponseByDeconvolution, type TransferFunction, type TransferFunctionOptions } from './transfer/transfer-function.js';
export { thirdOctaveMagnitudes } from './transfer/third-octave-magnitude.js';
export { detectExponentialSweep, type SweepDetectOptions, type SweepParameters } from './transfer/sweep-detect.js';
export { analyzeSweep, analyzeSweepCapture, prepareSweepDeconvolution, sweepFromParameters, type HarmonicResponse, type SweepAnalysis, type SweepAnalysisOptions, type SweepDeconvolver } from './transfer/sweep-analysis.js';
export { sweepDistortionByBand, type SweepBandDistortion, type SweepDistortionOptions } from './transfer/sweep-distortion.js';
export { coherence, minimumCoherence, type CoherenceOptions, type CoherenceResult, type MinimumCoherence } from './transfer/coherence.js';
// Synthesis
export { analyzeFrame, residualForListening, synthesizeFrame, type FrameSpectrum, type ResidualOptions } from './synthesis/resynthesis.js';
// Entry point: one capture context feeds the report, the verdict and the plots
export { CaptureContext, type ChannelDelay, type ChannelDistortion, type ChannelTiming, type ChannelTransfer, type WarningTopic } from './context/capture-context.js';
export { bandLevelSteps, type BandLevelStep } from './plots/band-level-steps.js';
export { captureCurves, waveformColumns, type CaptureCurves, type GroupDelayCurve, type PhaseCurve, type WaveformColumns } from './plots/capture-curves.js';
export { listeningResidual } from './synthesis/listening-residual.js';
export { analyzeCapture, type AnalyzeCaptureOptions, type AudioBuffers } from './analyze/analyze-capture.js';
// Tolerance masks
export * from './masks/index.js';
