import type { CheckEvaluation, CheckUnit, MaskCheck, MaskDocument, MaskEvaluation } from '@earmark/contracts';
import { ENGINE_VERSION } from '../engine-version.js';
import { errorEvaluation } from './check-outcome.js';
import { evaluateBandLevels } from './checks/band-levels.check.js';
import { evaluateDistortion } from './checks/distortion.check.js';
import { evaluateIntegrity } from './checks/integrity.check.js';
import { evaluateLevel } from './checks/level.check.js';
import { evaluateMagnitudeEnvelope } from './checks/magnitude-envelope.check.js';
import { evaluatePhaseLinearity } from './checks/phase-linearity.check.js';
import { evaluateTiming } from './checks/timing.check.js';
import { evaluateCoherence } from './checks/coherence.check.js';
import { evaluateCrosstalk } from './checks/crosstalk.check.js';
import { evaluateDistortionVsFrequency } from './checks/distortion-vs-frequency.check.js';
import { MaskCheckError } from './mask-check-error.js';
import { CaptureContext, type WarningTopic } from '../context/capture-context.js';
import { validateMaskInput, type EvaluateMaskInput } from './mask-input.js';
import { precondition } from '../util/preconditions.js';

/** The unit a check reports in when it could not be evaluated (the same as when it could). */
function unitOf(check: MaskCheck): CheckUnit {
  switch (check.kind) {
    case 'magnitude-envelope':
    case 'band-levels':
      return check.measure === 'transfer' ? 'dB' : 'dBFS';
    case 'level':
      return check.metric === 'energy-parseval' ? 'ratio' : check.metric === 'crest-factor-db' ? 'dB' : 'dBFS';
    case 'phase-linearity':
      return check.maxDeviationDeg !== undefined ? 'deg' : 'ms';
    case 'distortion':
      return check.metric === 'thd-percent' || check.metric.startsWith('imd-') ? '%' : check.metric === 'noise-floor-dbfs' ? 'dBFS' : 'dB';
    case 'timing':
      return check.metric === 'polarity' ? 'ratio' : 'ms';
    case 'distortion-vs-frequency':
    case 'crosstalk':
      return 'dB';
    case 'coherence':
      return 'ratio';
    case 'integrity':
      return check.metric === 'dc-offset' ? 'FS' : 'count';
  }
}

/** The measures each kind of check rests on: their warnings are shown beside the check. */
const WARNING_TOPICS: Record<MaskCheck['kind'], readonly WarningTopic[]> = {
  'magnitude-envelope': ['stimulus', 'timing', 'transfer', 'spectrum'],
  'band-levels': ['stimulus', 'timing', 'transfer', 'spectrum'],
  level: [],
  'phase-linearity': ['stimulus', 'timing', 'transfer'],
  distortion: ['steady', 'tone'],
  timing: ['stimulus', 'timing'],
  integrity: ['integrity'],
  'distortion-vs-frequency': ['stimulus', 'timing', 'transfer'],
  coherence: ['stimulus', 'timing', 'transfer'],
  crosstalk: ['integrity'],
};

/** The check's result with the warnings of the measures it used (on the channels it covers). */
function withWarnings(ctx: CaptureContext, check: MaskCheck, evaluation: CheckEvaluation): CheckEvaluation {
  const topics = WARNING_TOPICS[check.kind];
  const channels = evaluation.channel !== null ? [evaluation.channel] : (check.channels ?? ctx.defaultChannels);
  const warnings = [...new Set(channels.flatMap((c) => ctx.warnings(c, topics).map((w) => (channels.length > 1 ? `channel ${c}: ${w}` : w))))];
  return warnings.length ? { ...evaluation, details: { ...evaluation.details, warnings } } : evaluation;
}

function evaluateCheck(ctx: CaptureContext, check: MaskCheck): CheckEvaluation {
  return withWarnings(ctx, check, evaluateCheckAlone(ctx, check));
}

function evaluateCheckAlone(ctx: CaptureContext, check: MaskCheck): CheckEvaluation {
  try {
    switch (check.kind) {
      case 'magnitude-envelope':
        return evaluateMagnitudeEnvelope(ctx, check);
      case 'band-levels':
        return evaluateBandLevels(ctx, check);
      case 'level':
        return evaluateLevel(ctx, check);
      case 'phase-linearity':
        return evaluatePhaseLinearity(ctx, check);
      case 'distortion':
        return evaluateDistortion(ctx, check);
      case 'timing':
        return evaluateTiming(ctx, check);
      case 'integrity':
        return evaluateIntegrity(ctx, check);
      case 'distortion-vs-frequency':
        return evaluateDistortionVsFrequency(ctx, check);
      case 'coherence':
        return evaluateCoherence(ctx, check);
      case 'crosstalk':
        return evaluateCrosstalk(ctx, check);
    }
  } catch (error) {
    // A check that cannot be evaluated on this input is that check's error, not the whole
    // evaluation's: the other checks still report. Engine preconditions (RangeError) count too.
    if (error instanceof MaskCheckError || error instanceof RangeError) return errorEvaluation(check, unitOf(check), error.message);
    throw error;
  }
}

/**
 * One sentence for people: why the verdict is what it is (null for a pass). It names the failing
 * checks without numbers: their margins are written by the one formatter in @earmark/contracts,
 * which this pure engine does not import (the domain adds them, see judgement.ts).
 */
function verdictReason(checks: readonly CheckEvaluation[]): { verdict: MaskEvaluation['verdict']; reason: string | null } {
  const errors = checks.filter((c) => c.error !== null);
  if (errors.length > 0) {
    const first = errors[0] as CheckEvaluation;
    const more = errors.length > 1 ? ` (and ${errors.length - 1} more check${errors.length > 2 ? 's' : ''} could not be evaluated)` : '';
    return { verdict: 'error', reason: `check "${first.id}" could not be evaluated: ${first.error}${more}` };
  }
  const failed = checks.filter((c) => !c.pass);
  if (failed.length === 0) return { verdict: 'pass', reason: null };
  const listed = failed.slice(0, 5).map((c) => c.id);
  const rest = failed.length > 5 ? `, and ${failed.length - 5} more` : '';
  return { verdict: 'fail', reason: `${failed.length} of ${checks.length} checks failed: ${listed.join(', ')}${rest}` };
}

/**
 * A capture context for `input`, validated as `evaluateMask` validates it. Pass it to `evaluateMask`
 * and then to `captureCurves`, and the plot reuses what the verdict measured (the transfer
 * estimate above all) instead of measuring it again.
 * @throws EngineInputError (`fn` = "evaluateMask") on a bad capture, as evaluateMask does
 */
export function maskContext(input: EvaluateMaskInput): CaptureContext {
  return new CaptureContext(input, validateMaskInput(input, 'evaluateMask'));
}

/**
 * Evaluates a tolerance mask on a capture. Each check yields its measured value, limit and
 * margin (positive inside, in the check's unit) at its worst frequency and worst channel. The
 * verdict is `error` when any check could not be evaluated (e.g. it needs the stimulus and none
 * was given), else `fail` when any check failed, else `pass`. Intermediates shared by checks
 * (transfer function, sine fit, level spectrum) are computed once, and only if a check needs them.
 * The mask must already be parsed (contracts' `MaskDocument` schema validates it at the edge).
 * `context` (from `maskContext(input)`) lets a caller read the same measures afterwards.
 * @throws EngineInputError (a RangeError, `fn` = "evaluateMask") on a bad capture: no channels, unequal
 *   lengths, non-finite samples, a bad sample rate, a reference at another rate, or an analysed
 *   channel that does not exist
 * @see docs/masks.md (format, margins, verdict); docs/analysis.md (every measure's method)
 */
export function evaluateMask(input: EvaluateMaskInput, mask: MaskDocument, context?: CaptureContext): MaskEvaluation {
  precondition(!context || context.input === input, 'evaluateMask', 'the capture context was made for another input');
  const ctx = context ?? maskContext(input);
  const checks = mask.checks.map((check) => evaluateCheck(ctx, check));
  return { engineVersion: ENGINE_VERSION, ...verdictReason(checks), checks };
}
