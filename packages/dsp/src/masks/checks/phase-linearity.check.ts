import type { CheckEvaluation, PhaseLinearityCheck } from '@earmark/contracts';
import { checkChannels, combineOutcomes, minMaxOutcome, type ChannelOutcome } from '../check-outcome.js';
import { MaskCheckError } from '../mask-check-error.js';
import type { CaptureContext } from '../../context/capture-context.js';
import { GROUP_DELAY_GRID_FRACTION, groupDelayVariation } from '../phase-fit.js';

/**
 * Phase linearity over the band (the check's, else the test case's transfer band, else where
 * |H| is within 20 dB of its maximum): the largest deviation of the unwrapped phase from its
 * |H|-weighted least-squares line in degrees (the analyze report's linearPhaseDeviationDeg), and
 * the largest deviation of the group delay from its mean in ms, on a 1/24-octave grid. With both
 * limits the check passes only if both hold and reports the one with the smaller margin relative
 * to its limit; worstHz is where that deviation peaks.
 * @throws MaskCheckError (caught by evaluateMask) without a stimulus or with fewer than 3 measured bins in the band
 * @see Oppenheim & Schafer §5.1 (group delay, linear phase); docs/masks.md, "phase-linearity"
 */
export function evaluatePhaseLinearity(ctx: CaptureContext, check: PhaseLinearityCheck): CheckEvaluation {
  const band = check.bandHz ?? ctx.input.transferBandHz;
  const outcomes: ChannelOutcome[] = checkChannels(ctx, check).map((channel) => {
    ctx.signal(channel);
    const fit = ctx.phaseFit(channel, band);
    const gd = fit ? groupDelayVariation(fit, GROUP_DELAY_GRID_FRACTION) : null;
    if (!fit || !gd) throw new MaskCheckError(`too few frequencies with stimulus energy lie in the band${band ? ` ${band[0]}…${band[1]} Hz` : ''} to fit a phase line`);
    const parts: ChannelOutcome[] = [];
    if (check.maxDeviationDeg !== undefined) parts.push({ ...minMaxOutcome(channel, fit.maxDeviationDeg, undefined, check.maxDeviationDeg, fit.maxDeviationHz), unit: 'deg' });
    if (check.maxGroupDelayVariationMs !== undefined) parts.push({ ...minMaxOutcome(channel, 1000 * gd.seconds, undefined, check.maxGroupDelayVariationMs, gd.atHz), unit: 'ms' });
    if (parts.length === 0) throw new MaskCheckError('give maxDeviationDeg, maxGroupDelayVariationMs or both');
    const relative = (o: ChannelOutcome): number => (o.margin ?? -Infinity) / (o.limit ?? 1);
    const headline = parts.reduce((a, b) => (relative(b) < relative(a) ? b : a));
    return {
      ...headline,
      pass: parts.every((p) => p.pass),
      details: {
        bandHz: fit.bandHz,
        linearPhaseDeviationDeg: fit.maxDeviationDeg,
        groupDelayVariationMs: 1000 * gd.seconds,
        meanGroupDelayMs: 1000 * fit.meanDelaySeconds,
      },
    };
  });
  return combineOutcomes(check, check.maxDeviationDeg !== undefined ? 'deg' : 'ms', outcomes);
}
