import { Migration } from '@mikro-orm/migrations';

/**
 * Judging settings versioned with the mask: every revision carries the stimulus, analysis
 * settings and channel map it judges with, and every verdict the copy it was judged with.
 * Existing revisions take their test case's current settings (what judged them until now);
 * existing verdicts keep null, since the settings they were judged with were not recorded.
 */
export class Migration20261202180400 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`alter table "mask_revision" add column "settings" jsonb null;`);
    this.addSql(`update "mask_revision" m set "settings" = jsonb_build_object('stimulus', t."stimulus", 'analysis', t."analysis", 'channelMap', t."channel_map") from "test_case" t where t."id" = m."test_case_id";`);
    this.addSql(`alter table "mask_revision" alter column "settings" set not null;`);

    this.addSql(`alter table "verdict" add column "settings" jsonb null;`);
  }

  override async down(): Promise<void> {
    this.addSql(`alter table "verdict" drop column "settings";`);

    this.addSql(`alter table "mask_revision" drop column "settings";`);
  }

}
