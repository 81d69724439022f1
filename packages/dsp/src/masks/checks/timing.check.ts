import type { CheckEvaluation, TimingCheck } from '@earmark/contracts';
import { checkChannels, combineOutcomes, minMaxOutcome, type ChannelOutcome } from '../check-outcome.js';
import { MaskCheckError } from '../mask-check-error.js';
import type { MaskContext } from '../mask-context.js';

/** Channel pairs [a, b] of an inter-channel check: its own, else each covered channel after the first. */
function pairsOf(ctx: MaskContext, check: TimingCheck): [number, number][] {
  if (check.pairs) return check.pairs.map(([a, b]) => [a, b]);
  const channels = checkChannels(ctx, check);
  const first = channels[0];
  if (first === undefined || channels.length < 2) throw new MaskCheckError(`inter-channel delay needs at least two channels (this check covers ${channels.length})`);
  return channels.slice(1).map((b) => [first, b]);
}

/**
 * Timing: latency of each channel against the stimulus, or the delay of channel b after
 * channel a, both in ms, signed (negative: the capture or b leads), at one-sample resolution:
 * the lag of the largest |cross-correlation|, computed by FFT, so a delayed copy reads exactly
 * its delay. For a symmetric limit give min = −x and max = x.
 * @throws MaskCheckError (caught by evaluateMask) without a stimulus (latency) or with fewer than two channels (inter-channel)
 * @see C. H. Knapp, G. C. Carter, IEEE Trans. ASSP 24(4), 1976 (cross-correlation delay estimation)
 */
export function evaluateTiming(ctx: MaskContext, check: TimingCheck): CheckEvaluation {
  const ms = (samples: number): number => (1000 * samples) / ctx.sampleRate;
  let outcomes: ChannelOutcome[];
  if (check.metric === 'latency-ms') {
    outcomes = checkChannels(ctx, check).map((channel) => {
      const lag = ctx.latency(channel);
      return { ...minMaxOutcome(channel, ms(lag), check.min, check.max), details: { latencySamples: lag } };
    });
  } else {
    outcomes = pairsOf(ctx, check).map(([a, b]) => {
      const lag = ctx.interChannelDelay(a, b);
      return { ...minMaxOutcome(b, ms(lag), check.min, check.max), details: { pair: [a, b], delaySamples: lag } };
    });
  }
  return combineOutcomes(check, 'ms', outcomes, { metric: check.metric, resolutionMs: ms(1) });
}
