import { AccountLinkSchema } from './account-link.entity.js';
import { ApiTokenSchema } from './api-token.entity.js';
import { AuditEventSchema } from './audit-event.entity.js';
import { BuildSchema } from './build.entity.js';
import { CaptureSchema } from './capture.entity.js';
import { CheckResultSchema } from './check-result.entity.js';
import { CommentSchema } from './comment.entity.js';
import { FindingSchema } from './finding.entity.js';
import { ImpactRunSchema } from './impact-run.entity.js';
import { MaskRevisionSchema } from './mask-revision.entity.js';
import { MembershipSchema } from './membership.entity.js';
import { NotificationSchema } from './notification.entity.js';
import { ProjectSchema } from './project.entity.js';
import { RefreshSessionSchema } from './refresh-session.entity.js';
import { SignInLimitSchema } from './sign-in-limit.entity.js';
import { TargetSchema } from './target.entity.js';
import { TestCaseSchema } from './test-case.entity.js';
import { UserSchema } from './user.entity.js';
import { VerdictSchema } from './verdict.entity.js';
import { WaiverSchema } from './waiver.entity.js';

export * from './account-link.entity.js';
export * from './api-token.entity.js';
export * from './audit-event.entity.js';
export * from './base.js';
export * from './build.entity.js';
export * from './capture.entity.js';
export * from './check-result.entity.js';
export * from './comment.entity.js';
export * from './finding.entity.js';
export * from './impact-run.entity.js';
export * from './mask-revision.entity.js';
export * from './membership.entity.js';
export * from './notification.entity.js';
export * from './project.entity.js';
export * from './refresh-session.entity.js';
export * from './sign-in-limit.entity.js';
export * from './target.entity.js';
export * from './test-case.entity.js';
export * from './user.entity.js';
export * from './verdict.entity.js';
export * from './waiver.entity.js';

export const entitySchemas = [
  UserSchema, ProjectSchema, MembershipSchema, TargetSchema, TestCaseSchema, MaskRevisionSchema,
  BuildSchema, CaptureSchema, VerdictSchema, CheckResultSchema, FindingSchema, CommentSchema,
  WaiverSchema, ApiTokenSchema, AuditEventSchema, NotificationSchema, ImpactRunSchema,
  RefreshSessionSchema, SignInLimitSchema, AccountLinkSchema,
];
