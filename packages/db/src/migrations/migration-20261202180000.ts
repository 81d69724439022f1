import { Migration } from '@mikro-orm/migrations';

/**
 * Mail: the outbox keeps an HTML part next to the plain text, and build-failure mail becomes a
 * real per-member setting, on for engineers and QA managers (viewers opt in).
 */
export class Migration20261202180000 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`alter table "notification" add column "html" text null;`);

    this.addSql(`update "membership" set "subscribed" = true where "role" in ('engineer', 'qa_manager');`);
  }

  override async down(): Promise<void> {
    // The subscriptions stay as they are: who opted out since cannot be told apart.
    this.addSql(`alter table "notification" drop column "html";`);
  }

}
