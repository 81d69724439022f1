/** Earmark's analysis engine: pure signal processing over Float64Array, no I/O. */
export { ENGINE_VERSION } from './engine-version.js';

export * from './io/index.js';
export * from './stimulus/index.js';

// FFT
export { createComplexFftPlan, type ComplexFftPlan } from './fft/complex-fft.js';
export { createRealFftPlan, type RealFftPlan } from './fft/real-fft.js';
// Spectra
export { WINDOW_KINDS, applyWindow, coherentGain, createWindow, equivalentNoiseBandwidth, type WindowKind, type WindowSymmetry } from './spectrum/windows.js';
export { extractZeroPhase, placeZeroPhase, zeroPhaseCentre } from './spectrum/zero-phase.js';
export { amplitudeToDb, dbToAmplitude, magnitudesToDb, meanSquareToDbfs, powerToDb, rmsToDbfs } from './spectrum/db.js';
export { unwrapPhase } from './spectrum/unwrap.js';
export { amplitudeSpectrum, phaseOf, type AmplitudeSpectrum, type AmplitudeSpectrumOptions } from './spectrum/spectrum.js';
export { welchCrossSpectrum, welchPsd, type WelchCrossResult, type WelchOptions, type WelchResult } from './spectrum/welch.js';
export { argMax, refinePeak, type RefinedPeak } from './spectrum/peak.js';
// Measures
export { DEFAULT_CLIP_THRESHOLD, measureLevels, spectralEnergy, type SignalLevels } from './measures/levels.js';
export { fitHarmonics, fitSineFourParameter, subtractHarmonics, type HarmonicComponent, type HarmonicFit, type SineFit } from './measures/sine-fit.js';
export { defaultBand, estimatePeakFrequency, inBandPower, measureDistortion, type DistortionOptions, type DistortionResult } from './measures/distortion.js';
export { aWeightingDb, aWeightingGain } from './measures/a-weighting.js';
export { OCTAVE_RATIO, REFERENCE_FREQUENCY, bandLevels, fractionalOctaveBands, octaveBandCenter, type BandLevel, type OctaveBand, type OctaveFraction } from './measures/octave-bands.js';
export { detectDiscontinuities, detectDropouts, type DropoutRun } from './measures/integrity.js';
export { steadyStateRange, type SteadyStateOptions } from './measures/steady-state.js';
// Transfer
export { estimateLatency, fftConvolve, fftCrossCorrelate, type CrossCorrelation } from './transfer/fft-convolution.js';
export { filterGroupDelay, groupDelayFromPhase } from './transfer/group-delay.js';
export { estimateTransferFunction, impulseResponseByDeconvolution, type TransferFunction, type TransferFunctionOptions } from './transfer/transfer-function.js';
export { thirdOctaveMagnitudes } from './transfer/third-octave-magnitude.js';
// Synthesis
export { analyzeFrame, residualForListening, synthesizeFrame, type FrameSpectrum, type ResidualOptions } from './synthesis/resynthesis.js';
// Entry point: one capture context feeds the report, the verdict and the plots
export { CaptureContext, type ChannelDelay, type ChannelDistortion, type ChannelTiming, type ChannelTransfer, type SteadyWindow } from './context/capture-context.js';
export { captureCurves, waveformColumns, type CaptureCurves, type GroupDelayCurve, type PhaseCurve, type WaveformColumns } from './plots/capture-curves.js';
export { listeningResidual } from './synthesis/listening-residual.js';
export { analyzeCapture, type AnalyzeCaptureOptions, type AudioBuffers } from './analyze/analyze-capture.js';
// Tolerance masks
export * from './masks/index.js';
