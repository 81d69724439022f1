import { Migration } from '@mikro-orm/migrations';

/** Engine 1.0: a capture may be judged again under the same revision by a newer engine. */
export class Migration20261202143502 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`drop index "verdict_capture_mask_revision_unique";`);

    this.addSql(`create unique index "verdict_capture_mask_revision_engine_unique" on "verdict" ("capture_id", "mask_revision_id", "engine_version") nulls not distinct;`);
  }

  override async down(): Promise<void> {
    this.addSql(`drop index "verdict_capture_mask_revision_engine_unique";`);

    this.addSql(`create unique index "verdict_capture_mask_revision_unique" on "verdict" ("capture_id", "mask_revision_id") nulls not distinct;`);
  }

}
