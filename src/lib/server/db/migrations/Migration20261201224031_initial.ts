import { Migration } from '@mikro-orm/migrations';

export class Migration20261201224031_initial extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table "app_user" ("id" uuid not null default gen_random_uuid(), "email" varchar(320) not null, "name" varchar(200) not null, "role" text check ("role" in ('viewer', 'engineer', 'lead', 'admin')) not null default 'viewer', "password_hash" text null, "active" boolean not null default true, "created_at" timestamptz not null default now(), "last_sign_in_at" timestamptz null, constraint "app_user_pkey" primary key ("id"));`);
    this.addSql(`alter table "app_user" add constraint "app_user_email_unique" unique ("email");`);
  }

  override async down(): Promise<void> {
    this.addSql(`drop table if exists "app_user" cascade;`);
  }

}
