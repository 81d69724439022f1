import { Migration } from '@mikro-orm/migrations';

export class Migration20261202061204 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create index "build_project_branch_created_at_idx" on "build" ("project_id", "branch", "created_at" desc);`);
    this.addSql(`create index "build_project_status_created_at_idx" on "build" ("project_id", "status", "created_at" desc);`);

    this.addSql(`create index "capture_target_build_idx" on "capture" ("target_id", "build_id");`);
    this.addSql(`create index "capture_test_case_target_idx" on "capture" ("test_case_id", "target_id");`);
  }

  override async down(): Promise<void> {
    this.addSql(`drop index "build_project_branch_created_at_idx";`);
    this.addSql(`drop index "build_project_status_created_at_idx";`);

    this.addSql(`drop index "capture_target_build_idx";`);
    this.addSql(`drop index "capture_test_case_target_idx";`);
  }

}
