import type { CheckEvaluation, TimingCheck } from '@earmark/contracts';
import { checkChannels, combineOutcomes, minMaxOutcome, type ChannelOutcome } from '../check-outcome.js';
import { MaskCheckError } from '../mask-check-error.js';
import type { CaptureContext } from '../../context/capture-context.js';

/** Channel pairs [a, b] of an inter-channel check: its own, else each covered channel after the first. */
function pairsOf(ctx: CaptureContext, check: TimingCheck): [number, number][] {
  if (check.pairs) return check.pairs.map(([a, b]) => [a, b]);
  const channels = checkChannels(ctx, check);
  const first = channels[0];
  if (first === undefined || channels.length < 2) throw new MaskCheckError(`inter-channel delay needs at least two channels (this check covers ${channels.length})`);
  return channels.slice(1).map((b) => [first, b]);
}

/**
 * Timing: latency of each channel against the stimulus, or the delay of channel b after
 * channel a, both in ms, signed (negative: the capture or b leads), with sub-sample resolution
 * (interpolated correlation peak); or polarity, which passes when every covered channel has
 * normal polarity against the stimulus (measured +1 normal, −1 inverted). A latency the
 * stimulus leaves ambiguous (a periodic stimulus as long as the capture) is this check's
 * error, not a confident wrong number. For a symmetric limit give min = −x and max = x.
 * @throws MaskCheckError (caught by evaluateMask) without a stimulus (latency, polarity), with an
 *   ambiguous latency, or with fewer than two channels (inter-channel)
 * @see C. H. Knapp, G. C. Carter, IEEE Trans. ASSP 24(4), 1976 (generalized cross-correlation delay estimation)
 */
export function evaluateTiming(ctx: CaptureContext, check: TimingCheck): CheckEvaluation {
  const ms = (samples: number): number => (1000 * samples) / ctx.sampleRate;
  let outcomes: ChannelOutcome[];
  if (check.metric === 'latency-ms' || check.metric === 'polarity') {
    outcomes = checkChannels(ctx, check).map((channel) => {
      const t = ctx.timing(channel);
      if (t.ambiguous) {
        // No stimulus to align: "ambiguous" would suggest a periodic stimulus rather than a missing one.
        if (t.notFound) throw new MaskCheckError(`the latency of channel ${channel} cannot be measured: ${t.notFound}`);
        throw new MaskCheckError(`the latency of channel ${channel} is ambiguous: ${t.warnings.join('; ') || 'the stimulus repeats, so several delays fit equally well'}`);
      }
      if (check.metric === 'polarity') {
        const sign = t.polarity === 'normal' ? 1 : -1;
        return { channel, pass: sign === 1, measured: sign, limit: 1, margin: sign - 1, worstHz: null, details: { polarity: t.polarity, latencySamples: t.latencySamples } };
      }
      return { ...minMaxOutcome(channel, ms(t.latencySamples), check.min, check.max), details: { latencySamples: t.latencySamples, polarity: t.polarity } };
    });
  } else {
    outcomes = pairsOf(ctx, check).map(([a, b]) => {
      const d = ctx.channelDelay(a, b);
      return { ...minMaxOutcome(b, ms(d.delaySamples), check.min, check.max), details: { pair: [a, b], delaySamples: d.delaySamples, polarity: d.polarity } };
    });
  }
  return combineOutcomes(check, check.metric === 'polarity' ? 'ratio' : 'ms', outcomes, { metric: check.metric });
}
