import { Migration } from '@mikro-orm/migrations';

// Snapshots keep velocities, and a run's output says which particles its frames hold (ids,
// masses, components) and which engine computed it. Rows stored before keep nulls: their
// positions stay, and exports say that velocities were not kept.
export class Migration20261202061740 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`alter table "run_snapshots" add column "velocities" bytea null;`);

    this.addSql(`alter table "run_outputs" add column "particle_ids" bytea null, add column "masses" bytea null, add column "components" jsonb null, add column "engine_version" varchar(255) null;`);
  }

  override async down(): Promise<void> {
    this.addSql(`alter table "run_outputs" drop column "particle_ids", drop column "masses", drop column "components", drop column "engine_version";`);

    this.addSql(`alter table "run_snapshots" drop column "velocities";`);
  }

}
