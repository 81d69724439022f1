import { z } from 'zod';
import { BuildRow, BuildStatus } from './builds.js';
import { CaptureDto, CheckResultDto, WaiverMark } from './captures.js';
import { DriftFlag } from './mask-derivation.js';
import { CheckId, MaskCheck, SpectralMeasure } from './masks.js';

/**
 * Verdict counts of a build's captures. `waived`: how many of the `pass` passed with waiver
 * (always sent by the API; optional only so older fixtures type-check).
 */
export const VerdictCounts = z.object({ pass: z.number().int(), fail: z.number().int(), error: z.number().int(), pending: z.number().int(), waived: z.number().int().optional() });
export type VerdictCounts = z.infer<typeof VerdictCounts>;

export const BuildSummary = BuildRow.extend({ counts: VerdictCounts });
export type BuildSummary = z.infer<typeof BuildSummary>;

export const BUILD_SORTS = ['-createdAt', 'createdAt', 'sha', '-sha', 'branch', '-branch', 'status', '-status'] as const;

/** Query of the builds table: server-side paging, sorting and filtering. */
export const BuildsQuery = z.object({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(25),
  sort: z.enum(BUILD_SORTS).default('-createdAt'),
  /** SHA prefix (hex). */
  sha: z.string().regex(/^[0-9a-f]{1,64}$/, 'hex digits').optional(),
  branch: z.string().max(200).optional(),
  status: BuildStatus.optional(),
  /** Builds with at least one capture on this target. */
  target: z.string().max(60).optional(),
  from: z.iso.date().optional(),
  to: z.iso.date().optional(),
});
export type BuildsQuery = z.infer<typeof BuildsQuery>;

export const BuildsPage = z.object({
  items: z.array(BuildSummary),
  total: z.number().int(),
  page: z.number().int(),
  pageSize: z.number().int(),
});
export type BuildsPage = z.infer<typeof BuildsPage>;

/** Pass rate of recent builds, oldest first, for the small trend chart. */
export const BuildTrend = z.object({
  points: z.array(z.object({ sha: z.string(), createdAt: z.string(), status: BuildStatus, passed: z.number().int(), total: z.number().int() })),
});
export type BuildTrend = z.infer<typeof BuildTrend>;

export const CellOutcome = z.enum(['pass', 'fail', 'error', 'pending']);
export type CellOutcome = z.infer<typeof CellOutcome>;

/** One test case × target cell of a build: its newest capture there. */
export const MatrixCell = z.object({
  testCase: z.string(),
  target: z.string(),
  captureId: z.string(),
  outcome: CellOutcome,
  /** Failing checks, worst margin first (a waived one carries its `waiver`). */
  failing: z.array(CheckResultDto),
  /** For an error cell: why the capture could not be judged, in words (the verdict's reason). Optional only so older fixtures type-check. */
  reason: z.string().nullable().optional(),
  /** For a cell passing with waiver: the waiver ending first. Always sent by the API; optional only so older fixtures type-check. */
  waiver: WaiverMark.nullable().optional(),
  /** Outcome of the same cell in the compared build; null when it had no capture there. */
  previous: CellOutcome.nullable(),
});
export type MatrixCell = z.infer<typeof MatrixCell>;

export const BuildMatrix = z.object({
  build: BuildSummary,
  testCases: z.array(z.object({ key: z.string(), name: z.string() })),
  targets: z.array(z.object({ key: z.string(), name: z.string() })),
  cells: z.array(MatrixCell),
  /** The previous build on the same branch (else the previous build), compared cell by cell. */
  compared: BuildSummary.nullable(),
  /** Checks on this build's branch whose margin shrank by more than the project's drift threshold while still passing (window ending at this build). Always sent by the API; optional only so older fixtures still type-check. */
  drift: z.array(DriftFlag).optional(),
});
export type BuildMatrix = z.infer<typeof BuildMatrix>;

export const FindingState = z.enum(['open', 'investigating', 'accepted_deviation', 'fixed', 'not_a_defect']);
export type FindingState = z.infer<typeof FindingState>;

export const FindingRow = z.object({
  id: z.string(),
  title: z.string(),
  checkId: z.string(),
  state: FindingState,
  testCase: z.string(),
  target: z.string(),
  buildSha: z.string(),
  captureId: z.string(),
  assignee: z.object({ id: z.string(), displayName: z.string(), email: z.string() }).nullable(),
  margin: z.number().nullable(),
  unit: z.string().nullable(),
  worstHz: z.number().nullable(),
  commentCount: z.number().int(),
  createdAt: z.string(),
  updatedAt: z.string(),
  /**
   * Triage fields, always sent by the API (optional only so older fixtures type-check):
   * the branch of the finding's builds, the check's kind and mask label (the title is rendered
   * from these and the numbers above, never from a stored sentence), the first failing build of
   * the finding, how many builds it failed, and the first build of its current failing streak
   * (null when the newest capture of its cell on that branch passes the check).
   */
  branch: z.string().nullable().optional(),
  checkKind: z.string().nullable().optional(),
  checkLabel: z.string().nullable().optional(),
  firstSeen: z.object({ sha: z.string(), createdAt: z.string() }).nullable().optional(),
  occurrences: z.number().int().optional(),
  failingSince: z.object({ sha: z.string(), createdAt: z.string() }).nullable().optional(),
});
export type FindingRow = z.infer<typeof FindingRow>;

export const FindingsQuery = z.object({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
  state: z.union([FindingState, z.literal('active')]).optional(),
  /** A user id, or `me`, or `none` for unassigned. */
  assignee: z.string().max(40).optional(),
  testCase: z.string().max(80).optional(),
  target: z.string().max(60).optional(),
  captureId: z.uuid().optional(),
  /** Findings of builds on this branch only. */
  branch: z.string().min(1).max(200).optional(),
});
export type FindingsQuery = z.infer<typeof FindingsQuery>;

export const FindingsPage = z.object({ items: z.array(FindingRow), total: z.number().int(), page: z.number().int(), pageSize: z.number().int() });
export type FindingsPage = z.infer<typeof FindingsPage>;

export const UpdateFindingRequest = z.strictObject({
  state: FindingState.optional(),
  /** A member's user id, or null to unassign. */
  assigneeId: z.uuid().nullable().optional(),
});
export type UpdateFindingRequest = z.infer<typeof UpdateFindingRequest>;

export const BulkUpdateFindingsRequest = UpdateFindingRequest.extend({ ids: z.array(z.uuid()).min(1).max(200) });
export type BulkUpdateFindingsRequest = z.infer<typeof BulkUpdateFindingsRequest>;

export const CommentRow = z.object({ id: z.string(), author: z.object({ id: z.string(), displayName: z.string() }), body: z.string(), createdAt: z.string() });
export type CommentRow = z.infer<typeof CommentRow>;

export const CreateCommentRequest = z.strictObject({ body: z.string().trim().min(1, 'write something').max(10000) });
export type CreateCommentRequest = z.infer<typeof CreateCommentRequest>;

/** Everything the capture page shows besides its plots. */
export const CaptureDetail = z.object({
  capture: CaptureDto,
  testCase: z.object({ key: z.string(), name: z.string(), stimulusKind: z.string() }),
  target: z.object({ key: z.string(), name: z.string() }),
  build: BuildSummary,
  mask: z.object({ id: z.string(), revision: z.number().int(), checks: z.array(MaskCheck) }).nullable(),
  findings: z.array(FindingRow),
  /** The newest passing capture of the same test case and target in an earlier build. */
  lastPassing: z.object({ captureId: z.string(), buildSha: z.string(), createdAt: z.string() }).nullable(),
});
export type CaptureDetail = z.infer<typeof CaptureDetail>;

/** One band of a band-levels check as drawn: a step over [lowerHz, upperHz]. */
export const PlotBand = z.object({
  nominalHz: z.number(),
  lowerHz: z.number(),
  upperHz: z.number(),
  measured: z.number().nullable(),
  min: z.number().nullable(),
  max: z.number().nullable(),
  margin: z.number().nullable(),
  /** Why this band could not be measured. */
  error: z.string().nullable(),
});
export type PlotBand = z.infer<typeof PlotBand>;

const Series = z.object({ hz: z.array(z.number()), min: z.array(z.number().nullable()), max: z.array(z.number().nullable()) });

/**
 * Plot data of a capture, decimated on the server (min/max per column on log frequency,
 * or per time column for the waveform) so the page stays fast for long captures.
 */
export const CapturePlot = z.object({
  channel: z.number().int(),
  /** The magnitude-envelope check drawn (null when the mask has none). */
  checkId: z.string().nullable(),
  unit: z.enum(['dB', 'dBFS']),
  spectrum: Series,
  upper: z.array(z.object({ hz: z.number(), db: z.number() })).nullable(),
  lower: z.array(z.object({ hz: z.number(), db: z.number() })).nullable(),
  failingRegions: z.array(z.object({ fromHz: z.number(), toHz: z.number(), worstHz: z.number(), worstMargin: z.number() })),
  worst: z.object({ hz: z.number(), db: z.number(), margin: z.number() }).nullable(),
  /** The same curve for the last passing capture, when asked for and available. */
  overlay: z.object({ captureId: z.string(), buildSha: z.string(), spectrum: Series }).nullable(),
  /** Unwrapped phase (degrees, bulk latency removed) and group delay (ms, latency included) of the transfer function; null without a stimulus. */
  phase: z.object({ hz: z.array(z.number()), deg: z.array(z.number()) }).nullable(),
  groupDelay: z.object({ hz: z.array(z.number()), ms: z.array(z.number()) }).nullable(),
  waveform: z.object({ seconds: z.array(z.number()), min: z.array(z.number()), max: z.array(z.number()) }),
  engineVersion: z.string(),
  // The fields below are always sent by the API; optional only so older fixtures and stored plots type-check.
  /** The kind of the check drawn: an envelope draws limit curves, band levels draw steps (`bands`). */
  checkKind: z.enum(['magnitude-envelope', 'band-levels']).nullable().optional(),
  /** What the spectrum is: the transfer magnitude |H| or the capture's own level. */
  measure: SpectralMeasure.optional(),
  /** Frequency the transfer magnitude is normalised to 0 dB at (null: absolute |H|, or a level). */
  normalisedAtHz: z.number().nullable().optional(),
  /** A band-levels check: each band's edges, measured level and limits (null where absent), drawn as steps. */
  bands: z.array(PlotBand).nullable().optional(),
});
export type CapturePlot = z.infer<typeof CapturePlot>;

export const PlotQuery = z.object({
  columns: z.coerce.number().int().min(64).max(4096).default(1024),
  channel: z.coerce.number().int().min(0).max(7).optional(),
  overlay: z.enum(['none', 'last-passing']).default('last-passing'),
  /** The spectral check (magnitude-envelope or band-levels) whose limits are drawn; default: the view the page opens on (`defaultPlotSelection`). */
  check: CheckId.optional(),
});
export type PlotQuery = z.infer<typeof PlotQuery>;

/** A re-analysis queued: the capture is `queued` again and its page follows the new verdict. */
export const ReanalyseResponse = z.object({ captureId: z.string(), status: z.literal('queued'), reanalysisId: z.string() });
export type ReanalyseResponse = z.infer<typeof ReanalyseResponse>;

export const AudioKind = z.enum(['capture', 'stimulus', 'residual']);
export type AudioKind = z.infer<typeof AudioKind>;

