import { Migration } from '@mikro-orm/migrations';

export class Migration20261201234928_revisions extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table "revision" ("id" uuid not null, "loop_id" uuid not null, "number" int not null, "state" text check ("state" in ('awaiting-upload', 'queued', 'computing', 'computed', 'rejected')) not null default 'queued', "object_key" varchar(200) not null, "file_name" varchar(255) not null, "size_bytes" int null, "sha256" varchar(64) null, "note" text not null default '', "uploaded_by_id" uuid not null, "uploaded_at" timestamptz not null default now(), "computed_at" timestamptz null, "error_message" text null, "error_path" text null, "attempts" int not null default 0, "job_error" text null, constraint "revision_pkey" primary key ("id"), constraint revision_number_positive check (number > 0), constraint revision_size_nonnegative check (size_bytes is null or size_bytes >= 0), constraint revision_rejected_has_error check ((state = 'rejected') = (error_message is not null)));`);
    this.addSql(`alter table "revision" add constraint "revision_object_key_unique" unique ("object_key");`);
    this.addSql(`create index "revision_loop_sha_index" on "revision" ("loop_id", "sha256");`);
    this.addSql(`create index "revision_state_index" on "revision" ("state");`);
    this.addSql(`alter table "revision" add constraint "revision_loop_number_unique" unique ("loop_id", "number");`);

    this.addSql(`create table "margin_report" ("id" uuid not null default gen_random_uuid(), "revision_id" uuid not null, "engine_version" varchar(40) not null, "result" jsonb not null, "compute_ms" double precision not null, "created_at" timestamptz not null default now(), constraint "margin_report_pkey" primary key ("id"));`);
    this.addSql(`alter table "margin_report" add constraint "margin_report_revision_id_unique" unique ("revision_id");`);

    this.addSql(`create table "verdict_event" ("id" uuid not null default gen_random_uuid(), "loop_id" uuid not null, "verdict" text check ("verdict" in ('compliant', 'noncompliant', 'covered', 'unstable', 'pending', 'rejected', 'empty')) not null, "previous_verdict" text check ("previous_verdict" in ('compliant', 'noncompliant', 'covered', 'unstable', 'pending', 'rejected', 'empty')) not null, "revision_id" uuid null, "requirement_id" uuid null, "failing" text[] not null, "criteria" jsonb not null, "cause" varchar(40) not null, "at" timestamptz not null default now(), "worse" boolean not null, "notified_at" timestamptz null, constraint "verdict_event_pkey" primary key ("id"));`);
    this.addSql(`create index "verdict_event_loop_id_at_index" on "verdict_event" ("loop_id", "at");`);
    this.addSql(`create index "verdict_event_outbox" on "verdict_event" ("worse", "notified_at");`);

    this.addSql(`alter table "revision" add constraint "revision_loop_id_foreign" foreign key ("loop_id") references "loop" ("id") on update cascade;`);
    this.addSql(`alter table "revision" add constraint "revision_uploaded_by_id_foreign" foreign key ("uploaded_by_id") references "app_user" ("id") on update cascade;`);

    this.addSql(`alter table "margin_report" add constraint "margin_report_revision_id_foreign" foreign key ("revision_id") references "revision" ("id") on update cascade;`);

    this.addSql(`alter table "verdict_event" add constraint "verdict_event_loop_id_foreign" foreign key ("loop_id") references "loop" ("id") on update cascade;`);
    this.addSql(`alter table "verdict_event" add constraint "verdict_event_revision_id_foreign" foreign key ("revision_id") references "revision" ("id") on update cascade on delete set null;`);
    this.addSql(`alter table "verdict_event" add constraint "verdict_event_requirement_id_foreign" foreign key ("requirement_id") references "requirement" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "loop" add column "verdict_detail" jsonb null, add column "judged_revision_id" uuid null, add column "judged_requirement_id" uuid null, add column "judged_at" timestamptz null, add column "verdict_changed_at" timestamptz null, add column "wc_phase_margin_deg" double precision null, add column "wc_upper_gain_margin_db" double precision null, add column "wc_delay_margin_s" double precision null, add column "wc_modulus_margin" double precision null;`);

    this.addSql(`alter table "deviation" add column "expiry_processed_at" timestamptz null;`);
  }

  override async down(): Promise<void> {
    this.addSql(`alter table "margin_report" drop constraint "margin_report_revision_id_foreign";`);

    this.addSql(`alter table "verdict_event" drop constraint "verdict_event_revision_id_foreign";`);

    this.addSql(`drop table if exists "revision" cascade;`);

    this.addSql(`drop table if exists "margin_report" cascade;`);

    this.addSql(`drop table if exists "verdict_event" cascade;`);

    this.addSql(`alter table "deviation" drop column "expiry_processed_at";`);

    this.addSql(`alter table "loop" drop column "verdict_detail", drop column "judged_revision_id", drop column "judged_requirement_id", drop column "judged_at", drop column "verdict_changed_at", drop column "wc_phase_margin_deg", drop column "wc_upper_gain_margin_db", drop column "wc_delay_margin_s", drop column "wc_modulus_margin";`);
  }

}
