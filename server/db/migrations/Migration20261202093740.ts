import { Migration } from '@mikro-orm/migrations';

// Upload size and row limits join the cohort quota and the admin's allocation; null = not set.

export class Migration20261202093740 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`alter table "cohorts" add column "max_upload_bytes" int null, add column "max_upload_rows" int null;`);

    this.addSql(`alter table "allocations" add column "max_upload_bytes" int null, add column "max_upload_rows" int null;`);
  }

  override async down(): Promise<void> {
    this.addSql(`alter table "allocations" drop column "max_upload_bytes", drop column "max_upload_rows";`);

    this.addSql(`alter table "cohorts" drop column "max_upload_bytes", drop column "max_upload_rows";`);
  }

}
