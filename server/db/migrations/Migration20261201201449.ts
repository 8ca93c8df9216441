import { Migration } from '@mikro-orm/migrations';

export class Migration20261201201449 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table "session" ("sid" varchar(255) not null, "sess" jsonb not null, "expire" timestamptz(6) not null, constraint "session_pkey" primary key ("sid"));`);
    this.addSql(`create index "IDX_session_expire" on "session" ("expire");`);

    this.addSql(`create table "usage_ledger" ("id" serial primary key, "user_id" int not null, "day" date not null, "interactions" bigint not null, "runs" int not null, "created_at" timestamptz not null);`);
    this.addSql(`create index "usage_ledger_user_id_day_index" on "usage_ledger" ("user_id", "day");`);

    this.addSql(`create table "cohorts" ("id" serial primary key, "name" varchar(255) not null, "enrolment_code" varchar(255) not null, "instructor_id" int not null, "max_particles" int not null, "max_steps" int not null, "max_concurrent_runs" int not null, "daily_interactions" bigint not null, "created_at" timestamptz not null);`);
    this.addSql(`alter table "cohorts" add constraint "cohorts_enrolment_code_unique" unique ("enrolment_code");`);
    this.addSql(`create index "cohorts_instructor_id_index" on "cohorts" ("instructor_id");`);

    this.addSql(`create table "cohort_templates" ("id" serial primary key, "cohort_id" int not null, "name" varchar(255) not null, "description" text not null default '', "spec" jsonb not null, "pair_law" jsonb null, "created_by_id" int not null, "created_at" timestamptz not null);`);
    this.addSql(`create index "cohort_templates_cohort_id_index" on "cohort_templates" ("cohort_id");`);

    this.addSql(`create table "cohort_members" ("cohort_id" int not null, "user_id" int not null, "joined_at" timestamptz not null, constraint "cohort_members_pkey" primary key ("cohort_id", "user_id"));`);
    this.addSql(`create index "cohort_members_user_id_index" on "cohort_members" ("user_id");`);

    this.addSql(`create table "api_tokens" ("id" serial primary key, "user_id" int not null, "name" varchar(255) not null, "prefix" varchar(255) not null, "hash" varchar(255) not null, "created_at" timestamptz not null, "last_used_at" timestamptz null);`);
    this.addSql(`create index "api_tokens_user_id_index" on "api_tokens" ("user_id");`);
    this.addSql(`alter table "api_tokens" add constraint "api_tokens_hash_unique" unique ("hash");`);

    this.addSql(`create table "allocations" ("user_id" int not null, "max_particles" int null, "max_steps" int null, "max_concurrent_runs" int null, "daily_interactions" bigint null, "warned_on" date null, constraint "allocations_pkey" primary key ("user_id"));`);

    this.addSql(`alter table "usage_ledger" add constraint "usage_ledger_user_id_foreign" foreign key ("user_id") references "users" ("id") on update cascade on delete cascade;`);

    this.addSql(`alter table "cohorts" add constraint "cohorts_instructor_id_foreign" foreign key ("instructor_id") references "users" ("id") on update cascade;`);

    this.addSql(`alter table "cohort_templates" add constraint "cohort_templates_cohort_id_foreign" foreign key ("cohort_id") references "cohorts" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "cohort_templates" add constraint "cohort_templates_created_by_id_foreign" foreign key ("created_by_id") references "users" ("id") on update cascade;`);

    this.addSql(`alter table "cohort_members" add constraint "cohort_members_cohort_id_foreign" foreign key ("cohort_id") references "cohorts" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "cohort_members" add constraint "cohort_members_user_id_foreign" foreign key ("user_id") references "users" ("id") on update cascade on delete cascade;`);

    this.addSql(`alter table "api_tokens" add constraint "api_tokens_user_id_foreign" foreign key ("user_id") references "users" ("id") on update cascade on delete cascade;`);

    this.addSql(`alter table "allocations" add constraint "allocations_user_id_foreign" foreign key ("user_id") references "users" ("id") on update cascade on delete cascade;`);

    this.addSql(`alter table "users" add column "last_sign_in_at" timestamptz null;`);
  }

  override async down(): Promise<void> {
    this.addSql(`alter table "cohort_templates" drop constraint "cohort_templates_cohort_id_foreign";`);

    this.addSql(`alter table "cohort_members" drop constraint "cohort_members_cohort_id_foreign";`);

    this.addSql(`drop table if exists "session" cascade;`);

    this.addSql(`drop table if exists "usage_ledger" cascade;`);

    this.addSql(`drop table if exists "cohorts" cascade;`);

    this.addSql(`drop table if exists "cohort_templates" cascade;`);

    this.addSql(`drop table if exists "cohort_members" cascade;`);

    this.addSql(`drop table if exists "api_tokens" cascade;`);

    this.addSql(`drop table if exists "allocations" cascade;`);

    this.addSql(`alter table "users" drop column "last_sign_in_at";`);
  }

}
