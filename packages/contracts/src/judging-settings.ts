import { z } from 'zod';
import { StimulusSpec } from './stimulus.js';

/** How the worker analyses captures of a test case. */
export const AnalysisSettings = z.strictObject({
  /** Transfer estimator; default: deconvolution for sweeps, H1 otherwise. */
  transferMethod: z.enum(['h1', 'deconvolution']).optional(),
  /** Band for group delay and phase linearity (default: where |H| is within 20 dB of its maximum). */
  transferBandHz: z
    .tuple([z.number().positive(), z.number().positive()])
    .refine(([lo, hi]) => lo < hi, 'the lower edge must be below the upper edge')
    .optional(),
});
export type AnalysisSettings = z.infer<typeof AnalysisSettings>;

/** 0-based capture channels to analyse; empty means all of them. */
export const ChannelMap = z.array(z.number().int().min(0).max(7)).max(8);
export type ChannelMap = z.infer<typeof ChannelMap>;

/**
 * Everything besides the mask that decides a verdict. A mask revision carries its own copy
 * (reviewed and approved with its checks) and every verdict records the copy it was judged with.
 */
export const JudgingSettings = z.strictObject({
  stimulus: StimulusSpec,
  analysis: AnalysisSettings,
  channelMap: ChannelMap,
});
export type JudgingSettings = z.infer<typeof JudgingSettings>;

/** The fields of JudgingSettings, in the order messages and diffs name them. */
export const JUDGING_SETTING_FIELDS = ['stimulus', 'analysis', 'channelMap'] as const;
export type JudgingSettingField = (typeof JUDGING_SETTING_FIELDS)[number];
