import { Migration } from '@mikro-orm/migrations';

export class Migration20261202054642 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`alter table "membership" add column "subscribed" boolean not null default false;`);
  }

  override async down(): Promise<void> {
    this.addSql(`alter table "membership" drop column "subscribed";`);
  }

}
