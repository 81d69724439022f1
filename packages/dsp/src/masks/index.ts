/** Tolerance-mask evaluation: pure functions over a parsed mask (contracts' MaskDocument). */
export { evaluateMask, maskContext } from './evaluate-mask.js';
export { validateMaskInput, type EvaluateMaskInput } from './mask-input.js';
export { MaskCheckError } from './mask-check-error.js';
export { maskPlotData, type MaskPlotData, type MaskPlotOptions } from './mask-plot-data.js';
export { interpolateLimit, sampleLimit, type LimitBreakpoint } from './limit-curve.js';
export { smoothFractionalOctave } from './octave-smoothing.js';
export { nearestOctaveBand } from './band-matching.js';
export { DB_FLOOR, DEFAULT_REFERENCE_HZ } from './spectral-curves.js';
export { DYNAMIC_RANGE_TONE_DBFS, DYNAMIC_RANGE_TONE_TOLERANCE_DB } from './checks/distortion.check.js';
export { DEFAULT_MIN_DROPOUT_MS } from './checks/integrity.check.js';
export type { FailingRegion } from './checks/magnitude-envelope.check.js';
export { deriveEnvelope, limitsFromCurves, simplifyPolyline, type DeriveEnvelopeInput, type DeriveEnvelopeOptions, type DerivedEnvelope, type EnvelopeLimits, type EnvelopeLimitSettings } from './derive-envelope.js';
export { DEFAULT_YIELD_GUARD_BANDS_DB, estimateYield, wilsonInterval, type ParametricRate, type RateInterval, type YieldAtGuard, type YieldEstimate, type YieldEstimateOptions } from './yield-estimate.js';
export { studentTUpperTail } from './student-t.js';
export { findGoldenOutliers, OUTLIER_MIN_OTHERS, type GoldenOutlier, type GoldenOutlierOptions, type OutlierRegion } from './golden-outliers.js';
export { twoDigitHz } from './rounded-limit.js';
