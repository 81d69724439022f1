import { Migration } from '@mikro-orm/migrations';

/**
 * Refresh-token families: one row per sign-in chain, holding the only refresh token (jti) of
 * the chain that may still be exchanged. Tokens issued before this migration carry no family
 * and stop working, so every user signs in once more.
 */
export class Migration20261202190100 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table "refresh_session" ("id" uuid not null, "created_at" timestamptz not null, "user_id" uuid not null, "current_jti" uuid not null, "expires_at" timestamptz not null, "revoked_at" timestamptz null, constraint "refresh_session_pkey" primary key ("id"));`);
    this.addSql(`alter table "refresh_session" add constraint "refresh_session_user_id_foreign" foreign key ("user_id") references "app_user" ("id") on update cascade on delete cascade;`);
  }

  override async down(): Promise<void> {
    this.addSql(`drop table if exists "refresh_session" cascade;`);
  }

}
