import { Migration } from '@mikro-orm/migrations';

/**
 * CI tokens may expire: `api_token.expires_at` is the instant after which the token is refused
 * (null: never, which is what every existing token keeps).
 */
export class Migration20261203060100 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`alter table "api_token" add column "expires_at" timestamptz null;`);
  }

  override async down(): Promise<void> {
    this.addSql(`alter table "api_token" drop column if exists "expires_at";`);
  }

}
