import type { CheckEvaluation, CheckUnit, DistortionCheck } from '@earmark/contracts';
import { aWeightingGain } from '../../measures/a-weighting.js';
import type { DistortionResult } from '../../measures/distortion.js';
import { checkChannels, combineOutcomes, minMaxOutcome, type ChannelOutcome } from '../check-outcome.js';
import { MaskCheckError } from '../mask-check-error.js';
import type { CaptureContext } from '../../context/capture-context.js';
import { DB_FLOOR } from '../spectral-curves.js';

const UNITS: Record<DistortionCheck['metric'], CheckUnit> = { 'thd-percent': '%', 'thdn-db': 'dB', 'snr-db': 'dB', 'noise-floor-dbfs': 'dBFS', 'dynamic-range-db': 'dB' };

/** Level of the tone AES17 prescribes for dynamic range, and how far the capture's tone may be from it. */
export const DYNAMIC_RANGE_TONE_DBFS = -60;
export const DYNAMIC_RANGE_TONE_TOLERANCE_DB = 6;

const NO_TONE = 'no dominant tone in the capture (the fundamental carries less than half of the AC power), so tone measures are undefined';

/** In-band powers of one channel, weighted by g(f)² (1 for unweighted, A-weighting for `a`). */
interface BandPowers {
  fundamental: number;
  harmonics: number;
  noise: number;
}

/**
 * Powers inside the measurement band: the fundamental A₁²/2, the harmonics Σ A_k²/2 (k ≥ 2 in
 * band) and the residual noise; A-weighted, each component is scaled by |A(f)|² at its frequency
 * and the noise is measureDistortion's A-weighted in-band residual power — as a weighting filter
 * ahead of the meter would do (IEC 61672-1 annex E).
 */
function bandPowers(d: DistortionResult, weighted: boolean): BandPowers {
  const tone = d.tone;
  const [lo, hi] = d.bandHz;
  const inBand = (f: number): boolean => f >= lo && f <= hi;
  const g2 = (f: number): number => (weighted ? aWeightingGain(f) ** 2 : 1);
  const noise = weighted ? 10 ** (d.noiseFloorDbfsA / 10) / 2 : d.noisePower;
  if (!tone) return { fundamental: 0, harmonics: 0, noise };
  const fundamental = inBand(tone.fundamentalHz) ? (tone.amplitude ** 2 / 2) * g2(tone.fundamentalHz) : 0;
  const harmonics = tone.harmonics.filter((h) => inBand(h.frequencyHz)).reduce((s, h) => s + (h.amplitude ** 2 / 2) * g2(h.frequencyHz), 0);
  return { fundamental, harmonics, noise };
}

/** 10·log10(a/b) floored at DB_FLOOR; null when undefined (b = 0). */
function ratioDb(a: number, b: number): number | null {
  if (!(b > 0)) return null;
  return a > 0 ? Math.max(10 * Math.log10(a / b), DB_FLOOR) : DB_FLOOR;
}

/** The metric's value for one channel, or null with the reason it is undefined. */
function metricValue(d: DistortionResult, check: DistortionCheck): { value: number | null; reason?: string; toneDbfs?: number } {
  const weighted = check.metric === 'dynamic-range-db' || check.weighting === 'a';
  if (check.metric === 'noise-floor-dbfs') return { value: Math.max(weighted ? d.noiseFloorDbfsA : d.noiseFloorDbfs, DB_FLOOR) };
  const tone = d.tone;
  if (!tone) return { value: null, reason: NO_TONE };
  const toneDbfs = 20 * Math.log10(tone.amplitude);
  if (check.metric === 'thd-percent') return { value: tone.thdPercent, toneDbfs };
  const p = bandPowers(d, weighted);
  if (check.metric === 'snr-db') return { value: ratioDb(p.fundamental, p.noise), toneDbfs, ...(p.noise > 0 ? {} : { reason: 'no noise in band' }) };
  const thdn = ratioDb(p.noise + p.harmonics, p.noise + p.harmonics + p.fundamental);
  if (thdn === null) return { value: null, toneDbfs, reason: 'the band holds no signal' };
  if (check.metric === 'thdn-db') return { value: thdn, toneDbfs };
  // Dynamic range (AES17): A-weighted THD+N of a −60 dBFS tone, expressed against full scale:
  // −THD+N − L_tone (= −THD+N + 60 dB for a tone at exactly −60 dBFS).
  if (Math.abs(toneDbfs - DYNAMIC_RANGE_TONE_DBFS) > DYNAMIC_RANGE_TONE_TOLERANCE_DB) {
    throw new MaskCheckError(`dynamic range needs a single tone at ${DYNAMIC_RANGE_TONE_DBFS} dBFS (±${DYNAMIC_RANGE_TONE_TOLERANCE_DB} dB); the capture's tone is at ${toneDbfs.toFixed(1)} dBFS`);
  }
  return { value: -thdn - toneDbfs, toneDbfs };
}

/**
 * Distortion and noise from the four-parameter sine fit and joint harmonic fit of the analyze
 * report (one fit per channel and band, shared by every distortion check): THD (%), THD+N
 * relative to the total in-band signal (dB), SNR (dB), the in-band noise floor (dBFS), each
 * optionally A-weighted, and dynamic range in the AES17 manner (A-weighted THD+N of a −60 dBFS
 * tone, referred to full scale). A capture without a dominant tone fails tone measures with no
 * value (it is not an error: the firmware's output lacks the tone).
 * @throws MaskCheckError (caught by evaluateMask) for dynamic range without a tone near −60 dBFS, or a band above Nyquist
 * @see IEEE Std 1241-2010 §4.1.4, §4.5, §4.6; AES17-2020 §6.3 (THD+N), dynamic range; IEC 61672-1:2013 annex E
 */
export function evaluateDistortion(ctx: CaptureContext, check: DistortionCheck): CheckEvaluation {
  const outcomes: ChannelOutcome[] = checkChannels(ctx, check).map((channel) => {
    const d = ctx.distortion(channel, check.bandHz);
    const v = metricValue(d, check);
    if (v.value === null && check.metric === 'dynamic-range-db') throw new MaskCheckError(`dynamic range needs a single tone at ${DYNAMIC_RANGE_TONE_DBFS} dBFS: ${v.reason ?? NO_TONE}`);
    const outcome = minMaxOutcome(channel, v.value, check.min, check.max);
    return { ...outcome, details: { bandHz: d.bandHz, fundamentalHz: d.tone?.fundamentalHz ?? null, toneDbfs: v.toneDbfs ?? null, ...(v.reason ? { reason: v.reason } : {}) } };
  });
  return combineOutcomes(check, UNITS[check.metric], outcomes, { metric: check.metric, weighting: check.metric === 'dynamic-range-db' ? 'a' : (check.weighting ?? 'none') });
}
