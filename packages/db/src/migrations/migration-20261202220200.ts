import { Migration } from '@mikro-orm/migrations';

/**
 * 1. Every verdict insert notifies `earmark_verdict_recorded` with its capture id, delivered at
 *    commit: API processes hold `GET /api/v1/captures/:id?wait=N` on one LISTEN connection each
 *    instead of polling. A trigger, so every writer (analysis, re-evaluation, waiver re-judging,
 *    the dead-letter handler) notifies without remembering to.
 * 2. `sign_in_limit`: the sign-in limiter's counts, shared by every API process. The layout is the
 *    one rate-limiter-flexible's RateLimiterPostgres reads and writes (key, points, expire in epoch
 *    ms); its entity (`sign-in-limit.entity.ts`) only tells the schema check about it.
 * 3. `capture_queued_project_idx`: the waiting captures of a project in order, which the job
 *    producer counts to give each capture its fair priority (packages/domain/src/jobs/fair-priority.ts).
 *    Partial (status 'queued' only), so it stays as small as the queue.
 */
export class Migration20261202220200 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create function "earmark_notify_verdict_recorded"() returns trigger language plpgsql as $$
begin
  perform pg_notify('earmark_verdict_recorded', new."capture_id"::text);
  return null;
end $$;`);
    this.addSql(`create trigger "verdict_notify" after insert on "verdict" for each row execute function "earmark_notify_verdict_recorded"();`);
    this.addSql(`create table "sign_in_limit" ("key" varchar(255) not null, "points" integer not null default 0, "expire" bigint null, constraint "sign_in_limit_pkey" primary key ("key"));`);
    this.addSql(`create index "capture_queued_project_idx" on "capture" ("project_id", "created_at", "id") where "status" = 'queued';`);
  }

  override async down(): Promise<void> {
    this.addSql(`drop index if exists "capture_queued_project_idx";`);
    this.addSql(`drop table if exists "sign_in_limit";`);
    this.addSql(`drop trigger if exists "verdict_notify" on "verdict";`);
    this.addSql(`drop function if exists "earmark_notify_verdict_recorded"();`);
  }

}
