import type { CheckEvaluation, CrosstalkCheck } from '@earmark/contracts';
import type { CaptureContext } from '../../context/capture-context.js';
import { combineOutcomes, type ChannelOutcome } from '../check-outcome.js';
import { MaskCheckError } from '../mask-check-error.js';

/**
 * Channel separation: with `drivenChannel` driven, each other channel's level per 1/3-octave
 * band relative to the driven channel's, which must be at least `minDb` below it in every band
 * inside `bandHz` (default 20 Hz…20 kHz). The worst band sets the margin (separation − minDb).
 * A band where the undriven channel sits at its own noise floor reads as "at least" that much.
 * @throws MaskCheckError (caught by evaluateMask) when the capture has one channel or the driven channel is missing
 * @see IEC 60268-3:2018 §14.7 (crosstalk), common practice of per-band separation
 */
export function evaluateCrosstalk(ctx: CaptureContext, check: CrosstalkCheck): CheckEvaluation {
  ctx.signal(check.drivenChannel);
  const others = (check.channels ?? ctx.defaultChannels).filter((c) => c !== check.drivenChannel);
  if (others.length === 0) throw new MaskCheckError('crosstalk needs at least one channel besides the driven one');
  const band = check.bandHz ?? [20, Math.min(20000, ctx.sampleRate / 2)];
  const outcomes: ChannelOutcome[] = others.map((channel) => {
    const bands = ctx.crosstalk(check.drivenChannel, channel).filter((b) => b.centerHz >= band[0] && b.centerHz <= band[1]);
    if (bands.length === 0) throw new MaskCheckError(`no 1/3-octave band with signal on the driven channel lies in ${band[0]}…${band[1]} Hz`);
    let worst = bands[0] as (typeof bands)[number];
    for (const b of bands) if (b.separationDb < worst.separationDb) worst = b;
    const margin = worst.separationDb - check.minDb;
    return { channel, pass: margin >= 0, measured: worst.separationDb, limit: check.minDb, margin, worstHz: worst.centerHz, details: { drivenChannel: check.drivenChannel, bands } };
  });
  return combineOutcomes(check, 'dB', outcomes, { drivenChannel: check.drivenChannel });
}
