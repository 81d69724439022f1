import { z } from 'zod';
import { TargetKey } from './captures.js';
import { JudgingSettings } from './judging-settings.js';
import { MaskCheck } from './masks.js';

export const MaskRevisionState = z.enum(['draft', 'in_review', 'approved', 'superseded', 'rejected']);
export type MaskRevisionState = z.infer<typeof MaskRevisionState>;

export const MaskRevisionDto = z.object({
  id: z.string(),
  testCase: z.string(),
  /** null: applies to every target without a revision of its own. */
  target: z.string().nullable(),
  revision: z.number().int(),
  state: MaskRevisionState,
  checks: z.array(MaskCheck),
  note: z.string(),
  author: z.string(),
  reviewer: z.string().nullable(),
  /**
   * E-mail addresses of everyone who wrote or edited the revision, the author first: none of
   * them may approve or reject it (the four-eyes rule).
   */
  contributors: z.array(z.string()),
  createdAt: z.string(),
  decidedAt: z.string().nullable(),
  /** When the revision entered review; null while it is a draft that was never submitted. */
  submittedAt: z.string().nullable(),
  /** The reviewer's comment on approval (optional) or rejection (required). */
  decisionComment: z.string().nullable(),
  /** The revision number this one was copied from, if it was. */
  basedOn: z.number().int().nullable(),
  /** Stimulus, analysis settings and channel map that judge captures under this revision (reviewed with its checks). */
  settings: JudgingSettings,
});
export type MaskRevisionDto = z.infer<typeof MaskRevisionDto>;

export const CreateMaskRevisionRequest = z.strictObject({
  target: TargetKey.nullable().default(null),
  /** Validated as a MaskDocument (unique ids, every check's own rules) by the API. */
  checks: z.array(z.unknown()),
  note: z.string().max(4000).default(''),
});
export type CreateMaskRevisionRequest = z.infer<typeof CreateMaskRevisionRequest>;
