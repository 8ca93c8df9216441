import { Migration } from '@mikro-orm/migrations';

// Galaxies: uploaded rotation-curve tables (raw bytes kept) and the fits requested on them.
export class Migration20261202065638 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table "galaxies" ("id" serial primary key, "owner_id" int not null, "name" varchar(255) not null, "visibility" text check ("visibility" in ('private', 'cohort', 'public')) not null default 'private', "cohort_id" int null, "invented" boolean not null default false, "file_name" varchar(255) not null, "file_bytes" bytea not null, "file_size" int not null, "mapping" jsonb not null, "curve" jsonb not null, "points" int not null, "uploaded_at" timestamptz not null);`);
    this.addSql(`create index "galaxies_owner_id_index" on "galaxies" ("owner_id");`);
    this.addSql(`create index "galaxies_visibility_index" on "galaxies" ("visibility");`);
    this.addSql(`create index "galaxies_cohort_id_index" on "galaxies" ("cohort_id");`);

    this.addSql(`create table "galaxy_fits" ("id" serial primary key, "galaxy_id" int not null, "requested_by_id" int not null, "request" jsonb not null, "results" jsonb not null, "created_at" timestamptz not null);`);
    this.addSql(`create index "galaxy_fits_galaxy_id_index" on "galaxy_fits" ("galaxy_id");`);

    this.addSql(`alter table "galaxies" add constraint "galaxies_owner_id_foreign" foreign key ("owner_id") references "users" ("id") on update cascade;`);
    this.addSql(`alter table "galaxies" add constraint "galaxies_cohort_id_foreign" foreign key ("cohort_id") references "cohorts" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "galaxy_fits" add constraint "galaxy_fits_galaxy_id_foreign" foreign key ("galaxy_id") references "galaxies" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "galaxy_fits" add constraint "galaxy_fits_requested_by_id_foreign" foreign key ("requested_by_id") references "users" ("id") on update cascade;`);
  }

  override async down(): Promise<void> {
    this.addSql(`alter table "galaxy_fits" drop constraint "galaxy_fits_galaxy_id_foreign";`);

    this.addSql(`drop table if exists "galaxies" cascade;`);

    this.addSql(`drop table if exists "galaxy_fits" cascade;`);
  }

}
