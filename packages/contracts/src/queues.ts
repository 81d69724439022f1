import { z } from 'zod';

/** pg-boss queue names and their payloads, shared by the API (producer) and the worker. */
export const QUEUES = {
  analyzeCapture: 'analyze-capture',
  sendNotifications: 'send-notifications',
  /** Evaluating a mask revision against past builds' captures (ImpactRun). */
  evaluateImpact: 'evaluate-impact',
  /** Hourly (scheduled): the retention policy and the orphan clean-up of the object store. */
  applyRetention: 'apply-retention',
} as const;

export const AnalyzeCaptureJob = z.object({
  captureId: z.uuid(),
  /** Re-evaluation: judge under this (approved) revision instead of the one in force, linking the new verdict to the one it replaces. */
  maskRevisionId: z.uuid().optional(),
  /**
   * A person asked for the capture to be analysed again: the new verdict's basis names this
   * request, so it is written even under the same revision and engine (once per request).
   */
  reanalysisId: z.uuid().optional(),
});
export type AnalyzeCaptureJob = z.infer<typeof AnalyzeCaptureJob>;

export const SendNotificationsJob = z.object({ reason: z.string().max(200).optional() });
export type SendNotificationsJob = z.infer<typeof SendNotificationsJob>;

export const EvaluateImpactJob = z.object({ impactRunId: z.uuid() });
export type EvaluateImpactJob = z.infer<typeof EvaluateImpactJob>;

/** The scheduled run sends `{}`; a manual run may say why. */
export const ApplyRetentionJob = z.object({ reason: z.string().max(200).optional() });
export type ApplyRetentionJob = z.infer<typeof ApplyRetentionJob>;
