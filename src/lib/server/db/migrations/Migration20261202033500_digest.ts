import { Migration } from '@mikro-orm/migrations';

/** Daily verdict digests for leads, and deviations whose start lies in the future. */
export class Migration20261202033500_digest extends Migration {

  override async up(): Promise<void> {
    this.addSql(`alter table "app_user" add column "verdict_mail" text check ("verdict_mail" in ('immediate', 'digest')) not null default 'immediate', add column "verdict_mail_since" timestamptz null;`);

    this.addSql(`create table "verdict_digest" ("id" uuid not null default gen_random_uuid(), "user_id" uuid not null, "since" timestamptz not null, "until" timestamptz not null, "loop_count" int not null, "created_at" timestamptz not null default now(), "sent_at" timestamptz null, constraint "verdict_digest_pkey" primary key ("id"), constraint verdict_digest_window check (until > since));`);
    this.addSql(`create index "verdict_digest_user_id_until_index" on "verdict_digest" ("user_id", "until");`);
    this.addSql(`alter table "verdict_digest" add constraint "verdict_digest_user_id_foreign" foreign key ("user_id") references "app_user" ("id") on update cascade;`);

    this.addSql(`alter table "verdict_event" add column "digest_id" uuid null;`);
    this.addSql(`alter table "verdict_event" add constraint "verdict_event_digest_id_foreign" foreign key ("digest_id") references "verdict_digest" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "deviation" add column "start_processed_at" timestamptz null;`);
    // Deviations granted to start at once were judged at the grant; later starts still need a pass.
    this.addSql(`update "deviation" set "start_processed_at" = "created_at" where "starts_at" <= "created_at";`);
  }

  override async down(): Promise<void> {
    this.addSql(`alter table "verdict_event" drop constraint "verdict_event_digest_id_foreign";`);
    this.addSql(`alter table "verdict_event" drop column "digest_id";`);
    this.addSql(`drop table if exists "verdict_digest" cascade;`);
    this.addSql(`alter table "deviation" drop column "start_processed_at";`);
    this.addSql(`alter table "app_user" drop column "verdict_mail", drop column "verdict_mail_since";`);
  }

}
