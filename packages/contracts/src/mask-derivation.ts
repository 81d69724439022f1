import { z } from 'zod';
import { BandHz, CheckId, MagnitudeEnvelopeCheck, Smoothing, SpectralMeasure } from './masks.js';
import { VerdictOutcome } from './captures.js';

/**
 * Deriving limits from golden captures, the impact of a draft on past builds, re-evaluation
 * under an approved revision, and drift of margins over a branch (docs/masks.md, "Deriving
 * limits, impact and drift").
 */

// ---------------------------------------------------------------------------------------------
// Derivation

/** Fewest and most golden captures one derivation takes. */
export const DERIVE_MIN_CAPTURES = 2;
export const DERIVE_MAX_CAPTURES = 50;

/**
 * `POST /api/projects/:project/test-cases/:caseKey/masks/derive`: limits mean ± (k·σ + guardDb)
 * from golden captures of the test case, simplified to at most `maxSegments` straight segments
 * (maxSegments + 1 breakpoints) per limit.
 */
export const DeriveMaskRequest = z.strictObject({
  captureIds: z
    .array(z.uuid())
    .min(DERIVE_MIN_CAPTURES, `give at least ${DERIVE_MIN_CAPTURES} golden captures`)
    .max(DERIVE_MAX_CAPTURES, `give at most ${DERIVE_MAX_CAPTURES} golden captures`)
    .refine((ids) => new Set(ids).size === ids.length, 'captures must not repeat'),
  /** Standard deviations between the mean and a limit (before the guard band). */
  k: z.number().min(0, 'must be 0 or more').max(10, 'must be at most 10').default(3),
  /** Extra distance added to k·σ on both sides, dB. */
  guardDb: z.number().min(0, 'must be 0 dB or more').max(40, 'must be at most 40 dB').default(0.5),
  /** Most straight segments per limit (a limit then has at most maxSegments + 1 breakpoints). */
  maxSegments: z.number().int().min(1, 'at least one segment').max(200, 'at most 200 segments').default(12),
  /** 1/N-octave smoothing, the same the envelope check applies (default 6). */
  smoothing: Smoothing.optional(),
  /** Transfer normalisation frequency (default 1000 Hz; null keeps the absolute gain). Transfer only. */
  referenceHz: z.number().positive().max(1e6).nullable().optional(),
  measure: SpectralMeasure.default('transfer'),
  /** Capture channel measured (default: the test case's first mapped channel, else 0). */
  channel: z.number().int().min(0).max(7).optional(),
  /** Frequency span of the limits (default: the test case's transfer band, else 20 Hz … min(20 kHz, 0.95·fs/2)). */
  bandHz: BandHz.optional(),
  /** Id of the proposed check. */
  checkId: CheckId.default('derived-envelope'),
});
export type DeriveMaskRequest = z.infer<typeof DeriveMaskRequest>;
export type DeriveMaskRequestInput = z.input<typeof DeriveMaskRequest>;

/** How a revision's limits were derived; stored in `mask_revision.derivation` when drafted from a proposal. */
export const MaskDerivation = z.object({
  captureIds: z.array(z.string()),
  k: z.number(),
  guardDb: z.number(),
  maxSegments: z.number().int(),
  smoothing: z.number().int().nullable(),
  referenceHz: z.number().nullable(),
  measure: SpectralMeasure,
  channel: z.number().int(),
  bandHz: z.tuple([z.number(), z.number()]),
  engineVersion: z.string(),
  /** Largest distance between a simplified limit and its raw curve, dB. */
  maxDeviationDb: z.number(),
  derivedAt: z.string(),
});
export type MaskDerivation = z.infer<typeof MaskDerivation>;

/** Statistics behind a proposal, decimated to log-spaced columns for plotting. */
export const DerivationStats = z.object({
  captures: z.number().int(),
  channel: z.number().int(),
  unit: z.enum(['dB', 'dBFS']),
  /** Column centres, Hz, ascending. */
  hz: z.array(z.number()),
  mean: z.array(z.number()),
  std: z.array(z.number()),
  /** mean ± (k·σ + guard) before simplification. */
  upperRaw: z.array(z.number()),
  lowerRaw: z.array(z.number()),
  /** Frequencies where every golden capture was measured (before decimation). */
  pointsUsed: z.number().int(),
  /** Largest |simplified − raw| over the measured frequencies, dB, per limit and overall. */
  maxDeviationDb: z.object({ upper: z.number(), lower: z.number(), overall: z.number() }),
  /**
   * Largest amount the simplified upper limit falls below the raw upper (or the lower rises above
   * the raw lower), dB. 0 by construction: the simplification only ever widens.
   */
  maxStrayDb: z.number(),
  /** The golden captures themselves, measured against the proposal: the smallest margin, dB. */
  worstGoldenMarginDb: z.number(),
  /** Each golden capture's curve in the same columns as `hz`, in the order of `derivation.captureIds`. */
  curves: z.array(z.array(z.number())).optional(),
});
export type DerivationStats = z.infer<typeof DerivationStats>;

/** A false-reject rate counted by leave-one-out over the golden captures, with its 95 % Wilson interval (Wilson 1927). */
export const LeaveOneOutRate = z.object({
  /** Fraction of golden captures that fail limits derived from the other N − 1 (0…1). */
  rate: z.number().min(0).max(1),
  low: z.number().min(0).max(1),
  high: z.number().min(0).max(1),
  n: z.number().int(),
  failures: z.number().int(),
});
export type LeaveOneOutRate = z.infer<typeof LeaveOneOutRate>;

/** The false-reject rate under a Gaussian model of each frequency (golden mean and σ), 0…1. */
export const ParametricRate = z.object({
  /** Shown rate: frequencies within one 1/N-octave band (N = the smoothing) move together, bands independently. */
  rate: z.number().min(0).max(1),
  /** All frequencies fully correlated: the worst single frequency's rate (lower bound). */
  correlatedBound: z.number().min(0).max(1),
  /** All frequencies independent (upper end). */
  independentBound: z.number().min(0).max(1),
  effectiveBands: z.number().int(),
});
export type ParametricRate = z.infer<typeof ParametricRate>;

export const YieldAtGuard = z.object({
  guardDb: z.number(),
  /** Null with fewer than three golden captures. */
  leaveOneOut: LeaveOneOutRate.nullable(),
  parametric: ParametricRate,
});
export type YieldAtGuard = z.infer<typeof YieldAtGuard>;

/**
 * "About X % of good units would fail": the estimated false-reject rate of the proposal at the
 * requested guard band, and the same with the guard band at 0…3 dB (or up to the requested one)
 * in 0.1 dB steps, other settings kept (docs/masks.md, "Yield estimate").
 */
export const YieldEstimate = z.object({
  leaveOneOut: LeaveOneOutRate.nullable(),
  parametric: ParametricRate,
  byGuardBandDb: z.array(YieldAtGuard),
});
export type YieldEstimate = z.infer<typeof YieldEstimate>;

/** Where a golden capture lies beyond 3σ of the others (docs/masks.md, "Outlying golden captures"). */
export const OutlierRegionDto = z.object({
  fromHz: z.number(),
  toHz: z.number(),
  /** At the worst band of the region: the capture minus the others' mean, dB. */
  deviationDb: z.number(),
  /** The same in standard deviations of the others. */
  sigmas: z.number(),
  atHz: z.number(),
});
export type OutlierRegionDto = z.infer<typeof OutlierRegionDto>;

export const GoldenOutlierDto = z.object({
  captureId: z.string(),
  /** Target key of the capture. */
  target: z.string(),
  regions: z.array(OutlierRegionDto),
  worst: OutlierRegionDto,
});
export type GoldenOutlierDto = z.infer<typeof GoldenOutlierDto>;

/**
 * Something the proposal should be read with. `mixed-targets`: the golden captures come from more
 * than one target (`targets`, their keys); the limits are derived anyway, since one mask may
 * deliberately cover several targets, but the wizard shows the warning before it is used.
 */
export const DeriveWarning = z.object({
  code: z.enum(['mixed-targets']),
  message: z.string(),
  targets: z.array(z.string()),
});
export type DeriveWarning = z.infer<typeof DeriveWarning>;

export const DeriveMaskResponse = z.object({
  /** A valid magnitude-envelope check (contracts' MaskCheck), ready to put in a draft. */
  check: MagnitudeEnvelopeCheck,
  stats: DerivationStats,
  derivation: MaskDerivation,
  /** Always sent by the API; optional so a response from a server before this field still parses. */
  yieldEstimate: YieldEstimate.optional(),
  /** Golden captures beyond 3σ of the others somewhere (at least four captures needed). */
  outliers: z.array(GoldenOutlierDto).default([]),
  warnings: z.array(DeriveWarning).default([]),
});
export type DeriveMaskResponse = z.infer<typeof DeriveMaskResponse>;

// ---------------------------------------------------------------------------------------------
// Impact of a revision on past builds

export const IMPACT_MAX_BUILDS = 100;

/** `POST …/masks/:revision/impact`: evaluate the revision on the captures of the last N builds. */
export const CreateImpactRunRequest = z.strictObject({
  builds: z.number().int().min(1, 'at least one build').max(IMPACT_MAX_BUILDS, `at most ${IMPACT_MAX_BUILDS} builds`).default(20),
});
export type CreateImpactRunRequest = z.infer<typeof CreateImpactRunRequest>;

export const ImpactRunState = z.enum(['queued', 'running', 'done', 'error']);
export type ImpactRunState = z.infer<typeof ImpactRunState>;

/** A verdict that changed between the stored (current) one and the draft's. */
export const VerdictFlip = z.enum(['pass-to-fail', 'fail-to-pass']);
export type VerdictFlip = z.infer<typeof VerdictFlip>;

/** One check's result: pass and the worst margin (in `unit`); null margin when not measurable. */
export const ImpactCheckOutcome = z.object({ pass: z.boolean(), margin: z.number().nullable() });

/** One check over a build's captures of the test case: current vs draft, worst margin over the captures. */
export const ImpactCheckRow = z.object({
  checkId: z.string(),
  unit: z.string().nullable(),
  /** From the newest stored verdicts; null when the current mask has no such check. */
  current: ImpactCheckOutcome.nullable(),
  /** Under the draft; null when the draft has no such check. */
  draft: ImpactCheckOutcome.nullable(),
  flip: VerdictFlip.nullable(),
});
export type ImpactCheckRow = z.infer<typeof ImpactCheckRow>;

export const ImpactCaptureRow = z.object({
  captureId: z.string(),
  target: z.string(),
  /** The newest stored verdict; null when the capture has none yet. */
  current: VerdictOutcome.nullable(),
  /** Revision number of the newest stored verdict's mask; null without one. */
  currentRevision: z.number().int().nullable(),
  draft: VerdictOutcome,
  flip: VerdictFlip.nullable(),
  reason: z.string().nullable(),
});
export type ImpactCaptureRow = z.infer<typeof ImpactCaptureRow>;

export const ImpactBuildRow = z.object({
  sha: z.string(),
  branch: z.string().nullable(),
  label: z.string().nullable(),
  createdAt: z.string(),
  /** Over the build's captures of this test case: fail if any failed, else error if any errored, else pass; null without stored verdicts. */
  current: VerdictOutcome.nullable(),
  draft: VerdictOutcome,
  flip: VerdictFlip.nullable(),
  checks: z.array(ImpactCheckRow),
  captures: z.array(ImpactCaptureRow),
});
export type ImpactBuildRow = z.infer<typeof ImpactBuildRow>;

export const ImpactResult = z.object({
  /** Newest build first. */
  builds: z.array(ImpactBuildRow),
  summary: z.object({
    builds: z.number().int(),
    captures: z.number().int(),
    passToFail: z.number().int(),
    failToPass: z.number().int(),
    /** Captures per flip, for the capture-level view. */
    capturesPassToFail: z.number().int(),
    capturesFailToPass: z.number().int(),
    /** Per check, the worst margin over every evaluated capture: current and draft. */
    worst: z.array(z.object({ checkId: z.string(), unit: z.string().nullable(), current: z.number().nullable(), draft: z.number().nullable() })),
  }),
});
export type ImpactResult = z.infer<typeof ImpactResult>;

export const ImpactRunDto = z.object({
  id: z.string(),
  testCase: z.string(),
  revision: z.number().int(),
  builds: z.number().int(),
  state: ImpactRunState,
  /** Captures evaluated so far, of `total`. */
  progress: z.number().int(),
  total: z.number().int(),
  requestedBy: z.string(),
  createdAt: z.string(),
  finishedAt: z.string().nullable(),
  error: z.string().nullable(),
  /** Present when state is done. */
  result: ImpactResult.nullable(),
});
export type ImpactRunDto = z.infer<typeof ImpactRunDto>;

// ---------------------------------------------------------------------------------------------
// Re-evaluation under an approved revision

export const REEVALUATE_SCOPES = ['open-builds', 'last-n'] as const;

/**
 * `POST …/masks/:revision/reevaluate` (approved revisions only): each selected capture of the
 * test case gets a new verdict under this revision, linked to the verdict it replaces.
 * `open-builds`: the newest build of each branch (builds without a branch count as one branch);
 * `last-n`: the project's last `builds` builds.
 */
export const ReevaluateRequest = z
  .strictObject({
    scope: z.enum(REEVALUATE_SCOPES),
    builds: z.number().int().min(1).max(IMPACT_MAX_BUILDS).optional(),
  })
  .superRefine((r, ctx) => {
    if (r.scope === 'open-builds' && r.builds !== undefined) ctx.addIssue({ code: 'custom', message: 'builds applies only to scope "last-n"', path: ['builds'] });
  });
export type ReevaluateRequest = z.infer<typeof ReevaluateRequest>;

export const ReevaluateResponse = z.object({
  revision: z.number().int(),
  /** Builds selected. */
  builds: z.number().int(),
  /** Captures queued for a new verdict (those already judged under this revision are skipped). */
  queued: z.number().int(),
  captureIds: z.array(z.string()),
  /** Selected captures skipped because the retention policy removed their audio (their verdicts stay). */
  purged: z.number().int().default(0),
});
export type ReevaluateResponse = z.infer<typeof ReevaluateResponse>;

// ---------------------------------------------------------------------------------------------
// Drift

/** `GET /api/projects/:project/drift`: margins over the last `project.driftWindow` builds of a branch. */
export const DriftQuery = z.object({
  branch: z.string().min(1).max(200),
  testCase: z.string().max(80).optional(),
  target: z.string().max(60).optional(),
  checkId: z.string().max(80).optional(),
});
export type DriftQuery = z.infer<typeof DriftQuery>;

export const DriftPoint = z.object({
  sha: z.string(),
  createdAt: z.string(),
  captureId: z.string(),
  pass: z.boolean(),
  margin: z.number().nullable(),
  /** Revision of the mask the margin was measured against. */
  maskRevision: z.number().int().nullable(),
});
export type DriftPoint = z.infer<typeof DriftPoint>;

/** A flagged check: its margin shrank by more than the project's threshold while still passing. */
export const DriftFlag = z.object({
  testCase: z.string(),
  target: z.string(),
  checkId: z.string(),
  unit: z.string().nullable(),
  /** The largest margin in the window and where it was. */
  bestMargin: z.number(),
  bestSha: z.string(),
  /** The newest build's margin (still ≥ 0). */
  latestMargin: z.number(),
  latestSha: z.string(),
  /** bestMargin − latestMargin, dB (> thresholdDb). */
  shrinkDb: z.number(),
  thresholdDb: z.number(),
  /** Builds in the window. */
  builds: z.number().int(),
});
export type DriftFlag = z.infer<typeof DriftFlag>;

export const DriftSeries = z.object({
  testCase: z.string(),
  target: z.string(),
  checkId: z.string(),
  unit: z.string().nullable(),
  /** Oldest first. */
  points: z.array(DriftPoint),
  flag: DriftFlag.nullable(),
});
export type DriftSeries = z.infer<typeof DriftSeries>;

export const DriftResponse = z.object({
  branch: z.string(),
  window: z.number().int(),
  thresholdDb: z.number(),
  series: z.array(DriftSeries),
});
export type DriftResponse = z.infer<typeof DriftResponse>;

/** Units a drift threshold in dB applies to. */
export const DRIFT_UNITS: readonly string[] = ['dB', 'dBFS'];

/**
 * The drift flag of one series (oldest first), or null: the newest point passes with a margin
 * that is more than `thresholdDb` below the largest margin in the window. Shared by the API
 * (drift page, build matrix) and the worker (drift mail) so both flag the same thing.
 */
export function driftFlagOf(
  key: { testCase: string; target: string; checkId: string; unit: string | null },
  points: readonly Pick<DriftPoint, 'sha' | 'pass' | 'margin'>[],
  thresholdDb: number,
): DriftFlag | null {
  if (key.unit !== null && !DRIFT_UNITS.includes(key.unit)) return null;
  const measured = points.filter((p): p is typeof p & { margin: number } => p.margin !== null);
  const latest = measured[measured.length - 1];
  if (measured.length < 2 || !latest || !latest.pass || latest.margin < 0) return null;
  let best = measured[0] as (typeof measured)[number];
  for (const p of measured) if (p.margin > best.margin) best = p;
  const shrinkDb = best.margin - latest.margin;
  if (!(shrinkDb > thresholdDb)) return null;
  return { ...key, bestMargin: best.margin, bestSha: best.sha, latestMargin: latest.margin, latestSha: latest.sha, shrinkDb, thresholdDb, builds: points.length };
}
