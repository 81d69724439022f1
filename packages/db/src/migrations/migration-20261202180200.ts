import { Migration } from '@mikro-orm/migrations';

/**
 * Waivers re-judge captures: approving, revoking or expiring a waiver writes a new verdict
 * under the same revision and engine, told apart by the waivers it was judged with.
 * Existing verdicts take '' (no basis recorded); the unique index keeps NULLS NOT DISTINCT.
 */
export class Migration20261202180200 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`alter table "verdict" add column "waiver_basis" text not null default '';`);

    this.addSql(`drop index "verdict_capture_mask_revision_engine_unique";`);
    this.addSql(`create unique index "verdict_capture_mask_revision_engine_waivers_unique" on "verdict" ("capture_id", "mask_revision_id", "engine_version", "waiver_basis") nulls not distinct;`);
  }

  override async down(): Promise<void> {
    // Only the first verdict of each capture, revision and engine survives the older index.
    this.addSql(`delete from "verdict" v using "verdict" w where w."capture_id" = v."capture_id" and w."mask_revision_id" is not distinct from v."mask_revision_id" and w."engine_version" = v."engine_version" and (w."created_at", w."id") < (v."created_at", v."id");`);
    this.addSql(`drop index "verdict_capture_mask_revision_engine_waivers_unique";`);
    this.addSql(`create unique index "verdict_capture_mask_revision_engine_unique" on "verdict" ("capture_id", "mask_revision_id", "engine_version") nulls not distinct;`);

    this.addSql(`alter table "verdict" drop column "waiver_basis";`);
  }

}
