import { z } from 'zod';

/**
 * Tolerance masks: the JSON a mask revision stores, and the evaluation the engine returns.
 * The format is documented with one example per check kind in docs/masks.md.
 *
 * Conventions (docs/analysis.md): levels in dBFS with a full-scale sine = 0 dBFS (AES17);
 * magnitudes in dB = 20·log10|H|; channels numbered from 0; frequencies in Hz; times in ms.
 * A margin is positive inside the limits and negative outside, in the check's own unit.
 */

/** Most checks one mask may hold. */
export const MAX_MASK_CHECKS = 200;
/** Most breakpoints one limit curve may hold. */
export const MAX_LIMIT_POINTS = 512;

/** A check id: a lower-case slug, unique within its mask (`hf-rolloff`, `thdn.1k`). */
export const CheckId = z
  .string()
  .min(1, 'must not be empty')
  .max(80, 'must be at most 80 characters')
  .regex(/^[a-z0-9][a-z0-9._-]*$/, 'must be a slug: lower-case letters, digits, dots, dashes and underscores, starting with a letter or digit');

const Hz = z.number().positive('must be greater than 0 Hz').max(1e6, 'must be at most 1 MHz');
const Db = z.number().min(-400, 'must be at least -400 dB').max(400, 'must be at most 400 dB');
const Channel = z.number().int('must be a whole number').min(0, 'channels count from 0').max(7, 'must be at most 7');

/** A frequency band [lo, hi] in Hz with lo < hi. */
export const BandHz = z
  .tuple([Hz, Hz])
  .refine(([lo, hi]) => lo < hi, 'the lower edge must be below the upper edge');

/** Fields every check has. */
const common = {
  id: CheckId,
  /** Free text shown beside the check. */
  label: z.string().max(200, 'must be at most 200 characters').optional(),
  /** Capture channels (from 0) the check applies to; default: every analysed channel. */
  channels: z
    .array(Channel)
    .min(1, 'give at least one channel, or leave channels out for all of them')
    .max(8)
    .refine((c) => new Set(c).size === c.length, 'channels must not repeat')
    .optional(),
};

/** min ≤ max when both are given, and at least one of them. */
function minMaxIssues(check: { min?: number | undefined; max?: number | undefined }, ctx: z.RefinementCtx): void {
  if (check.min === undefined && check.max === undefined) ctx.addIssue({ code: 'custom', message: 'give min, max or both', path: ['max'] });
  if (check.min !== undefined && check.max !== undefined && check.min > check.max) ctx.addIssue({ code: 'custom', message: 'min must not be above max', path: ['min'] });
}

// ---------------------------------------------------------------------------------------------
// Limit curves

/** One breakpoint of a limit curve. */
export const LimitPoint = z.strictObject({ hz: Hz, db: Db });
export type LimitPoint = z.infer<typeof LimitPoint>;

/**
 * A piecewise-linear limit: breakpoints with strictly increasing frequency, interpolated
 * linearly in dB over log frequency. Outside [first.hz, last.hz] the limit does not apply.
 */
export const LimitCurve = z
  .array(LimitPoint)
  .min(2, 'a limit curve needs at least two points')
  .max(MAX_LIMIT_POINTS, `a limit curve holds at most ${MAX_LIMIT_POINTS} points`)
  .superRefine((points, ctx) => {
    for (let i = 1; i < points.length; i++) {
      const prev = points[i - 1];
      const cur = points[i];
      if (prev && cur && !(cur.hz > prev.hz)) {
        ctx.addIssue({ code: 'custom', message: `frequencies must strictly increase (${cur.hz} Hz follows ${prev.hz} Hz)`, path: [i, 'hz'] });
      }
    }
  });
export type LimitCurve = z.infer<typeof LimitCurve>;

/**
 * Value of a limit curve at f: linear in dB over log10(f) between neighbouring breakpoints;
 * null outside the curve's span. The same rule the engine applies (docs/masks.md).
 */
export function limitAt(curve: readonly LimitPoint[], hz: number): number | null {
  const first = curve[0];
  const last = curve[curve.length - 1];
  if (!first || !last || !(hz >= first.hz && hz <= last.hz)) return null;
  for (let i = 1; i < curve.length; i++) {
    const a = curve[i - 1] as LimitPoint;
    const b = curve[i] as LimitPoint;
    if (hz <= b.hz) {
      const t = Math.log(hz / a.hz) / Math.log(b.hz / a.hz);
      return a.db + t * (b.db - a.db);
    }
  }
  return last.db;
}

/** Where upper and lower overlap, upper must not fall below lower (checked at every breakpoint). */
function upperAboveLower(upper: readonly LimitPoint[] | undefined, lower: readonly LimitPoint[] | undefined, ctx: z.RefinementCtx): void {
  if (!upper || !lower || upper.length < 2 || lower.length < 2) return;
  // Both curves are linear in log f between the union of their breakpoints, so checking those suffices.
  for (const hz of [...upper, ...lower].map((p) => p.hz)) {
    const u = limitAt(upper, hz);
    const l = limitAt(lower, hz);
    if (u !== null && l !== null && u < l - 1e-9) {
      ctx.addIssue({ code: 'custom', message: `the upper limit (${u.toFixed(2)} dB) falls below the lower limit (${l.toFixed(2)} dB) at ${hz} Hz`, path: ['upper'] });
      return;
    }
  }
}

/** What a spectral check measures: the transfer function capture ÷ stimulus, or the capture's own level. */
export const SpectralMeasure = z.enum(['transfer', 'level']);
export type SpectralMeasure = z.infer<typeof SpectralMeasure>;

/**
 * Frequency at which a transfer measure is normalised to 0 dB (default 1000 Hz); null keeps
 * the absolute gain |H|. Only with `measure: 'transfer'`.
 */
const ReferenceHz = Hz.nullable().optional();

function referenceOnlyForTransfer(check: { measure: SpectralMeasure; referenceHz?: number | null | undefined }, ctx: z.RefinementCtx): void {
  if (check.measure === 'level' && check.referenceHz !== undefined) ctx.addIssue({ code: 'custom', message: 'referenceHz applies only to measure "transfer"', path: ['referenceHz'] });
}

// ---------------------------------------------------------------------------------------------
// The check kinds

/** 1/N-octave smoothing designators. */
export const SMOOTHING_FRACTIONS = [1, 3, 6, 12, 24] as const;
export const Smoothing = z.union([z.literal(1), z.literal(3), z.literal(6), z.literal(12), z.literal(24)], { error: 'smoothing must be 1, 3, 6, 12 or 24 (1/N octave)' });
export type Smoothing = z.infer<typeof Smoothing>;

/** Upper and lower limits over log frequency, on |H| or on the level spectrum. */
export const MagnitudeEnvelopeCheck = z
  .strictObject({
    kind: z.literal('magnitude-envelope'),
    ...common,
    measure: SpectralMeasure,
    referenceHz: ReferenceHz,
    upper: LimitCurve.optional(),
    lower: LimitCurve.optional(),
    smoothing: Smoothing.optional(),
  })
  .superRefine((c, ctx) => {
    if (!c.upper && !c.lower) ctx.addIssue({ code: 'custom', message: 'give an upper limit, a lower limit or both', path: ['upper'] });
    upperAboveLower(c.upper, c.lower, ctx);
    referenceOnlyForTransfer(c, ctx);
  });
export type MagnitudeEnvelopeCheck = z.infer<typeof MagnitudeEnvelopeCheck>;

/** Fractional-octave bandwidth designators (IEC 61260-1). */
export const BandFraction = z.union([z.literal(1), z.literal(3), z.literal(6), z.literal(12)], { error: 'fraction must be 1, 3, 6 or 12 (1/N octave)' });
export type BandFraction = z.infer<typeof BandFraction>;

/** One band's limits, in dB (transfer) or dBFS (level). */
export const BandLimit = z
  .strictObject({ centerHz: Hz, min: Db.optional(), max: Db.optional() })
  .superRefine(minMaxIssues);
export type BandLimit = z.infer<typeof BandLimit>;

/**
 * Index x of the IEC 61260-1 base-10 band (1/b octave) whose exact mid-band frequency is
 * nearest to f on a log axis: odd b: f_m = 1000·G^(x/b); even b: f_m = 1000·G^((2x+1)/(2b)),
 * G = 10^(3/10).
 */
export function nearestBandIndex(fraction: BandFraction, hz: number): number {
  const steps = (fraction * Math.log(hz / 1000)) / Math.log(10 ** 0.3);
  return fraction % 2 === 1 ? Math.round(steps) : Math.round(steps - 0.5);
}

/** Fractional-octave band levels with per-band limits. */
export const BandLevelsCheck = z
  .strictObject({
    kind: z.literal('band-levels'),
    ...common,
    fraction: BandFraction,
    measure: SpectralMeasure,
    referenceHz: ReferenceHz,
    bands: z.array(BandLimit).min(1, 'give at least one band').max(400),
  })
  .superRefine((c, ctx) => {
    referenceOnlyForTransfer(c, ctx);
    const seen = new Map<number, number>();
    c.bands.forEach((b, i) => {
      const x = nearestBandIndex(c.fraction, b.centerHz);
      const before = seen.get(x);
      if (before !== undefined) ctx.addIssue({ code: 'custom', message: `${b.centerHz} Hz names the same 1/${c.fraction}-octave band as bands[${before}]`, path: ['bands', i, 'centerHz'] });
      else seen.set(x, i);
    });
  });
export type BandLevelsCheck = z.infer<typeof BandLevelsCheck>;

export const LEVEL_METRICS = ['rms-dbfs', 'peak-dbfs', 'crest-factor-db', 'energy-parseval'] as const;
/** Broadband level, crest factor, or the Parseval energy agreement (the analysis checking itself). */
export const LevelCheck = z
  .strictObject({
    kind: z.literal('level'),
    ...common,
    metric: z.enum(LEVEL_METRICS),
    min: z.number().optional(),
    max: z.number().optional(),
    /** Part of the capture to measure, [start, end] in seconds (default: all of it). Not for energy-parseval. */
    timeSeconds: z
      .tuple([z.number().min(0, 'must be 0 s or more'), z.number().positive('must be greater than 0 s')])
      .refine(([a, b]) => a < b, 'the start must be before the end')
      .optional(),
  })
  .superRefine((c, ctx) => {
    minMaxIssues(c, ctx);
    if (c.metric === 'energy-parseval') {
      if (c.min !== undefined) ctx.addIssue({ code: 'custom', message: 'energy-parseval takes only max (the largest relative disagreement, e.g. 1e-9)', path: ['min'] });
      if (c.max !== undefined && !(c.max > 0)) ctx.addIssue({ code: 'custom', message: 'must be greater than 0', path: ['max'] });
      if (c.timeSeconds !== undefined) ctx.addIssue({ code: 'custom', message: 'energy-parseval always uses the whole capture', path: ['timeSeconds'] });
    }
  });
export type LevelCheck = z.infer<typeof LevelCheck>;

/** Deviation from linear phase and group-delay variation over a band. Needs the stimulus. */
export const PhaseLinearityCheck = z
  .strictObject({
    kind: z.literal('phase-linearity'),
    ...common,
    /** Default: the band where |H| is within 20 dB of its maximum (or the test case's transfer band). */
    bandHz: BandHz.optional(),
    maxDeviationDeg: z.number().positive('must be greater than 0°').optional(),
    maxGroupDelayVariationMs: z.number().positive('must be greater than 0 ms').optional(),
  })
  .superRefine((c, ctx) => {
    if (c.maxDeviationDeg === undefined && c.maxGroupDelayVariationMs === undefined) {
      ctx.addIssue({ code: 'custom', message: 'give maxDeviationDeg, maxGroupDelayVariationMs or both', path: ['maxDeviationDeg'] });
    }
  });
export type PhaseLinearityCheck = z.infer<typeof PhaseLinearityCheck>;

export const DISTORTION_METRICS = ['thd-percent', 'thdn-db', 'snr-db', 'noise-floor-dbfs', 'dynamic-range-db', 'imd-smpte-percent', 'imd-dfd-percent'] as const;
/** THD, THD+N, SNR, noise floor and dynamic range from the sine fit (docs/analysis.md). */
export const DistortionCheck = z
  .strictObject({
    kind: z.literal('distortion'),
    ...common,
    metric: z.enum(DISTORTION_METRICS),
    min: z.number().optional(),
    max: z.number().optional(),
    /** `a`: IEC 61672-1 A-weighting inside the band. Dynamic range is always A-weighted (AES17). */
    weighting: z.enum(['none', 'a']).optional(),
    /** Measurement band; default 20 Hz … min(20 kHz, fs/2). */
    bandHz: BandHz.optional(),
  })
  .superRefine((c, ctx) => {
    minMaxIssues(c, ctx);
    if (c.metric === 'thd-percent' && c.weighting === 'a') ctx.addIssue({ code: 'custom', message: 'thd-percent is not weighted (it compares harmonic amplitudes); use thdn-db for a weighted measure', path: ['weighting'] });
    if (c.metric === 'dynamic-range-db' && c.weighting === 'none') ctx.addIssue({ code: 'custom', message: 'dynamic range is A-weighted by definition (AES17); leave weighting out', path: ['weighting'] });
    if (c.metric.startsWith('imd-') && c.weighting !== undefined) ctx.addIssue({ code: 'custom', message: 'intermodulation compares tone amplitudes and is not weighted; leave weighting out', path: ['weighting'] });
  });
export type DistortionCheck = z.infer<typeof DistortionCheck>;

export const TIMING_METRICS = ['latency-ms', 'inter-channel-delay-ms', 'polarity'] as const;
/**
 * Latency against the stimulus, the delay between capture channels, or polarity (`polarity`
 * passes when every covered channel has normal polarity against the stimulus; no min or max).
 */
export const TimingCheck = z
  .strictObject({
    kind: z.literal('timing'),
    ...common,
    metric: z.enum(TIMING_METRICS),
    min: z.number().optional(),
    max: z.number().optional(),
    /** inter-channel-delay-ms only: [a, b] pairs, delay of b after a; default: each channel after the first. */
    pairs: z
      .array(z.tuple([Channel, Channel]).refine(([a, b]) => a !== b, 'a pair needs two different channels'))
      .min(1)
      .max(28)
      .optional(),
  })
  .superRefine((c, ctx) => {
    if (c.metric === 'polarity') {
      if (c.min !== undefined || c.max !== undefined) ctx.addIssue({ code: 'custom', message: 'polarity takes no min or max: it requires normal polarity', path: ['max'] });
      if (c.pairs !== undefined) ctx.addIssue({ code: 'custom', message: 'pairs apply only to inter-channel-delay-ms', path: ['pairs'] });
      return;
    }
    minMaxIssues(c, ctx);
    if (c.metric === 'latency-ms' && c.pairs !== undefined) ctx.addIssue({ code: 'custom', message: 'pairs apply only to inter-channel-delay-ms', path: ['pairs'] });
    if (c.metric === 'inter-channel-delay-ms' && c.pairs !== undefined && c.channels !== undefined) {
      ctx.addIssue({ code: 'custom', message: 'give either channels or pairs for inter-channel-delay-ms', path: ['pairs'] });
    }
  });
export type TimingCheck = z.infer<typeof TimingCheck>;

export const INTEGRITY_METRICS = ['clipped-samples', 'dc-offset', 'dropouts', 'discontinuities'] as const;
/** Time-domain integrity: counts of clipped samples, dropouts, discontinuities; |DC| in full-scale units. */
export const IntegrityCheck = z
  .strictObject({
    kind: z.literal('integrity'),
    ...common,
    metric: z.enum(INTEGRITY_METRICS),
    /** Largest count allowed, or for dc-offset the largest |mean| in full-scale units (1 = full scale). */
    max: z.number().min(0, 'must be 0 or more'),
    /** clipped-samples only: |x| at or above which a sample counts as clipped (default 32767/32768). */
    clipThreshold: z.number().positive('must be greater than 0').max(1, 'must be at most 1 (full scale)').optional(),
    /** dropouts only: shortest run of digital silence that counts, ms (default 1). */
    minDropoutMs: z.number().positive('must be greater than 0 ms').optional(),
  })
  .superRefine((c, ctx) => {
    if (c.metric !== 'dc-offset' && !Number.isInteger(c.max)) ctx.addIssue({ code: 'custom', message: `${c.metric} counts events: max must be a whole number`, path: ['max'] });
    if (c.clipThreshold !== undefined && c.metric !== 'clipped-samples') ctx.addIssue({ code: 'custom', message: 'clipThreshold applies only to clipped-samples', path: ['clipThreshold'] });
    if (c.minDropoutMs !== undefined && c.metric !== 'dropouts') ctx.addIssue({ code: 'custom', message: 'minDropoutMs applies only to dropouts', path: ['minDropoutMs'] });
  });
export type IntegrityCheck = z.infer<typeof IntegrityCheck>;

export const HARMONIC_METRICS = ['thd-db', 'h2-db', 'h3-db'] as const;
/**
 * Harmonic distortion versus frequency from a sweep's harmonic responses (Farina 2000): per
 * 1/3-octave band of the fundamental, THD (harmonics 2…5), H2 or H3 in dB relative to the
 * fundamental (−40 dB = 1 %), under an upper limit curve. Needs a sweep stimulus.
 */
export const DistortionVsFrequencyCheck = z.strictObject({
  kind: z.literal('distortion-vs-frequency'),
  ...common,
  metric: z.enum(HARMONIC_METRICS),
  max: LimitCurve,
});
export type DistortionVsFrequencyCheck = z.infer<typeof DistortionVsFrequencyCheck>;

/** Smallest H1 coherence γ² over a band (noise and multitone stimuli): how much of the output the input explains. */
export const CoherenceCheck = z.strictObject({
  kind: z.literal('coherence'),
  ...common,
  /** Default: the test case's transfer band, else the bins where the stimulus has energy. */
  bandHz: BandHz.optional(),
  min: z.number().gt(0, 'must be greater than 0').max(1, 'coherence is at most 1'),
});
export type CoherenceCheck = z.infer<typeof CoherenceCheck>;

/** Channel separation: drive one channel, the others must stay at least `minDb` below it per 1/3-octave band. */
export const CrosstalkCheck = z
  .strictObject({
    kind: z.literal('crosstalk'),
    ...common,
    /** The channel the stimulus drives; `channels` (default: all others) are the undriven ones. */
    drivenChannel: Channel,
    minDb: z.number().positive('a separation is given as a positive number of dB'),
    bandHz: BandHz.optional(),
  })
  .superRefine((c, ctx) => {
    if (c.channels?.includes(c.drivenChannel)) ctx.addIssue({ code: 'custom', message: 'channels lists the undriven channels; it must not include drivenChannel', path: ['channels'] });
  });
export type CrosstalkCheck = z.infer<typeof CrosstalkCheck>;

export const CHECK_KINDS = ['magnitude-envelope', 'band-levels', 'level', 'phase-linearity', 'distortion', 'timing', 'integrity', 'distortion-vs-frequency', 'coherence', 'crosstalk'] as const;
export type CheckKind = (typeof CHECK_KINDS)[number];

/** Any check, told apart by `kind`. */
export const MaskCheck = z.discriminatedUnion('kind', [
  MagnitudeEnvelopeCheck,
  BandLevelsCheck,
  LevelCheck,
  PhaseLinearityCheck,
  DistortionCheck,
  TimingCheck,
  IntegrityCheck,
  DistortionVsFrequencyCheck,
  CoherenceCheck,
  CrosstalkCheck,
]);
export type MaskCheck = z.infer<typeof MaskCheck>;
/** A check as a user writes it (before defaults). */
export type MaskCheckInput = z.input<typeof MaskCheck>;

/** The checks of one mask revision; ids unique. */
export const MaskDocument = z
  .strictObject({
    checks: z.array(MaskCheck).min(1, 'a mask needs at least one check').max(MAX_MASK_CHECKS, `a mask holds at most ${MAX_MASK_CHECKS} checks`),
  })
  .superRefine((mask, ctx) => {
    const first = new Map<string, number>();
    mask.checks.forEach((c, i) => {
      const before = first.get(c.id);
      if (before !== undefined) ctx.addIssue({ code: 'custom', message: `duplicate check id "${c.id}" (also checks[${before}])`, path: ['checks', i, 'id'] });
      else first.set(c.id, i);
    });
  });
export type MaskDocument = z.infer<typeof MaskDocument>;
export type MaskDocumentInput = z.input<typeof MaskDocument>;

// ---------------------------------------------------------------------------------------------
// Evaluation (what the engine returns; stored with the verdict)

/** Units a check's measured value, limit and margin are given in. */
export const CheckUnit = z.enum(['dB', 'dBFS', 'deg', 'ms', '%', 'count', 'FS', 'ratio']);
export type CheckUnit = z.infer<typeof CheckUnit>;

/** One evaluated check: the worst channel's numbers; margin positive inside, negative outside. */
export const CheckEvaluation = z.object({
  id: z.string(),
  kind: z.enum(CHECK_KINDS),
  label: z.string().nullable(),
  pass: z.boolean(),
  /** Value at the worst point (worst frequency, worst band, worst channel). */
  measured: z.number().nullable(),
  /** The limit the margin was taken against. */
  limit: z.number().nullable(),
  /** Distance to the nearer limit in `unit`; positive inside. */
  margin: z.number().nullable(),
  unit: CheckUnit,
  /** Spectral checks: the frequency of the worst margin. */
  worstHz: z.number().nullable(),
  /** The channel that set the numbers (the worst one). */
  channel: z.number().int().nullable(),
  /** Why the check could not be evaluated (e.g. it needs a stimulus and none was given). */
  error: z.string().nullable(),
  details: z.record(z.string(), z.unknown()),
});
export type CheckEvaluation = z.infer<typeof CheckEvaluation>;

/** A mask's verdict over one capture: error if any check could not be evaluated, else fail if any failed. */
export const MaskEvaluation = z.object({
  verdict: z.enum(['pass', 'fail', 'error']),
  engineVersion: z.string(),
  reason: z.string().nullable(),
  checks: z.array(CheckEvaluation),
});
export type MaskEvaluation = z.infer<typeof MaskEvaluation>;
