import { Migration } from '@mikro-orm/migrations';

/** Mail outbox back-off: a refused message waits until `next_attempt_at` before its next try. */
export class Migration20261202190000 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`alter table "notification" add column "next_attempt_at" timestamptz null;`);
  }

  override async down(): Promise<void> {
    this.addSql(`alter table "notification" drop column "next_attempt_at";`);
  }

}
