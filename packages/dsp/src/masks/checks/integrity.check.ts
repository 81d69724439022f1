import type { CheckEvaluation, IntegrityCheck } from '@earmark/contracts';
import { detectDiscontinuities, detectDropouts } from '../../measures/integrity.js';
import { DEFAULT_CLIP_THRESHOLD } from '../../measures/levels.js';
import { checkChannels, combineOutcomes, minMaxOutcome, type ChannelOutcome } from '../check-outcome.js';
import type { CaptureContext } from '../../context/capture-context.js';

/** Default shortest dropout, ms (as the analyze report). */
export const DEFAULT_MIN_DROPOUT_MS = 1;

/** First positions listed in details, so a reader can find the events. */
const LISTED = 20;

/**
 * Time-domain integrity, each against `max`: the count of samples with |x| ≥ clipThreshold
 * (default 32767/32768, the largest 16-bit code), |DC offset| in full-scale units (the mean;
 * 1 = full scale), the count of dropouts (runs of ≥ minDropoutMs of digital zero inside the
 * capture) and the count of discontinuities (second-difference outliers), as in the analyze report.
 * @throws RangeError from engine preconditions (evaluateMask turns it into the check's error)
 * @see docs/analysis.md (clipped samples, dropouts, discontinuities); S. V. Vaseghi, "Advanced
 *   Digital Signal Processing and Noise Reduction", ch. 12 (impulsive disturbances)
 */
export function evaluateIntegrity(ctx: CaptureContext, check: IntegrityCheck): CheckEvaluation {
  const outcomes: ChannelOutcome[] = checkChannels(ctx, check).map((channel) => {
    const x = ctx.signal(channel);
    switch (check.metric) {
      case 'clipped-samples': {
        const threshold = check.clipThreshold ?? DEFAULT_CLIP_THRESHOLD;
        return { ...minMaxOutcome(channel, ctx.levels(channel, 0, ctx.frames, threshold).clippedSamples, undefined, check.max), details: { clipThreshold: threshold } };
      }
      case 'dc-offset': {
        const dc = ctx.levels(channel).dcOffset;
        return { ...minMaxOutcome(channel, Math.abs(dc), undefined, check.max), details: { dcOffset: dc } };
      }
      case 'dropouts': {
        const runs = detectDropouts(x, ctx.sampleRate, check.minDropoutMs ?? DEFAULT_MIN_DROPOUT_MS);
        return { ...minMaxOutcome(channel, runs.length, undefined, check.max), details: { dropouts: runs.slice(0, LISTED) } };
      }
      case 'discontinuities': {
        const at = detectDiscontinuities(x);
        return { ...minMaxOutcome(channel, at.length, undefined, check.max), details: { discontinuities: at.slice(0, LISTED) } };
      }
    }
  });
  return combineOutcomes(check, check.metric === 'dc-offset' ? 'FS' : 'count', outcomes, { metric: check.metric });
}
