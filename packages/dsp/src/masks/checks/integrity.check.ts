import type { CheckEvaluation, IntegrityCheck } from '@earmark/contracts';
import { checkChannels, combineOutcomes, minMaxOutcome, type ChannelOutcome } from '../check-outcome.js';
import type { CaptureContext } from '../../context/capture-context.js';

/** Default shortest dropout, ms (as the analyze report). */
export const DEFAULT_MIN_DROPOUT_MS = 1;

/** First positions listed in details, so a reader can find the events. */
const LISTED = 20;

/**
 * Time-domain integrity, each against `max`, from the same measures as the analyze report:
 * clipped samples (runs of ≥ 2 samples stuck at the record's extreme value, at full scale in
 * any format and on flat tops below it; with `clipThreshold`, only when that extreme reaches
 * it), |DC offset| in full-scale units, dropouts (gaps ≥ minDropoutMs at least 40 dB below the
 * signal on both sides, inside the capture) and discontinuities (outliers of a linear-prediction
 * residual against its local median).
 * @throws RangeError from engine preconditions (evaluateMask turns it into the check's error)
 * @see docs/analysis.md (clipped samples, dropouts, discontinuities); S. V. Vaseghi, "Advanced
 *   Digital Signal Processing and Noise Reduction", 4th ed., ch. 12 (impulsive noise, AR residual detection)
 */
export function evaluateIntegrity(ctx: CaptureContext, check: IntegrityCheck): CheckEvaluation {
  const outcomes: ChannelOutcome[] = checkChannels(ctx, check).map((channel) => {
    ctx.signal(channel);
    switch (check.metric) {
      case 'clipped-samples': {
        const c = ctx.clipping(channel);
        // With clipThreshold, only runs stuck at a level at or above it count (a flat top lower down is allowed).
        const extreme = Math.max(Math.abs(c.maxValue), Math.abs(c.minValue));
        const count = check.clipThreshold !== undefined && extreme < check.clipThreshold ? 0 : c.clippedSamples;
        return { ...minMaxOutcome(channel, count, undefined, check.max), details: { clippedRuns: c.clippedRuns, longestRun: c.longestRun, overFullScaleSamples: c.overFullScaleSamples, ...(check.clipThreshold !== undefined ? { clipThreshold: check.clipThreshold } : {}) } };
      }
      case 'dc-offset': {
        const dc = ctx.levels(channel).dcOffset;
        return { ...minMaxOutcome(channel, Math.abs(dc), undefined, check.max), details: { dcOffset: dc } };
      }
      case 'dropouts': {
        const runs = ctx.dropouts(channel, check.minDropoutMs ?? DEFAULT_MIN_DROPOUT_MS);
        return { ...minMaxOutcome(channel, runs.length, undefined, check.max), details: { dropouts: runs.slice(0, LISTED) } };
      }
      case 'discontinuities': {
        const at = ctx.discontinuities(channel);
        return { ...minMaxOutcome(channel, at.length, undefined, check.max), details: { discontinuities: at.slice(0, LISTED) } };
      }
    }
  });
  return combineOutcomes(check, check.metric === 'dc-offset' ? 'FS' : 'count', outcomes, { metric: check.metric });
}
