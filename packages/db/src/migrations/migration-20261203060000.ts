import { Migration } from '@mikro-orm/migrations';

/**
 * Administration (issue 14):
 * 1. `account_link`: one-time links mailed for an invitation or a password reset; only the
 *    SHA-256 of the link's secret is kept.
 * 2. `app_user.awaiting_password`: an invited person who has not set a password yet.
 * 3. `project.archived_at`: archived projects leave the lists and accept no uploads.
 */
export class Migration20261203060000 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table "account_link" ("id" uuid not null, "created_at" timestamptz not null, "user_id" uuid not null, "purpose" text check ("purpose" in ('invite', 'reset')) not null, "token_hash" varchar(64) not null, "expires_at" timestamptz not null, "used_at" timestamptz null, constraint "account_link_pkey" primary key ("id"));`);
    this.addSql(`alter table "account_link" add constraint "account_link_token_hash_unique" unique ("token_hash");`);
    this.addSql(`alter table "account_link" add constraint "account_link_user_id_foreign" foreign key ("user_id") references "app_user" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "app_user" add column "awaiting_password" boolean not null default false;`);
    this.addSql(`alter table "project" add column "archived_at" timestamptz null;`);
  }

  override async down(): Promise<void> {
    this.addSql(`alter table "project" drop column if exists "archived_at";`);
    this.addSql(`alter table "app_user" drop column if exists "awaiting_password";`);
    this.addSql(`drop table if exists "account_link" cascade;`);
  }

}
