import { Migration } from '@mikro-orm/migrations';

// Sample fits: one joint fit across several galaxies, kept with the person who asked.

export class Migration20261202072817 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table "galaxy_samples" ("id" serial primary key, "requested_by_id" int not null, "request" jsonb not null, "galaxies" jsonb not null, "results" jsonb not null, "created_at" timestamptz not null);`);
    this.addSql(`create index "galaxy_samples_requested_by_id_index" on "galaxy_samples" ("requested_by_id");`);

    this.addSql(`alter table "galaxy_samples" add constraint "galaxy_samples_requested_by_id_foreign" foreign key ("requested_by_id") references "users" ("id") on update cascade on delete cascade;`);
  }

  override async down(): Promise<void> {
    this.addSql(`drop table if exists "galaxy_samples" cascade;`);
  }

}
