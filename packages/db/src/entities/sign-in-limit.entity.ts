import { EntitySchema } from '@mikro-orm/core';

/**
 * One sign-in limiter count, shared by every API process. Written only by rate-limiter-flexible's
 * RateLimiterPostgres (apps/api/src/auth/shared-limit-store.ts), in its layout: `expire` is epoch
 * milliseconds. Declared here so the schema check knows the table; no code loads it as an entity.
 */
export class SignInLimit {
  key!: string;
  points!: number;
  expire!: string | null;
}

export const SignInLimitSchema = new EntitySchema<SignInLimit>({
  class: SignInLimit,
  tableName: 'sign_in_limit',
  properties: {
    key: { type: 'string', length: 255, primary: true },
    points: { type: 'integer', default: 0 },
    expire: { type: 'bigint', nullable: true },
  },
});
