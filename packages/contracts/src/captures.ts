import { z } from 'zod';
import { BuildRow } from './builds.js';
import { JudgingSettings } from './judging-settings.js';

export const CaptureStatus = z.enum(['queued', 'analysing', 'done', 'error']);
export type CaptureStatus = z.infer<typeof CaptureStatus>;

export const VerdictOutcome = z.enum(['pass', 'fail', 'error']);
export type VerdictOutcome = z.infer<typeof VerdictOutcome>;

/** Keys of test cases (`eq.music.sweep`) and targets (`evt2-48k`). */
export const TestCaseKey = z.string().min(1).max(80).regex(/^[a-z0-9][a-z0-9._-]*$/, 'lower-case letters, digits, dots, dashes and underscores');
export const TargetKey = z.string().min(1).max(60).regex(/^[a-z0-9][a-z0-9._-]*$/, 'lower-case letters, digits, dots, dashes and underscores');

/** Media type of a raw little-endian float32 upload; rate and channels go in X-Sample-Rate / X-Channels. */
export const RAW_FLOAT32_MEDIA_TYPE = 'application/x-earmark-f32le';
export const WAV_MEDIA_TYPES = ['audio/wav', 'audio/x-wav', 'audio/wave', 'audio/vnd.wave'] as const;

/** "Passed with waiver, until <date>": the approved waiver that counts a failing check as passed, and its end. */
export const WaiverMark = z.object({ id: z.string(), until: z.string() });
export type WaiverMark = z.infer<typeof WaiverMark>;

/** One evaluated check of a mask. Margin is positive inside the limit, negative outside. */
export const CheckResultDto = z.object({
  id: z.string(),
  kind: z.string(),
  label: z.string().nullable(),
  pass: z.boolean(),
  measured: z.number().nullable(),
  limit: z.number().nullable(),
  margin: z.number().nullable(),
  unit: z.string().nullable(),
  worstHz: z.number().nullable(),
  /** A failing check covered by an approved waiver (the verdict counts it as passed with waiver). */
  waived: z.boolean().optional(),
  /** The waiver covering this failing check (null when none does). Always sent by the API; optional only so older fixtures type-check. */
  waiver: WaiverMark.nullable().optional(),
  /** Plain-word notes on what makes this check's number less reliable (from the measures it used). */
  warnings: z.array(z.string()).optional(),
  /** Why the check could not be evaluated (the verdict is then `error`). */
  error: z.string().optional(),
  /** The channel that set the numbers (the worst one); null for checks over all channels at once. Optional only so older fixtures type-check. */
  channel: z.number().int().nullable().optional(),
});
export type CheckResultDto = z.infer<typeof CheckResultDto>;

export const VerdictDto = z.object({
  outcome: VerdictOutcome,
  reason: z.string().nullable(),
  engineVersion: z.string(),
  maskRevisionId: z.string().nullable(),
  maskRevision: z.number().int().nullable(),
  createdAt: z.string(),
  checks: z.array(CheckResultDto),
  /**
   * For a verdict that passes with waiver: the waiver of its checks that ends first (the verdict
   * fails again then, unless renewed). null otherwise. Always sent by the API; optional only so older fixtures type-check.
   */
  waiver: WaiverMark.nullable().optional(),
  /**
   * The stimulus, analysis settings and channel map this verdict was judged with (its mask
   * revision's). null for verdicts recorded before settings were recorded.
   */
  settings: JudgingSettings.nullable().optional(),
  /** For a re-evaluation: the outcome of the verdict this one replaced. */
  previousOutcome: VerdictOutcome.nullable().optional(),
  /** For a re-evaluation: the engine and mask revision of the verdict this one replaced (why it changed). */
  previousEngineVersion: z.string().optional(),
  previousMaskRevision: z.number().int().nullable().optional(),
  /** For a re-evaluation: the checks whose result or number changed, before and after. */
  changes: z
    .array(
      z.object({
        checkId: z.string(),
        unit: z.string().nullable(),
        before: z.object({ pass: z.boolean(), measured: z.number().nullable() }).nullable(),
        after: z.object({ pass: z.boolean(), measured: z.number().nullable() }).nullable(),
      }),
    )
    .optional(),
});
export type VerdictDto = z.infer<typeof VerdictDto>;

export const CaptureDto = z.object({
  id: z.string(),
  projectKey: z.string(),
  buildSha: z.string(),
  testCase: z.string(),
  target: z.string(),
  status: CaptureStatus,
  sha256: z.string(),
  sizeBytes: z.number().int(),
  sampleRate: z.number().int(),
  channels: z.number().int(),
  frames: z.number().int(),
  createdAt: z.string(),
  /** When the retention policy removed the audio (null while it is stored); the verdict stays. */
  purgedAt: z.string().nullable(),
  verdict: VerdictDto.nullable(),
  links: z.object({ self: z.string(), build: z.string(), dashboard: z.string() }),
});
export type CaptureDto = z.infer<typeof CaptureDto>;

export const BuildDetail = BuildRow.extend({
  /** Captures by newest verdict; `waived`: how many of the `pass` passed with waiver. */
  counts: z.object({ pass: z.number().int(), fail: z.number().int(), error: z.number().int(), pending: z.number().int(), waived: z.number().int().optional() }),
  captures: z.array(CaptureDto),
  links: z.object({ self: z.string(), junit: z.string(), dashboard: z.string() }),
});
export type BuildDetail = z.infer<typeof BuildDetail>;
