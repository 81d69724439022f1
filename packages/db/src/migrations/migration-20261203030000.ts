import { Migration } from '@mikro-orm/migrations';

/**
 * Data lifecycle (retention, orphan clean-up, storage quotas):
 * 1. `capture.purged_at`: when the retention policy deleted the capture's audio and plots. The
 *    row, its verdicts, check results and findings stay.
 * 2. `project.storage_quota_bytes`: bytes of stored capture audio the project may hold (null: the
 *    server's default, 0: unlimited).
 * 3. `capture_stored_size_idx`: the quota check at every upload sums a project's stored bytes from
 *    this index alone (partial: purged captures no longer count).
 * 4. `capture_object_key_idx`: the orphan clean-up asks, for each object it lists, whether a row
 *    holds its key.
 */
export class Migration20261203030000 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`alter table "capture" add column "purged_at" timestamptz null;`);
    this.addSql(`alter table "project" add column "storage_quota_bytes" bigint null;`);
    this.addSql(`create index "capture_stored_size_idx" on "capture" ("project_id") include ("size_bytes") where "purged_at" is null;`);
    this.addSql(`create index "capture_object_key_idx" on "capture" ("object_key");`);
  }

  override async down(): Promise<void> {
    this.addSql(`drop index if exists "capture_object_key_idx";`);
    this.addSql(`drop index if exists "capture_stored_size_idx";`);
    this.addSql(`alter table "project" drop column if exists "storage_quota_bytes";`);
    this.addSql(`alter table "capture" drop column if exists "purged_at";`);
  }

}
