import { Migration } from '@mikro-orm/migrations';

/**
 * Sort indexes: one partial index per sort and direction of the loop list, in exactly the
 * order the list asks for (key, then loop key, then id, nulls last), replacing the single-column
 * ones; see src/lib/server/registry/loop-sort-keys.ts.
 *
 * loop.last_revision_at: the newest revision's upload time, for the dashboard's `changedSince`
 * filter. A statement-level trigger keeps it on every insert into revision (uploads, presigned
 * announcements, bulk loads alike), so no code path can forget it.
 */
export class Migration20261202140000_activity extends Migration {

  override async up(): Promise<void> {
    this.addSql(`alter table "loop" add column "last_revision_at" timestamptz null;`);
    // changedSince counts loops with an OR over both columns: an index-only scan of this one
    // instead of reading every loop row.
    this.addSql(`create index "loop_changed_index" on "loop" ("verdict_changed_at", "last_revision_at") where "archived_at" is null;`);
    this.addSql(`update "loop" l set "last_revision_at" = r.at from (select loop_id, max(uploaded_at) as at from revision group by loop_id) r where l.id = r.loop_id;`);
    this.addSql(`create function loop_note_revisions() returns trigger language plpgsql as $$
      begin
        update loop l set last_revision_at = n.at
        from (select loop_id, max(uploaded_at) as at from inserted group by loop_id) n
        where l.id = n.loop_id and (l.last_revision_at is null or l.last_revision_at < n.at);
        return null;
      end $$;`);
    this.addSql(`create trigger revision_notes_loop after insert on revision referencing new table as inserted for each statement execute function loop_note_revisions();`);

    for (const old of ['loop_updated_at_index', 'loop_wc_upper_gain_margin_db_index', 'loop_wc_delay_margin_s_index', 'loop_wc_modulus_margin_index', 'loop_worst_shortfall_index']) {
      this.addSql(`drop index "${old}";`);
    }
    this.addSql(`create index "loop_sort_key_asc" on "loop" (key asc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`create index "loop_sort_key_desc" on "loop" (key desc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`create index "loop_sort_name_asc" on "loop" (name asc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`create index "loop_sort_name_desc" on "loop" (name desc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`create index "loop_sort_verdict_asc" on "loop" ((case verdict when 'compliant' then 0 when 'covered' then 1 when 'empty' then 2 when 'pending' then 2 when 'rejected' then 3 when 'noncompliant' then 4 when 'unstable' then 5 end) asc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`create index "loop_sort_verdict_desc" on "loop" ((case verdict when 'compliant' then 0 when 'covered' then 1 when 'empty' then 2 when 'pending' then 2 when 'rejected' then 3 when 'noncompliant' then 4 when 'unstable' then 5 end) desc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`create index "loop_sort_updated_at_asc" on "loop" (updated_at asc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`create index "loop_sort_updated_at_desc" on "loop" (updated_at desc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`create index "loop_sort_phase_margin_asc" on "loop" (abs(wc_phase_margin_deg) asc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`create index "loop_sort_phase_margin_desc" on "loop" (abs(wc_phase_margin_deg) desc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`create index "loop_sort_upper_gain_margin_asc" on "loop" (wc_upper_gain_margin_db asc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`create index "loop_sort_upper_gain_margin_desc" on "loop" (wc_upper_gain_margin_db desc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`create index "loop_sort_delay_margin_asc" on "loop" (wc_delay_margin_s asc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`create index "loop_sort_delay_margin_desc" on "loop" (wc_delay_margin_s desc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`create index "loop_sort_modulus_margin_asc" on "loop" (wc_modulus_margin asc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`create index "loop_sort_modulus_margin_desc" on "loop" (wc_modulus_margin desc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`create index "loop_sort_shortfall_asc" on "loop" (worst_shortfall asc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`create index "loop_sort_shortfall_desc" on "loop" (worst_shortfall desc nulls last, "key", "id") where "archived_at" is null;`);
  }

  override async down(): Promise<void> {
    this.addSql(`drop index "loop_sort_key_asc";`);
    this.addSql(`drop index "loop_sort_key_desc";`);
    this.addSql(`drop index "loop_sort_name_asc";`);
    this.addSql(`drop index "loop_sort_name_desc";`);
    this.addSql(`drop index "loop_sort_verdict_asc";`);
    this.addSql(`drop index "loop_sort_verdict_desc";`);
    this.addSql(`drop index "loop_sort_updated_at_asc";`);
    this.addSql(`drop index "loop_sort_updated_at_desc";`);
    this.addSql(`drop index "loop_sort_phase_margin_asc";`);
    this.addSql(`drop index "loop_sort_phase_margin_desc";`);
    this.addSql(`drop index "loop_sort_upper_gain_margin_asc";`);
    this.addSql(`drop index "loop_sort_upper_gain_margin_desc";`);
    this.addSql(`drop index "loop_sort_delay_margin_asc";`);
    this.addSql(`drop index "loop_sort_delay_margin_desc";`);
    this.addSql(`drop index "loop_sort_modulus_margin_asc";`);
    this.addSql(`drop index "loop_sort_modulus_margin_desc";`);
    this.addSql(`drop index "loop_sort_shortfall_asc";`);
    this.addSql(`drop index "loop_sort_shortfall_desc";`);
    this.addSql(`create index "loop_updated_at_index" on "loop" ("updated_at");`);
    this.addSql(`create index "loop_wc_upper_gain_margin_db_index" on "loop" ("wc_upper_gain_margin_db");`);
    this.addSql(`create index "loop_wc_delay_margin_s_index" on "loop" ("wc_delay_margin_s");`);
    this.addSql(`create index "loop_wc_modulus_margin_index" on "loop" ("wc_modulus_margin");`);
    this.addSql(`create index "loop_worst_shortfall_index" on "loop" ("worst_shortfall");`);
    this.addSql(`drop trigger revision_notes_loop on revision;`);
    this.addSql(`drop function loop_note_revisions();`);
    this.addSql(`drop index "loop_changed_index";`);
    this.addSql(`alter table "loop" drop column "last_revision_at";`);
  }

}
