import { Migration } from '@mikro-orm/migrations';

/**
 * Four eyes: every mask revision records who wrote or edited it (user ids, author first), and
 * none of them may decide it. Existing revisions start with their author, followed by anyone
 * the audit log shows editing them before only authors could (so such an editor cannot now
 * approve what they changed).
 */
export class Migration20261202180300 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`alter table "mask_revision" add column "contributors" jsonb null;`);
    this.addSql(`update "mask_revision" m set "contributors" = jsonb_build_array(m."author_id") || coalesce((
      select jsonb_agg(editors."id" order by editors."first_edit", editors."id")
      from (
        select u."id", min(e."created_at") as "first_edit"
        from "audit_event" e
        join "test_case" t on t."id" = m."test_case_id"
        join "app_user" u on e."actor" = 'user:' || u."email"
        where e."action" = 'mask.edit' and e."project_id" = t."project_id"
          and e."subject" = 'mask:' || t."key" || '#' || m."revision" and u."id" <> m."author_id"
        group by u."id"
      ) editors
    ), '[]'::jsonb);`);
    this.addSql(`alter table "mask_revision" alter column "contributors" set not null;`);
  }

  override async down(): Promise<void> {
    this.addSql(`alter table "mask_revision" drop column "contributors";`);
  }

}
