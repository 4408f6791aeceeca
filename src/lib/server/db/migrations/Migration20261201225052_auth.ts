import { Migration } from '@mikro-orm/migrations';

export class Migration20261201225052_auth extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table "sign_in_attempt" ("id" bigserial primary key, "email" varchar(320) not null, "address" varchar(64) not null, "succeeded" boolean not null default false, "at" timestamptz not null default now());`);
    this.addSql(`create index "sign_in_attempt_email_at_index" on "sign_in_attempt" ("email", "at");`);
    this.addSql(`create index "sign_in_attempt_address_at_index" on "sign_in_attempt" ("address", "at");`);

    this.addSql(`create table "one_time_link" ("id" uuid not null default gen_random_uuid(), "user_id" uuid not null, "purpose" text check ("purpose" in ('invitation', 'password_reset')) not null, "token_hash" varchar(64) not null, "created_at" timestamptz not null default now(), "expires_at" timestamptz not null, "used_at" timestamptz null, "created_by_id" uuid null, constraint "one_time_link_pkey" primary key ("id"));`);
    this.addSql(`alter table "one_time_link" add constraint "one_time_link_token_hash_unique" unique ("token_hash");`);

    this.addSql(`create table "audit_event" ("id" bigserial primary key, "at" timestamptz not null default now(), "actor_id" uuid null, "action" varchar(100) not null, "entity_type" varchar(100) not null, "entity_id" varchar(100) not null, "before" jsonb null, "after" jsonb null);`);
    this.addSql(`create index "audit_event_entity_type_entity_id_index" on "audit_event" ("entity_type", "entity_id");`);
    this.addSql(`create index "audit_event_at_index" on "audit_event" ("at");`);

    this.addSql(`create table "api_token" ("id" uuid not null default gen_random_uuid(), "owner_id" uuid not null, "name" varchar(100) not null, "token_hash" varchar(64) not null, "hint" varchar(16) not null, "scopes" text[] not null, "created_at" timestamptz not null default now(), "last_used_at" timestamptz null, "revoked_at" timestamptz null, constraint "api_token_pkey" primary key ("id"));`);
    this.addSql(`alter table "api_token" add constraint "api_token_token_hash_unique" unique ("token_hash");`);

    this.addSql(`alter table "one_time_link" add constraint "one_time_link_user_id_foreign" foreign key ("user_id") references "app_user" ("id") on update cascade;`);
    this.addSql(`alter table "one_time_link" add constraint "one_time_link_created_by_id_foreign" foreign key ("created_by_id") references "app_user" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "audit_event" add constraint "audit_event_actor_id_foreign" foreign key ("actor_id") references "app_user" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "api_token" add constraint "api_token_owner_id_foreign" foreign key ("owner_id") references "app_user" ("id") on update cascade;`);

    this.addSql(`alter table "app_user" add column "sessions_valid_from" timestamptz null;`);

    // Hand-written: the audit trail is insert-only. MikroORM does not model triggers, so the
    // schema diff ignores them; the refusal lives in the database, below any application bug.
    this.addSql(`create function "audit_event_refuse_change"() returns trigger language plpgsql as $$
begin
  raise exception 'audit_event is insert-only (% refused)', tg_op using errcode = 'insufficient_privilege';
end;
$$;`);
    this.addSql(`create trigger "audit_event_insert_only" before update or delete on "audit_event" for each row execute function "audit_event_refuse_change"();`);
    this.addSql(`create trigger "audit_event_no_truncate" before truncate on "audit_event" for each statement execute function "audit_event_refuse_change"();`);
  }

  override async down(): Promise<void> {
    this.addSql(`drop table if exists "sign_in_attempt" cascade;`);

    this.addSql(`drop table if exists "one_time_link" cascade;`);

    this.addSql(`drop table if exists "audit_event" cascade;`);
    this.addSql(`drop function if exists "audit_event_refuse_change"();`);

    this.addSql(`drop table if exists "api_token" cascade;`);

    this.addSql(`alter table "app_user" drop column "sessions_valid_from";`);
  }

}
