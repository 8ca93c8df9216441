import { Migration } from '@mikro-orm/migrations';

// Checkpoints: the latest state of each run, so another worker can take it over.
export class Migration20261202064700 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table "run_checkpoints" ("run_id" uuid not null, "step" int not null, "data" bytea not null, "taken_at" timestamptz not null, constraint "run_checkpoints_pkey" primary key ("run_id"));`);
    this.addSql(`alter table "run_checkpoints" add constraint "run_checkpoints_run_id_foreign" foreign key ("run_id") references "runs" ("id") on update cascade on delete cascade;`);
  }

  override async down(): Promise<void> {
    this.addSql(`drop table if exists "run_checkpoints" cascade;`);
  }

}
