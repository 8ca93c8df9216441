import { Migration } from '@mikro-orm/migrations';

// Runs remember the galaxy whose fit built them.

export class Migration20261202073207 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`alter table "runs" add column "galaxy_id" int null;`);
    this.addSql(`alter table "runs" add constraint "runs_galaxy_id_foreign" foreign key ("galaxy_id") references "galaxies" ("id") on update cascade on delete set null;`);
    this.addSql(`create index "runs_galaxy_id_index" on "runs" ("galaxy_id");`);
  }

  override async down(): Promise<void> {
    this.addSql(`alter table "runs" drop constraint "runs_galaxy_id_foreign";`);

    this.addSql(`drop index "runs_galaxy_id_index";`);
    this.addSql(`alter table "runs" drop column "galaxy_id";`);
  }

}
