import type { BandLevelsCheck, CheckEvaluation } from '@earmark/contracts';
import { bandLevels, type OctaveBand } from '../../measures/octave-bands.js';
import { nearestOctaveBand } from '../band-matching.js';
import { checkChannels, combineOutcomes, minMaxOutcome, type ChannelOutcome } from '../check-outcome.js';
import { MaskCheckError } from '../mask-check-error.js';
import type { CaptureContext } from '../../context/capture-context.js';
import { DEFAULT_REFERENCE_HZ, DB_FLOOR, powerDb, referenceGain, transferBandGain } from '../spectral-curves.js';

/** One band's level in dB (transfer, normalised) or dBFS (level); the plots draw the same number. */
export function bandValue(ctx: CaptureContext, channel: number, check: BandLevelsCheck, band: OctaveBand): number {
  if (band.upperHz > ctx.sampleRate / 2) throw new MaskCheckError(`the ${band.nominalHz} Hz band reaches above half the sample rate (${ctx.sampleRate / 2} Hz)`);
  if (check.measure === 'transfer') {
    const t = ctx.transfer(channel);
    const gain = referenceGain(t, check.referenceHz === undefined ? DEFAULT_REFERENCE_HZ : check.referenceHz);
    const g = transferBandGain(t, band.lowerHz, band.upperHz);
    if (g === null) throw new MaskCheckError(`the stimulus has no energy in the ${band.nominalHz} Hz band, so its response cannot be measured`);
    return powerDb(g / gain);
  }
  const s = ctx.levelSpectrum(channel);
  if (Math.ceil(band.upperHz / s.binHz - 1e-9) - 1 < Math.ceil(band.lowerHz / s.binHz - 1e-9)) {
    throw new MaskCheckError(`the ${band.nominalHz} Hz band is narrower than the capture's frequency resolution (${s.binHz.toFixed(2)} Hz); use a longer capture or a wider fraction`);
  }
  const [level] = bandLevels(s.power, s.binHz, [band]);
  return Math.max(level?.levelDbfs ?? DB_FLOOR, DB_FLOOR);
}

/**
 * Band levels: IEC 61260-1 fractional-octave bands (each limit matched to the nearest exact
 * mid-band frequency) with per-band min/max. Level bands sum the capture's Hann power spectrum
 * over lower ≤ f < upper (dBFS, as the analyze report's 1/3-octave levels); transfer bands take
 * the stimulus-power-weighted mean |H|² over the band, normalised at referenceHz. The worst band
 * of the worst channel is reported.
 * @throws MaskCheckError (caught by evaluateMask) when a band cannot be measured
 * @see IEC 61260-1:2014 §5.4–5.5; docs/masks.md, "band-levels"
 */
export function evaluateBandLevels(ctx: CaptureContext, check: BandLevelsCheck): CheckEvaluation {
  const bands = check.bands.map((b) => ({ limit: b, band: nearestOctaveBand(check.fraction, b.centerHz) }));
  const outcomes: ChannelOutcome[] = checkChannels(ctx, check).map((channel) => {
    const rows = bands.map(({ limit, band }) => {
      const o = minMaxOutcome(channel, bandValue(ctx, channel, check, band), limit.min, limit.max, band.centerHz);
      return { outcome: o, row: { centerHz: band.nominalHz, exactCenterHz: band.centerHz, measured: o.measured, min: limit.min ?? null, max: limit.max ?? null, margin: o.margin, pass: o.pass } };
    });
    let worst = rows[0];
    for (const r of rows) if (worst && (r.outcome.margin ?? Infinity) < (worst.outcome.margin ?? Infinity)) worst = r;
    if (!worst) throw new MaskCheckError('the check lists no band');
    return { ...worst.outcome, pass: rows.every((r) => r.outcome.pass), details: { bands: rows.map((r) => r.row) } };
  });
  return combineOutcomes(check, check.measure === 'transfer' ? 'dB' : 'dBFS', outcomes, { measure: check.measure, fraction: check.fraction });
}
