import { Migration } from '@mikro-orm/migrations';

export class Migration20261202052127 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table "notification" ("id" uuid not null, "created_at" timestamptz not null, "kind" varchar(60) not null, "recipient" varchar(254) not null, "subject" varchar(300) not null, "body" text not null, "payload" jsonb not null, "state" text check ("state" in ('pending', 'sent', 'failed')) not null default 'pending', "attempts" int not null default 0, "last_error" text null, "sent_at" timestamptz null, constraint "notification_pkey" primary key ("id"));`);
    this.addSql(`create index "notification_state_idx" on "notification" ("state");`);

    this.addSql(`create table "project" ("id" uuid not null, "created_at" timestamptz not null, "key" varchar(40) not null, "name" varchar(120) not null, "description" text not null default '', constraint "project_pkey" primary key ("id"));`);
    this.addSql(`alter table "project" add constraint "project_key_unique" unique ("key");`);

    this.addSql(`create table "build" ("id" uuid not null, "created_at" timestamptz not null, "project_id" uuid not null, "sha" varchar(64) not null, "label" varchar(120) null, "branch" varchar(200) null, "pipeline_url" text null, "status" text check ("status" in ('pending', 'running', 'pass', 'fail', 'error')) not null default 'pending', "updated_at" timestamptz not null, constraint "build_pkey" primary key ("id"));`);
    this.addSql(`create index "build_project_created_at_idx" on "build" ("project_id", "created_at" desc);`);
    this.addSql(`alter table "build" add constraint "build_project_id_sha_unique" unique ("project_id", "sha");`);

    this.addSql(`create table "audit_event" ("id" uuid not null, "created_at" timestamptz not null, "actor" varchar(300) not null, "action" varchar(80) not null, "subject" varchar(300) not null, "project_id" uuid null, "details" jsonb not null, constraint "audit_event_pkey" primary key ("id"));`);
    this.addSql(`create index "audit_event_created_at_idx" on "audit_event" ("created_at" desc);`);

    this.addSql(`create table "target" ("id" uuid not null, "created_at" timestamptz not null, "project_id" uuid not null, "key" varchar(60) not null, "name" varchar(120) not null, "description" text not null default '', "sample_rate" int null, constraint "target_pkey" primary key ("id"));`);
    this.addSql(`alter table "target" add constraint "target_project_id_key_unique" unique ("project_id", "key");`);

    this.addSql(`create table "test_case" ("id" uuid not null, "created_at" timestamptz not null, "project_id" uuid not null, "key" varchar(80) not null, "name" varchar(160) not null, "description" text not null default '', "stimulus" jsonb not null, "analysis" jsonb not null, "channel_map" jsonb not null, "updated_at" timestamptz not null, constraint "test_case_pkey" primary key ("id"));`);
    this.addSql(`alter table "test_case" add constraint "test_case_project_id_key_unique" unique ("project_id", "key");`);

    this.addSql(`create table "capture" ("id" uuid not null, "created_at" timestamptz not null, "project_id" uuid not null, "build_id" uuid not null, "test_case_id" uuid not null, "target_id" uuid not null, "object_key" varchar(300) not null, "sha256" varchar(64) not null, "size_bytes" int not null, "format" jsonb not null, "sample_rate" int not null, "channel_count" int not null, "frames" int not null, "status" text check ("status" in ('queued', 'analysing', 'done', 'error')) not null default 'queued', "idempotency_key" varchar(200) null, constraint "capture_pkey" primary key ("id"));`);
    this.addSql(`create index "capture_build_id_index" on "capture" ("build_id");`);
    this.addSql(`alter table "capture" add constraint "capture_project_id_idempotency_key_unique" unique ("project_id", "idempotency_key");`);

    this.addSql(`create table "app_user" ("id" uuid not null, "created_at" timestamptz not null, "email" varchar(254) not null, "display_name" varchar(120) not null, "password_hash" varchar(100) not null, "is_admin" boolean not null default false, "disabled" boolean not null default false, "token_version" int not null default 0, "last_login_at" timestamptz null, constraint "app_user_pkey" primary key ("id"));`);
    this.addSql(`alter table "app_user" add constraint "app_user_email_unique" unique ("email");`);

    this.addSql(`create table "membership" ("id" uuid not null, "created_at" timestamptz not null, "user_id" uuid not null, "project_id" uuid not null, "role" text check ("role" in ('viewer', 'engineer', 'qa_manager')) not null, constraint "membership_pkey" primary key ("id"));`);
    this.addSql(`alter table "membership" add constraint "membership_user_id_project_id_unique" unique ("user_id", "project_id");`);

    this.addSql(`create table "mask_revision" ("id" uuid not null, "created_at" timestamptz not null, "test_case_id" uuid not null, "target_id" uuid null, "revision" int not null, "state" text check ("state" in ('draft', 'in_review', 'approved', 'superseded', 'rejected')) not null default 'draft', "checks" jsonb not null, "note" text not null default '', "author_id" uuid not null, "reviewer_id" uuid null, "submitted_at" timestamptz null, "decided_at" timestamptz null, constraint "mask_revision_pkey" primary key ("id"));`);
    this.addSql(`create unique index "mask_revision_one_approved_idx" on "mask_revision" ("test_case_id", coalesce("target_id", '00000000-0000-0000-0000-000000000000'::uuid)) where "state" = 'approved';`);
    this.addSql(`alter table "mask_revision" add constraint "mask_revision_test_case_id_revision_unique" unique ("test_case_id", "revision");`);

    this.addSql(`create table "api_token" ("id" uuid not null, "created_at" timestamptz not null, "project_id" uuid not null, "name" varchar(80) not null, "prefix" varchar(24) not null, "secret_hash" varchar(64) not null, "scopes" jsonb not null, "created_by_id" uuid not null, "last_used_at" timestamptz null, "revoked_at" timestamptz null, constraint "api_token_pkey" primary key ("id"));`);
    this.addSql(`alter table "api_token" add constraint "api_token_prefix_unique" unique ("prefix");`);

    this.addSql(`create table "verdict" ("id" uuid not null, "created_at" timestamptz not null, "capture_id" uuid not null, "mask_revision_id" uuid null, "outcome" text check ("outcome" in ('pass', 'fail', 'error')) not null, "reason" text null, "engine_version" varchar(40) not null, constraint "verdict_pkey" primary key ("id"));`);
    this.addSql(`create unique index "verdict_capture_mask_revision_unique" on "verdict" ("capture_id", "mask_revision_id") nulls not distinct;`);

    this.addSql(`create table "check_result" ("id" uuid not null, "created_at" timestamptz not null, "verdict_id" uuid not null, "check_id" varchar(80) not null, "kind" varchar(40) not null, "pass" boolean not null, "measured" double precision null, "limit" double precision null, "margin" double precision null, "worst_hz" double precision null, "details" jsonb not null, constraint "check_result_pkey" primary key ("id"));`);
    this.addSql(`create index "check_result_verdict_id_index" on "check_result" ("verdict_id");`);
    this.addSql(`alter table "check_result" add constraint "check_result_verdict_id_check_id_unique" unique ("verdict_id", "check_id");`);

    this.addSql(`create table "finding" ("id" uuid not null, "created_at" timestamptz not null, "project_id" uuid not null, "capture_id" uuid not null, "check_result_id" uuid null, "check_id" varchar(80) not null, "title" varchar(300) not null, "state" text check ("state" in ('open', 'investigating', 'accepted_deviation', 'fixed', 'not_a_defect')) not null default 'open', "assignee_id" uuid null, "commit_links" jsonb not null, "updated_at" timestamptz not null, constraint "finding_pkey" primary key ("id"));`);
    this.addSql(`create index "finding_state_idx" on "finding" ("state");`);
    this.addSql(`create index "finding_project_id_state_index" on "finding" ("project_id", "state");`);

    this.addSql(`create table "comment" ("id" uuid not null, "created_at" timestamptz not null, "finding_id" uuid not null, "author_id" uuid not null, "body" text not null, constraint "comment_pkey" primary key ("id"));`);
    this.addSql(`create index "comment_finding_id_index" on "comment" ("finding_id");`);

    this.addSql(`create table "waiver" ("id" uuid not null, "created_at" timestamptz not null, "project_id" uuid not null, "test_case_id" uuid not null, "target_id" uuid null, "check_id" varchar(80) not null, "reason" text not null, "expires_at" timestamptz not null, "state" text check ("state" in ('requested', 'approved', 'rejected', 'expired', 'revoked')) not null default 'requested', "requested_by_id" uuid not null, "approved_by_id" uuid null, constraint "waiver_pkey" primary key ("id"));`);

    this.addSql(`alter table "build" add constraint "build_project_id_foreign" foreign key ("project_id") references "project" ("id") on update cascade on delete cascade;`);

    this.addSql(`alter table "audit_event" add constraint "audit_event_project_id_foreign" foreign key ("project_id") references "project" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "target" add constraint "target_project_id_foreign" foreign key ("project_id") references "project" ("id") on update cascade on delete cascade;`);

    this.addSql(`alter table "test_case" add constraint "test_case_project_id_foreign" foreign key ("project_id") references "project" ("id") on update cascade on delete cascade;`);

    this.addSql(`alter table "capture" add constraint "capture_project_id_foreign" foreign key ("project_id") references "project" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "capture" add constraint "capture_build_id_foreign" foreign key ("build_id") references "build" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "capture" add constraint "capture_test_case_id_foreign" foreign key ("test_case_id") references "test_case" ("id") on update cascade;`);
    this.addSql(`alter table "capture" add constraint "capture_target_id_foreign" foreign key ("target_id") references "target" ("id") on update cascade;`);

    this.addSql(`alter table "membership" add constraint "membership_user_id_foreign" foreign key ("user_id") references "app_user" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "membership" add constraint "membership_project_id_foreign" foreign key ("project_id") references "project" ("id") on update cascade on delete cascade;`);

    this.addSql(`alter table "mask_revision" add constraint "mask_revision_test_case_id_foreign" foreign key ("test_case_id") references "test_case" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "mask_revision" add constraint "mask_revision_target_id_foreign" foreign key ("target_id") references "target" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "mask_revision" add constraint "mask_revision_author_id_foreign" foreign key ("author_id") references "app_user" ("id") on update cascade;`);
    this.addSql(`alter table "mask_revision" add constraint "mask_revision_reviewer_id_foreign" foreign key ("reviewer_id") references "app_user" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "api_token" add constraint "api_token_project_id_foreign" foreign key ("project_id") references "project" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "api_token" add constraint "api_token_created_by_id_foreign" foreign key ("created_by_id") references "app_user" ("id") on update cascade;`);

    this.addSql(`alter table "verdict" add constraint "verdict_capture_id_foreign" foreign key ("capture_id") references "capture" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "verdict" add constraint "verdict_mask_revision_id_foreign" foreign key ("mask_revision_id") references "mask_revision" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "check_result" add constraint "check_result_verdict_id_foreign" foreign key ("verdict_id") references "verdict" ("id") on update cascade on delete cascade;`);

    this.addSql(`alter table "finding" add constraint "finding_project_id_foreign" foreign key ("project_id") references "project" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "finding" add constraint "finding_capture_id_foreign" foreign key ("capture_id") references "capture" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "finding" add constraint "finding_check_result_id_foreign" foreign key ("check_result_id") references "check_result" ("id") on update cascade on delete set null;`);
    this.addSql(`alter table "finding" add constraint "finding_assignee_id_foreign" foreign key ("assignee_id") references "app_user" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "comment" add constraint "comment_finding_id_foreign" foreign key ("finding_id") references "finding" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "comment" add constraint "comment_author_id_foreign" foreign key ("author_id") references "app_user" ("id") on update cascade;`);

    this.addSql(`alter table "waiver" add constraint "waiver_project_id_foreign" foreign key ("project_id") references "project" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "waiver" add constraint "waiver_test_case_id_foreign" foreign key ("test_case_id") references "test_case" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "waiver" add constraint "waiver_target_id_foreign" foreign key ("target_id") references "target" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "waiver" add constraint "waiver_requested_by_id_foreign" foreign key ("requested_by_id") references "app_user" ("id") on update cascade;`);
    this.addSql(`alter table "waiver" add constraint "waiver_approved_by_id_foreign" foreign key ("approved_by_id") references "app_user" ("id") on update cascade on delete set null;`);
  }

}
