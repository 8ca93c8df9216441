import { Migration } from '@mikro-orm/migrations';

export class Migration20261201200812 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table "users" ("id" serial primary key, "provider_id" varchar(255) not null, "login" varchar(255) not null, "name" varchar(255) not null, "email" varchar(255) null, "role" text check ("role" in ('student', 'instructor', 'researcher', 'admin')) not null default 'student', "notify_on_finish" boolean not null default false, "created_at" timestamptz not null);`);
    this.addSql(`alter table "users" add constraint "users_provider_id_unique" unique ("provider_id");`);
    this.addSql(`alter table "users" add constraint "users_login_unique" unique ("login");`);

    this.addSql(`create table "runs" ("id" uuid not null, "owner_id" int not null, "name" varchar(255) not null, "spec" jsonb not null, "model_kind" varchar(255) not null, "law_kind" varchar(255) not null, "particles" int not null, "steps" int not null, "cost_interactions" bigint not null, "pair_id" uuid null, "status" text check ("status" in ('queued', 'running', 'finished', 'failed', 'cancelled')) not null default 'queued', "progress" double precision not null default 0, "error" text null, "cancel_requested" boolean not null default false, "created_at" timestamptz not null, "started_at" timestamptz null, "finished_at" timestamptz null, constraint "runs_pkey" primary key ("id"));`);
    this.addSql(`create index "runs_owner_id_index" on "runs" ("owner_id");`);
    this.addSql(`create index "runs_model_kind_index" on "runs" ("model_kind");`);
    this.addSql(`create index "runs_law_kind_index" on "runs" ("law_kind");`);
    this.addSql(`create index "runs_pair_id_index" on "runs" ("pair_id");`);
    this.addSql(`create index "runs_status_index" on "runs" ("status");`);

    this.addSql(`create table "run_snapshots" ("run_id" uuid not null, "frame" int not null, "step" int not null, "time_myr" double precision not null, "positions" bytea not null, constraint "run_snapshots_pkey" primary key ("run_id", "frame"));`);

    this.addSql(`create table "run_outputs" ("run_id" uuid not null, "law" jsonb not null, "timescales" jsonb not null, "warnings" jsonb not null, "diagnostics" jsonb not null, "rotation_curves" jsonb not null, "summary" jsonb not null, "snapshot_particles" int not null, constraint "run_outputs_pkey" primary key ("run_id"));`);

    this.addSql(`alter table "runs" add constraint "runs_owner_id_foreign" foreign key ("owner_id") references "users" ("id") on update cascade;`);

    this.addSql(`alter table "run_snapshots" add constraint "run_snapshots_run_id_foreign" foreign key ("run_id") references "runs" ("id") on update cascade on delete cascade;`);

    this.addSql(`alter table "run_outputs" add constraint "run_outputs_run_id_foreign" foreign key ("run_id") references "runs" ("id") on update cascade on delete cascade;`);
  }

}
