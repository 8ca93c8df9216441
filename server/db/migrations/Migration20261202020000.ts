import { Migration } from '@mikro-orm/migrations';

// API tokens get an expiry; tokens made before it get 90 days from their creation.
export class Migration20261202020000 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`alter table "api_tokens" add column "expires_at" timestamptz null;`);
    this.addSql(`update "api_tokens" set "expires_at" = "created_at" + interval '90 days';`);
    this.addSql(`alter table "api_tokens" alter column "expires_at" set not null;`);
  }

  override async down(): Promise<void> {
    this.addSql(`alter table "api_tokens" drop column "expires_at";`);
  }

}
