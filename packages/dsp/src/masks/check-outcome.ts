import type { CheckEvaluation, CheckUnit, MaskCheck } from '@earmark/contracts';
import type { CaptureContext } from '../context/capture-context.js';

/** One channel's (or channel pair's) result of a check, before the worst one is picked. */
export interface ChannelOutcome {
  channel: number;
  pass: boolean;
  measured: number | null;
  limit: number | null;
  margin: number | null;
  worstHz: number | null;
  /** Overrides the check's unit (phase linearity reports whichever sub-limit is tighter). */
  unit?: CheckUnit;
  /** Kept for the worst channel only, merged into the check's details. */
  details?: Record<string, unknown>;
}

/**
 * Margin of a value against optional bounds: min(max − v, v − min) over the bounds given,
 * positive inside; `limit` is the bound that set it. A value that could not be measured
 * (null, NaN) fails with no margin.
 */
export function minMaxOutcome(channel: number, value: number | null, min: number | undefined, max: number | undefined, worstHz: number | null = null): ChannelOutcome {
  if (value === null || Number.isNaN(value)) return { channel, pass: false, measured: null, limit: max ?? min ?? null, margin: null, worstHz };
  let margin = Infinity;
  let limit: number | null = null;
  if (max !== undefined && max - value < margin) {
    margin = max - value;
    limit = max;
  }
  if (min !== undefined && value - min < margin) {
    margin = value - min;
    limit = min;
  }
  if (limit === null) return { channel, pass: true, measured: value, limit: null, margin: null, worstHz };
  return { channel, pass: margin >= 0, measured: value, limit, margin, worstHz };
}

/** Channels a check covers: its own list, else the evaluation's analysed channels. */
export function checkChannels(ctx: CaptureContext, check: MaskCheck): readonly number[] {
  return check.channels ?? ctx.defaultChannels;
}

/** Orders outcomes worst first: unmeasurable failures, then the smallest margin. */
function worse(a: ChannelOutcome, b: ChannelOutcome): boolean {
  if (a.margin === null && !a.pass) return !(b.margin === null && !b.pass);
  if (b.margin === null && !b.pass) return false;
  return (a.margin ?? Infinity) < (b.margin ?? Infinity);
}

/**
 * The check's result from its channels: it passes only if every channel passes, and it reports
 * the worst channel's numbers (per-channel summaries go to details.perChannel).
 */
export function combineOutcomes(check: MaskCheck, unit: CheckUnit, outcomes: readonly ChannelOutcome[], details: Record<string, unknown> = {}): CheckEvaluation {
  let worst = outcomes[0];
  for (const o of outcomes) if (worst && worse(o, worst)) worst = o;
  if (!worst) return errorEvaluation(check, unit, 'the check covers no channel');
  return {
    id: check.id,
    kind: check.kind,
    label: check.label ?? null,
    pass: outcomes.every((o) => o.pass),
    measured: worst.measured,
    limit: worst.limit,
    margin: worst.margin,
    unit: worst.unit ?? unit,
    worstHz: worst.worstHz,
    channel: worst.channel,
    error: null,
    details: {
      ...details,
      ...(worst.details ?? {}),
      perChannel: outcomes.map((o) => ({ channel: o.channel, pass: o.pass, measured: o.measured, limit: o.limit, margin: o.margin, unit: o.unit ?? unit, worstHz: o.worstHz })),
    },
  };
}

/** A check that could not be evaluated: it does not pass, and the verdict becomes `error`. */
export function errorEvaluation(check: MaskCheck, unit: CheckUnit, message: string): CheckEvaluation {
  return { id: check.id, kind: check.kind, label: check.label ?? null, pass: false, measured: null, limit: null, margin: null, unit, worstHz: null, channel: null, error: message, details: {} };
}
