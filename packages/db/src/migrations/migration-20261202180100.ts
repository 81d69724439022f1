import { Migration } from '@mikro-orm/migrations';

/**
 * The stored `build.status` by a ranking, in SQL: the build-status rule of
 * packages/contracts/src/build-status-rule.ts over each capture's status and newest verdict
 * (latest `created_at`, then id, as the API reads it). `errorFirst` is today's rule;
 * without it, the old one where a failure outranked an error (for down()).
 */
function recomputeBuildStatuses(errorFirst: boolean): string {
  const error = `when bool_or(lv."outcome" = 'error' or c."status" = 'error') then 'error'`;
  const fail = `when bool_or(lv."outcome" = 'fail') then 'fail'`;
  return `update "build" b set "status" = s."status"
    from (
      select b2."id",
             case
               when count(c."id") = 0 then 'pending'
               when bool_or(c."status" = 'queued' or (c."status" = 'done' and lv."outcome" is null)) then 'pending'
               when bool_or(c."status" = 'analysing') then 'running'
               ${errorFirst ? `${error}\n               ${fail}` : `${fail}\n               ${error}`}
               else 'pass'
             end as "status"
        from "build" b2
        left join "capture" c on c."build_id" = b2."id"
        left join lateral (
          select v."outcome" from "verdict" v where v."capture_id" = c."id" order by v."created_at" desc, v."id" desc limit 1
        ) lv on true
       group by b2."id"
    ) s
    where s."id" = b."id" and b."status" is distinct from s."status";`;
}

/**
 * An error now outranks a failure in a build's status. Builds judged before were stored by
 * the old ranking (one failing and one erroring capture read `fail`), so every build's status
 * is computed again from its captures. Data only: the schema does not change.
 */
export class Migration20261202180100 extends Migration {

  override async up(): Promise<void> {
    this.addSql(recomputeBuildStatuses(true));
  }

  override async down(): Promise<void> {
    this.addSql(recomputeBuildStatuses(false));
  }

}
