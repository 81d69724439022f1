import { z } from 'zod';
import { TargetKey, TestCaseKey } from './captures.js';
import { AnalysisSettings, ChannelMap } from './judging-settings.js';
import { StimulusSpec } from './stimulus.js';

export const TargetDto = z.object({
  key: z.string(),
  name: z.string(),
  description: z.string(),
  sampleRate: z.number().int().nullable(),
  createdAt: z.string(),
});
export type TargetDto = z.infer<typeof TargetDto>;

export const CreateTargetRequest = z.strictObject({
  key: TargetKey,
  name: z.string().min(1).max(120),
  description: z.string().max(2000).default(''),
  sampleRate: z.number().int().min(8000).max(192000).nullable().default(null),
});
export type CreateTargetRequest = z.infer<typeof CreateTargetRequest>;

export const UpdateTargetRequest = CreateTargetRequest.omit({ key: true }).partial();
export type UpdateTargetRequest = z.infer<typeof UpdateTargetRequest>;

export const TestCaseDto = z.object({
  key: z.string(),
  name: z.string(),
  description: z.string(),
  stimulus: StimulusSpec,
  analysis: AnalysisSettings,
  channelMap: ChannelMap,
  /**
   * Captures exist: stimulus, analysis settings and channel map then change only through a
   * reviewed mask revision (PATCH answers 409); name and description stay editable.
   */
  hasCaptures: z.boolean(),
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type TestCaseDto = z.infer<typeof TestCaseDto>;

export const CreateTestCaseRequest = z.strictObject({
  key: TestCaseKey,
  name: z.string().min(1).max(160),
  description: z.string().max(4000).default(''),
  stimulus: StimulusSpec,
  analysis: AnalysisSettings.default({}),
  channelMap: ChannelMap.default([]),
});
export type CreateTestCaseRequest = z.infer<typeof CreateTestCaseRequest>;

export const UpdateTestCaseRequest = z.strictObject({
  name: z.string().min(1).max(160).optional(),
  description: z.string().max(4000).optional(),
  stimulus: StimulusSpec.optional(),
  analysis: AnalysisSettings.optional(),
  channelMap: ChannelMap.optional(),
});
export type UpdateTestCaseRequest = z.infer<typeof UpdateTestCaseRequest>;
