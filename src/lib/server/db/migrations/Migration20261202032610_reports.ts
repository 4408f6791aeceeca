import { Migration } from '@mikro-orm/migrations';

export class Migration20261202032610_reports extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table "report_export" ("id" uuid not null, "format" text check ("format" in ('pdf', 'csv')) not null, "state" text check ("state" in ('queued', 'rendering', 'ready', 'failed')) not null default 'queued', "filters" jsonb not null, "requested_by_id" uuid not null, "requested_at" timestamptz not null default now(), "started_at" timestamptz null, "finished_at" timestamptz null, "error_message" text null, "attempts" int not null default 0, "object_key" varchar(200) not null, "size_bytes" int null, "sha256" varchar(64) null, "engine_version" varchar(40) null, "loop_count" int null, "verdict_counts" jsonb null, "requirements" jsonb null, "evidence" jsonb null, constraint "report_export_pkey" primary key ("id"), constraint report_export_failed_has_error check ((state <> 'failed') or (error_message is not null)), constraint report_export_ready_has_file check ((state <> 'ready') or (size_bytes is not null and sha256 is not null)));`);
    this.addSql(`create index "report_export_requested_at_index" on "report_export" ("requested_at");`);
    this.addSql(`alter table "report_export" add constraint "report_export_object_key_unique" unique ("object_key");`);

    this.addSql(`alter table "report_export" add constraint "report_export_requested_by_id_foreign" foreign key ("requested_by_id") references "app_user" ("id") on update cascade;`);
  }

  override async down(): Promise<void> {
    this.addSql(`drop table if exists "report_export" cascade;`);
  }

}
