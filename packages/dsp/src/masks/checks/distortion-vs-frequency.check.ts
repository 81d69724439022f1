import type { CheckEvaluation, DistortionVsFrequencyCheck } from '@earmark/contracts';
import type { CaptureContext } from '../../context/capture-context.js';
import { checkChannels, combineOutcomes, type ChannelOutcome } from '../check-outcome.js';
import { interpolateLimit } from '../limit-curve.js';
import { MaskCheckError } from '../mask-check-error.js';

const FIELD = { 'thd-db': 'thdPercent', 'h2-db': 'h2Percent', 'h3-db': 'h3Percent' } as const;

/** Percent to dB relative to the fundamental: 20·log10(p/100); 1 % = −40 dB. */
const percentToDb = (p: number): number => 20 * Math.log10(Math.max(p, 1e-12) / 100);

/**
 * Distortion versus frequency: per 1/3-octave band of the fundamental inside the swept range,
 * THD, H2 or H3 from the sweep's harmonic impulse responses, in dB relative to the fundamental,
 * against an upper limit curve (bands outside the curve's span are not judged). The worst band
 * sets the margin (limit − measured, positive inside) and worstHz.
 * @throws MaskCheckError (caught by evaluateMask) without a sweep stimulus, or when no band lies under the curve
 * @see A. Farina, AES 108th Convention 2000, preprint 5093 (harmonic responses of an exponential sweep)
 */
export function evaluateDistortionVsFrequency(ctx: CaptureContext, check: DistortionVsFrequencyCheck): CheckEvaluation {
  const outcomes: ChannelOutcome[] = checkChannels(ctx, check).map((channel) => {
    const bands = ctx.distortionVsFrequency(channel);
    if (bands.length === 0) throw new MaskCheckError('distortion versus frequency needs an exponential sweep as the stimulus; this stimulus is not one');
    let worst: ChannelOutcome | null = null;
    let judged = 0;
    for (const b of bands) {
      const limit = interpolateLimit(check.max, b.centerHz);
      const percent = b[FIELD[check.metric]];
      if (limit === null || percent === null) continue;
      judged++;
      const measured = percentToDb(percent);
      const margin = limit - measured;
      if (!worst || margin < (worst.margin as number)) worst = { channel, pass: margin >= 0, measured, limit, margin, worstHz: b.centerHz };
    }
    if (!worst) throw new MaskCheckError(`no 1/3-octave band of the swept range lies under the limit curve (${check.max[0]?.hz}…${check.max[check.max.length - 1]?.hz} Hz)`);
    return { ...worst, pass: worst.pass, details: { bandsJudged: judged, bands: bands.map((b) => ({ centerHz: b.centerHz, percent: b[FIELD[check.metric]] })) } };
  });
  return combineOutcomes(check, 'dB', outcomes, { metric: check.metric });
}
