import { Migration } from '@mikro-orm/migrations';

export class Migration20261201225324_registry extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table "product" ("id" uuid not null default gen_random_uuid(), "key" varchar(64) not null, "name" varchar(200) not null, "created_at" timestamptz not null default now(), constraint "product_pkey" primary key ("id"), constraint product_key_format check (key ~ '^[a-z0-9][a-z0-9._-]*$'));`);
    this.addSql(`alter table "product" add constraint "product_key_unique" unique ("key");`);

    this.addSql(`create table "loop_class" ("id" uuid not null default gen_random_uuid(), "key" varchar(64) not null, "name" varchar(200) not null, "description" text not null default '', "lead_id" uuid null, "open_uploads" boolean not null default false, "created_at" timestamptz not null default now(), constraint "loop_class_pkey" primary key ("id"), constraint loop_class_key_format check (key ~ '^[a-z0-9][a-z0-9._-]*$'));`);
    this.addSql(`alter table "loop_class" add constraint "loop_class_key_unique" unique ("key");`);

    this.addSql(`create table "requirement" ("id" uuid not null default gen_random_uuid(), "loop_class_id" uuid not null, "version" int not null, "min_upper_gain_margin_db" numeric(20,9) null, "min_lower_gain_margin_db" numeric(20,9) null, "min_phase_margin_deg" numeric(20,9) null, "min_delay_margin_seconds" numeric(20,9) null, "min_delay_margin_samples" numeric(20,9) null, "min_modulus_margin" numeric(20,9) null, "max_peak_sensitivity" numeric(20,9) null, "min_disk_gain_margin_db" numeric(20,9) null, "crossover_min_hz" numeric(20,9) null, "crossover_max_hz" numeric(20,9) null, "author_id" uuid not null, "reason" text not null, "created_at" timestamptz not null default now(), constraint "requirement_pkey" primary key ("id"), constraint requirement_min_upper_gain_margin_db_positive check (min_upper_gain_margin_db > 0), constraint requirement_min_lower_gain_margin_db_positive check (min_lower_gain_margin_db > 0), constraint requirement_min_phase_margin_deg_positive check (min_phase_margin_deg > 0), constraint requirement_min_delay_margin_seconds_positive check (min_delay_margin_seconds > 0), constraint requirement_min_delay_margin_samples_positive check (min_delay_margin_samples > 0), constraint requirement_min_modulus_margin_positive check (min_modulus_margin > 0), constraint requirement_min_disk_gain_margin_db_positive check (min_disk_gain_margin_db > 0), constraint requirement_crossover_min_hz_positive check (crossover_min_hz > 0), constraint requirement_crossover_max_hz_positive check (crossover_max_hz > 0), constraint requirement_max_peak_sensitivity_at_least_one check (max_peak_sensitivity >= 1), constraint requirement_crossover_band_order check (crossover_max_hz > crossover_min_hz), constraint requirement_version_positive check (version > 0), constraint requirement_reason_not_blank check (btrim(reason) <> ''));`);
    this.addSql(`alter table "requirement" add constraint "requirement_class_version_unique" unique ("loop_class_id", "version");`);

    this.addSql(`create table "loop" ("id" uuid not null default gen_random_uuid(), "product_id" uuid not null, "loop_class_id" uuid not null, "key" varchar(64) not null, "name" varchar(200) not null, "owner_id" uuid not null, "tags" text[] not null, "note" text not null default '', "verdict" text check ("verdict" in ('compliant', 'noncompliant', 'covered', 'unstable', 'pending', 'rejected', 'empty')) not null default 'empty', "archived_at" timestamptz null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(), constraint "loop_pkey" primary key ("id"), constraint loop_key_format check (key ~ '^[a-z0-9][a-z0-9._-]*$'));`);
    this.addSql(`create index "loop_loop_class_id_index" on "loop" ("loop_class_id");`);
    this.addSql(`create index "loop_owner_id_index" on "loop" ("owner_id");`);
    this.addSql(`create index "loop_verdict_index" on "loop" ("verdict");`);
    this.addSql(`alter table "loop" add constraint "loop_product_key_unique" unique ("product_id", "key");`);

    this.addSql(`create table "deviation" ("id" uuid not null default gen_random_uuid(), "loop_id" uuid not null, "criteria" text[] not null, "min_upper_gain_margin_db" numeric(20,9) null, "min_lower_gain_margin_db" numeric(20,9) null, "min_phase_margin_deg" numeric(20,9) null, "min_delay_margin_seconds" numeric(20,9) null, "min_delay_margin_samples" numeric(20,9) null, "min_modulus_margin" numeric(20,9) null, "max_peak_sensitivity" numeric(20,9) null, "min_disk_gain_margin_db" numeric(20,9) null, "crossover_min_hz" numeric(20,9) null, "crossover_max_hz" numeric(20,9) null, "reason" text not null, "approved_by_id" uuid not null, "starts_at" timestamptz not null, "expires_at" timestamptz not null, "revoked_at" timestamptz null, "revoked_by_id" uuid null, "created_at" timestamptz not null default now(), constraint "deviation_pkey" primary key ("id"), constraint deviation_min_upper_gain_margin_db_positive check (min_upper_gain_margin_db > 0), constraint deviation_min_lower_gain_margin_db_positive check (min_lower_gain_margin_db > 0), constraint deviation_min_phase_margin_deg_positive check (min_phase_margin_deg > 0), constraint deviation_min_delay_margin_seconds_positive check (min_delay_margin_seconds > 0), constraint deviation_min_delay_margin_samples_positive check (min_delay_margin_samples > 0), constraint deviation_min_modulus_margin_positive check (min_modulus_margin > 0), constraint deviation_min_disk_gain_margin_db_positive check (min_disk_gain_margin_db > 0), constraint deviation_crossover_min_hz_positive check (crossover_min_hz > 0), constraint deviation_crossover_max_hz_positive check (crossover_max_hz > 0), constraint deviation_max_peak_sensitivity_at_least_one check (max_peak_sensitivity >= 1), constraint deviation_crossover_band_order check (crossover_max_hz > crossover_min_hz), constraint deviation_reason_not_blank check (btrim(reason) <> ''), constraint deviation_expires_after_start check (expires_at > starts_at), constraint deviation_criteria_not_empty check (cardinality(criteria) > 0), constraint deviation_criteria_known check (criteria <@ array['upperGainMargin', 'lowerGainMargin', 'phaseMargin', 'delayMarginSeconds', 'delayMarginSamples', 'modulusMargin', 'peakSensitivity', 'diskGainMargin', 'crossoverBand']::text[]), constraint deviation_revoked_by_whom check ((revoked_at is null) = (revoked_by_id is null)));`);
    this.addSql(`create index "deviation_loop_id_index" on "deviation" ("loop_id");`);
    this.addSql(`create index "deviation_expires_at_index" on "deviation" ("expires_at");`);

    this.addSql(`alter table "loop_class" add constraint "loop_class_lead_id_foreign" foreign key ("lead_id") references "app_user" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "requirement" add constraint "requirement_loop_class_id_foreign" foreign key ("loop_class_id") references "loop_class" ("id") on update cascade;`);
    this.addSql(`alter table "requirement" add constraint "requirement_author_id_foreign" foreign key ("author_id") references "app_user" ("id") on update cascade;`);

    this.addSql(`alter table "loop" add constraint "loop_product_id_foreign" foreign key ("product_id") references "product" ("id") on update cascade;`);
    this.addSql(`alter table "loop" add constraint "loop_loop_class_id_foreign" foreign key ("loop_class_id") references "loop_class" ("id") on update cascade;`);
    this.addSql(`alter table "loop" add constraint "loop_owner_id_foreign" foreign key ("owner_id") references "app_user" ("id") on update cascade;`);

    this.addSql(`alter table "deviation" add constraint "deviation_loop_id_foreign" foreign key ("loop_id") references "loop" ("id") on update cascade;`);
    this.addSql(`alter table "deviation" add constraint "deviation_approved_by_id_foreign" foreign key ("approved_by_id") references "app_user" ("id") on update cascade;`);
    this.addSql(`alter table "deviation" add constraint "deviation_revoked_by_id_foreign" foreign key ("revoked_by_id") references "app_user" ("id") on update cascade on delete set null;`);
    // The audit trail's insert-only triggers come from the auth migration.
  }

  override async down(): Promise<void> {
    this.addSql(`alter table "loop" drop constraint "loop_product_id_foreign";`);

    this.addSql(`alter table "requirement" drop constraint "requirement_loop_class_id_foreign";`);

    this.addSql(`alter table "loop" drop constraint "loop_loop_class_id_foreign";`);

    this.addSql(`alter table "deviation" drop constraint "deviation_loop_id_foreign";`);

    this.addSql(`drop table if exists "product" cascade;`);

    this.addSql(`drop table if exists "loop_class" cascade;`);

    this.addSql(`drop table if exists "requirement" cascade;`);

    this.addSql(`drop table if exists "loop" cascade;`);

    this.addSql(`drop table if exists "deviation" cascade;`);
  }

}
