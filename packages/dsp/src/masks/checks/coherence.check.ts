import type { CheckEvaluation, CoherenceCheck } from '@earmark/contracts';
import type { CaptureContext } from '../../context/capture-context.js';
import { checkChannels, combineOutcomes, minMaxOutcome, type ChannelOutcome } from '../check-outcome.js';
import { MaskCheckError } from '../mask-check-error.js';

/**
 * The smallest H1 coherence γ² = |Gxy|²/(Gxx·Gyy) over the band (the check's, else the test
 * case's transfer band, else every bin where the stimulus has energy) against `min`. Low
 * coherence means the output holds much that the input does not explain: noise, distortion,
 * or a time-varying path — the magnitude checks are then less trustworthy.
 * @throws MaskCheckError (caught by evaluateMask) without a stimulus, or for a sweep (deconvolution has no coherence)
 * @see J. S. Bendat, A. G. Piersol, "Random Data", 4th ed., §9.2.3 (ordinary coherence)
 */
export function evaluateCoherence(ctx: CaptureContext, check: CoherenceCheck): CheckEvaluation {
  const band = check.bandHz ?? ctx.input.transferBandHz;
  const outcomes: ChannelOutcome[] = checkChannels(ctx, check).map((channel) => {
    const found = ctx.coherenceMinAt(channel, band);
    if (!found) throw new MaskCheckError('coherence is measured with an H1 estimate (noise or multitone stimuli); a sweep is analysed by deconvolution, which has none');
    return { ...minMaxOutcome(channel, found.value, check.min, undefined, found.hz), details: { bandHz: band ?? null } };
  });
  return combineOutcomes(check, 'ratio', outcomes);
}
