import { Migration } from '@mikro-orm/migrations';

// When the end-of-run mail went out: a pair's two runs claim it together, so two workers
// finishing the two halves at once send one mail between them, and a retried hook none.
export class Migration20261202063117 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`alter table "runs" add column "notified_at" timestamptz null;`);
  }

  override async down(): Promise<void> {
    this.addSql(`alter table "runs" drop column "notified_at";`);
  }

}
