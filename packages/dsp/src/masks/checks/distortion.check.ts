import type { CheckEvaluation, CheckUnit, DistortionCheck } from '@earmark/contracts';
import type { CaptureContext, ChannelDistortion } from '../../context/capture-context.js';
import { checkChannels, combineOutcomes, minMaxOutcome, type ChannelOutcome } from '../check-outcome.js';
import { MaskCheckError } from '../mask-check-error.js';
import { DB_FLOOR } from '../spectral-curves.js';

const UNITS: Record<DistortionCheck['metric'], CheckUnit> = {
  'thd-percent': '%',
  'thdn-db': 'dB',
  'snr-db': 'dB',
  'noise-floor-dbfs': 'dBFS',
  'dynamic-range-db': 'dB',
  'imd-smpte-percent': '%',
  'imd-dfd-percent': '%',
};

/** Level of the tone AES17 prescribes for dynamic range, and how far the capture's tone may be from it. */
export const DYNAMIC_RANGE_TONE_DBFS = -60;
export const DYNAMIC_RANGE_TONE_TOLERANCE_DB = 3;

const NO_TONE = 'no dominant tone in the capture (the fundamental carries less than half of the in-band signal), so tone measures are undefined';

/** The metric's value for one channel from the channel's tone measures (the analyze report's), or null with the reason. */
function toneMetric(d: ChannelDistortion, check: DistortionCheck): { value: number | null; reason?: string; toneDbfs?: number } {
  const weighted = check.metric === 'dynamic-range-db' || check.weighting === 'a';
  const reason = d.warnings.join('; ') || NO_TONE;
  if (check.metric === 'noise-floor-dbfs') {
    const floor = weighted ? d.noiseFloorDbfsA : d.noiseFloorDbfs;
    return { value: floor === null ? DB_FLOOR : Math.max(floor, DB_FLOOR) };
  }
  const tone = d.tone;
  if (!tone) return { value: null, reason };
  const toneDbfs = tone.levelDbfs;
  switch (check.metric) {
    case 'thd-percent':
      return tone.thdPercent === null ? { value: null, toneDbfs, reason } : { value: tone.thdPercent, toneDbfs };
    case 'snr-db':
      return { value: weighted ? tone.snrDbA : tone.snrDb, toneDbfs };
    case 'thdn-db':
      return { value: Math.max(weighted ? tone.thdnDbA : tone.thdnDb, DB_FLOOR), toneDbfs };
    default: {
      // Dynamic range (AES17-2020 §6.4.1): A-weighted THD+N of a −60 dBFS tone, referred to full scale.
      if (Math.abs(toneDbfs - DYNAMIC_RANGE_TONE_DBFS) > DYNAMIC_RANGE_TONE_TOLERANCE_DB || d.dynamicRangeDb === null) {
        throw new MaskCheckError(`dynamic range needs a single tone at ${DYNAMIC_RANGE_TONE_DBFS} dBFS (±${DYNAMIC_RANGE_TONE_TOLERANCE_DB} dB); the capture's tone is at ${toneDbfs.toFixed(1)} dBFS`);
      }
      return { value: d.dynamicRangeDb, toneDbfs };
    }
  }
}

/**
 * Distortion and noise from the channel's tone measures — the very numbers of the analyze report,
 * from one sine fit per channel and band over the steady window: THD (%), THD+N relative to the
 * total in-band signal (dB), SNR (dB), the in-band noise floor (dBFS), each through the AES17
 * 20 kHz low-pass and optionally A-weighted (weighting on the noise and harmonics only, AES17);
 * dynamic range in the AES17 manner; and two-tone intermodulation (SMPTE/DIN and
 * difference-frequency, IEC 60268-3) for the matching stimuli. A capture without a dominant
 * tone fails tone measures with no value (it is not an error: the firmware's output lacks the tone).
 * @throws MaskCheckError (caught by evaluateMask) for dynamic range without a tone near −60 dBFS, or a band above Nyquist
 * @see IEEE Std 1241-2010 §4.1.4, §4.5, §4.6; AES17-2020 §5.2.5, §6.3, §6.4.1; IEC 61672-1:2013 annex E; IEC 60268-3
 */
export function evaluateDistortion(ctx: CaptureContext, check: DistortionCheck): CheckEvaluation {
  const outcomes: ChannelOutcome[] = checkChannels(ctx, check).map((channel) => {
    if (check.metric === 'imd-smpte-percent') {
      const r = ctx.imdSmpte(channel);
      return { ...minMaxOutcome(channel, r.imdPercent, check.min, check.max), details: { lowHz: r.lowHz, highHz: r.highHz, imdDb: r.imdDb } };
    }
    if (check.metric === 'imd-dfd-percent') {
      const r = ctx.imdTwinTone(channel);
      return { ...minMaxOutcome(channel, r.d2Percent, check.min, check.max), details: { lowHz: r.lowHz, highHz: r.highHz, d2Db: r.d2Db, d3Percent: r.d3Percent } };
    }
    const d = ctx.distortion(channel, check.bandHz);
    const v = toneMetric(d, check);
    const outcome = minMaxOutcome(channel, v.value, check.min, check.max);
    return {
      ...outcome,
      details: {
        bandHz: d.bandHz,
        steadySeconds: [d.window.start / ctx.sampleRate, d.window.end / ctx.sampleRate],
        fundamentalHz: d.tone?.fundamentalHz ?? null,
        toneDbfs: v.toneDbfs ?? null,
        ...(v.reason ? { reason: v.reason } : {}),
      },
    };
  });
  return combineOutcomes(check, UNITS[check.metric], outcomes, { metric: check.metric, weighting: check.metric === 'dynamic-range-db' ? 'a' : check.metric.startsWith('imd-') ? 'none' : (check.weighting ?? 'none') });
}
