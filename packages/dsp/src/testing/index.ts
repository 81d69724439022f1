/**
 * Test-signal helpers (`@earmark/dsp/testing`): pure functions that turn a stimulus into the
 * captures a firmware path might return — filtered, clipped, delayed, scaled, noisy — for
 * engine, worker and API tests. Not part of the analysis engine.
 */
export { applyBiquad, biquadResponse, lowPassBiquadCoefficients, peakingEqCoefficients, type BiquadCoefficients } from './biquad.js';
export { applyFir, firMagnitudeDb, windowedSincLowPass } from './fir.js';
export { addDc, addNoise, clip, delay, insertDropout, mapChannels, scaleDb, type TestAudio } from './signal-ops.js';
