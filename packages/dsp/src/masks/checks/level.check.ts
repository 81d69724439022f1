import type { CheckEvaluation, CheckUnit, LevelCheck } from '@earmark/contracts';
import { checkChannels, combineOutcomes, minMaxOutcome, type ChannelOutcome } from '../check-outcome.js';
import { MaskCheckError } from '../mask-check-error.js';
import type { CaptureContext } from '../../context/capture-context.js';
import { DB_FLOOR } from '../spectral-curves.js';

const UNITS: Record<LevelCheck['metric'], CheckUnit> = { 'rms-dbfs': 'dBFS', 'peak-dbfs': 'dBFS', 'crest-factor-db': 'dB', 'energy-parseval': 'ratio' };

/** [from, to) in samples of the check's time window (default the whole capture). */
function sampleRange(ctx: CaptureContext, check: LevelCheck): [number, number] {
  if (!check.timeSeconds) return [0, ctx.frames];
  const from = Math.round(check.timeSeconds[0] * ctx.sampleRate);
  const to = Math.min(ctx.frames, Math.round(check.timeSeconds[1] * ctx.sampleRate));
  if (to - from < 1) throw new MaskCheckError(`the window ${check.timeSeconds[0]}…${check.timeSeconds[1]} s holds no samples of the ${(ctx.frames / ctx.sampleRate).toFixed(3)} s capture`);
  return [from, to];
}

/**
 * Level and energy: RMS and peak in dBFS (AES17: a full-scale sine reads 0 dBFS; silence reads
 * −400), crest factor 20·log10(peak/rms) in dB, or the relative disagreement of the energy
 * computed in time (Σx²) and from the zero-padded FFT ((1/N)·Σ|X_k|², Parseval) — the analysis
 * checking itself.
 * @throws MaskCheckError (caught by evaluateMask) when the time window holds no samples
 * @see AES17-2020 (dBFS); Oppenheim & Schafer §8.6 (Parseval's relation)
 */
export function evaluateLevel(ctx: CaptureContext, check: LevelCheck): CheckEvaluation {
  const outcomes: ChannelOutcome[] = checkChannels(ctx, check).map((channel) => {
    if (check.metric === 'energy-parseval') return minMaxOutcome(channel, ctx.parsevalError(channel), undefined, check.max);
    const [from, to] = sampleRange(ctx, check);
    const levels = ctx.levels(channel, from, to);
    const value = check.metric === 'rms-dbfs' ? Math.max(levels.rmsDbfs, DB_FLOOR) : check.metric === 'peak-dbfs' ? Math.max(levels.peakDbfs, DB_FLOOR) : levels.crestFactorDb;
    const outcome = minMaxOutcome(channel, Number.isFinite(value) ? value : null, check.min, check.max);
    return outcome.measured === null ? { ...outcome, details: { reason: 'the capture is silent here, so its crest factor is undefined' } } : outcome;
  });
  return combineOutcomes(check, UNITS[check.metric], outcomes, { metric: check.metric, ...(check.timeSeconds ? { timeSeconds: check.timeSeconds } : {}) });
}
