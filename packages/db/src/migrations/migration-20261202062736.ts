import { Migration } from '@mikro-orm/migrations';

export class Migration20261202062736 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table "impact_run" ("id" uuid not null, "created_at" timestamptz not null, "mask_revision_id" uuid not null, "requested_by_id" uuid not null, "builds" int not null, "state" text check ("state" in ('queued', 'running', 'done', 'error')) not null default 'queued', "progress" int not null default 0, "total" int not null default 0, "result" jsonb null, "error" text null, "finished_at" timestamptz null, constraint "impact_run_pkey" primary key ("id"));`);
    this.addSql(`create index "impact_run_mask_revision_id_index" on "impact_run" ("mask_revision_id");`);

    this.addSql(`alter table "impact_run" add constraint "impact_run_mask_revision_id_foreign" foreign key ("mask_revision_id") references "mask_revision" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "impact_run" add constraint "impact_run_requested_by_id_foreign" foreign key ("requested_by_id") references "app_user" ("id") on update cascade;`);

    this.addSql(`alter table "project" add column "drift_threshold_db" double precision not null default 1, add column "drift_window" int not null default 10;`);

    this.addSql(`alter table "mask_revision" add column "decision_comment" text null, add column "based_on_id" uuid null, add column "derivation" jsonb null;`);
    this.addSql(`alter table "mask_revision" add constraint "mask_revision_based_on_id_foreign" foreign key ("based_on_id") references "mask_revision" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "verdict" add column "previous_id" uuid null;`);
    this.addSql(`alter table "verdict" add constraint "verdict_previous_id_foreign" foreign key ("previous_id") references "verdict" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "waiver" add column "finding_id" uuid null, add column "decision_comment" text null, add column "decided_at" timestamptz null;`);
    this.addSql(`alter table "waiver" add constraint "waiver_finding_id_foreign" foreign key ("finding_id") references "finding" ("id") on update cascade on delete set null;`);
    this.addSql(`create index "waiver_lookup_idx" on "waiver" ("test_case_id", "check_id", "state");`);
  }

  override async down(): Promise<void> {
    this.addSql(`drop table if exists "impact_run" cascade;`);

    this.addSql(`alter table "mask_revision" drop constraint "mask_revision_based_on_id_foreign";`);

    this.addSql(`alter table "verdict" drop constraint "verdict_previous_id_foreign";`);

    this.addSql(`alter table "waiver" drop constraint "waiver_finding_id_foreign";`);

    this.addSql(`alter table "mask_revision" drop column "decision_comment", drop column "based_on_id", drop column "derivation";`);

    this.addSql(`alter table "project" drop column "drift_threshold_db", drop column "drift_window";`);

    this.addSql(`alter table "verdict" drop column "previous_id";`);

    this.addSql(`drop index "waiver_lookup_idx";`);
    this.addSql(`alter table "waiver" drop column "finding_id", drop column "decision_comment", drop column "decided_at";`);
  }

}
