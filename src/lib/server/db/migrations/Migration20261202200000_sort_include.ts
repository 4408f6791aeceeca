import { Migration } from '@mikro-orm/migrations';

/**
 * The loop list's sort indexes (…140000_activity) again, now carrying the columns the list's
 * filters test and those under the sort expressions (INCLUDE), so a filtered page is an
 * index-only walk: no loop row is read to test a filter. See
 * src/lib/server/registry/loop-sort-keys.ts (SORT_INDEX_INCLUDE).
 */
export class Migration20261202200000_sort_include extends Migration {

  override async up(): Promise<void> {
    this.addSql(`drop index "loop_sort_key_asc";`);
    this.addSql(`create index "loop_sort_key_asc" on "loop" (key asc nulls last, "key", "id") include ("loop_class_id", "product_id", "owner_id", "verdict", "failing_criteria", "verdict_changed_at", "last_revision_at", "wc_phase_margin_deg") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_key_desc";`);
    this.addSql(`create index "loop_sort_key_desc" on "loop" (key desc nulls last, "key", "id") include ("loop_class_id", "product_id", "owner_id", "verdict", "failing_criteria", "verdict_changed_at", "last_revision_at", "wc_phase_margin_deg") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_name_asc";`);
    this.addSql(`create index "loop_sort_name_asc" on "loop" (name asc nulls last, "key", "id") include ("loop_class_id", "product_id", "owner_id", "verdict", "failing_criteria", "verdict_changed_at", "last_revision_at", "wc_phase_margin_deg") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_name_desc";`);
    this.addSql(`create index "loop_sort_name_desc" on "loop" (name desc nulls last, "key", "id") include ("loop_class_id", "product_id", "owner_id", "verdict", "failing_criteria", "verdict_changed_at", "last_revision_at", "wc_phase_margin_deg") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_verdict_asc";`);
    this.addSql(`create index "loop_sort_verdict_asc" on "loop" ((case verdict when 'compliant' then 0 when 'covered' then 1 when 'empty' then 2 when 'pending' then 2 when 'rejected' then 3 when 'noncompliant' then 4 when 'unstable' then 5 end) asc nulls last, "key", "id") include ("loop_class_id", "product_id", "owner_id", "verdict", "failing_criteria", "verdict_changed_at", "last_revision_at", "wc_phase_margin_deg") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_verdict_desc";`);
    this.addSql(`create index "loop_sort_verdict_desc" on "loop" ((case verdict when 'compliant' then 0 when 'covered' then 1 when 'empty' then 2 when 'pending' then 2 when 'rejected' then 3 when 'noncompliant' then 4 when 'unstable' then 5 end) desc nulls last, "key", "id") include ("loop_class_id", "product_id", "owner_id", "verdict", "failing_criteria", "verdict_changed_at", "last_revision_at", "wc_phase_margin_deg") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_updated_at_asc";`);
    this.addSql(`create index "loop_sort_updated_at_asc" on "loop" (updated_at asc nulls last, "key", "id") include ("loop_class_id", "product_id", "owner_id", "verdict", "failing_criteria", "verdict_changed_at", "last_revision_at", "wc_phase_margin_deg") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_updated_at_desc";`);
    this.addSql(`create index "loop_sort_updated_at_desc" on "loop" (updated_at desc nulls last, "key", "id") include ("loop_class_id", "product_id", "owner_id", "verdict", "failing_criteria", "verdict_changed_at", "last_revision_at", "wc_phase_margin_deg") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_phase_margin_asc";`);
    this.addSql(`create index "loop_sort_phase_margin_asc" on "loop" (abs(wc_phase_margin_deg) asc nulls last, "key", "id") include ("loop_class_id", "product_id", "owner_id", "verdict", "failing_criteria", "verdict_changed_at", "last_revision_at", "wc_phase_margin_deg") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_phase_margin_desc";`);
    this.addSql(`create index "loop_sort_phase_margin_desc" on "loop" (abs(wc_phase_margin_deg) desc nulls last, "key", "id") include ("loop_class_id", "product_id", "owner_id", "verdict", "failing_criteria", "verdict_changed_at", "last_revision_at", "wc_phase_margin_deg") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_upper_gain_margin_asc";`);
    this.addSql(`create index "loop_sort_upper_gain_margin_asc" on "loop" (wc_upper_gain_margin_db asc nulls last, "key", "id") include ("loop_class_id", "product_id", "owner_id", "verdict", "failing_criteria", "verdict_changed_at", "last_revision_at", "wc_phase_margin_deg") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_upper_gain_margin_desc";`);
    this.addSql(`create index "loop_sort_upper_gain_margin_desc" on "loop" (wc_upper_gain_margin_db desc nulls last, "key", "id") include ("loop_class_id", "product_id", "owner_id", "verdict", "failing_criteria", "verdict_changed_at", "last_revision_at", "wc_phase_margin_deg") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_delay_margin_asc";`);
    this.addSql(`create index "loop_sort_delay_margin_asc" on "loop" (wc_delay_margin_s asc nulls last, "key", "id") include ("loop_class_id", "product_id", "owner_id", "verdict", "failing_criteria", "verdict_changed_at", "last_revision_at", "wc_phase_margin_deg") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_delay_margin_desc";`);
    this.addSql(`create index "loop_sort_delay_margin_desc" on "loop" (wc_delay_margin_s desc nulls last, "key", "id") include ("loop_class_id", "product_id", "owner_id", "verdict", "failing_criteria", "verdict_changed_at", "last_revision_at", "wc_phase_margin_deg") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_modulus_margin_asc";`);
    this.addSql(`create index "loop_sort_modulus_margin_asc" on "loop" (wc_modulus_margin asc nulls last, "key", "id") include ("loop_class_id", "product_id", "owner_id", "verdict", "failing_criteria", "verdict_changed_at", "last_revision_at", "wc_phase_margin_deg") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_modulus_margin_desc";`);
    this.addSql(`create index "loop_sort_modulus_margin_desc" on "loop" (wc_modulus_margin desc nulls last, "key", "id") include ("loop_class_id", "product_id", "owner_id", "verdict", "failing_criteria", "verdict_changed_at", "last_revision_at", "wc_phase_margin_deg") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_shortfall_asc";`);
    this.addSql(`create index "loop_sort_shortfall_asc" on "loop" (worst_shortfall asc nulls last, "key", "id") include ("loop_class_id", "product_id", "owner_id", "verdict", "failing_criteria", "verdict_changed_at", "last_revision_at", "wc_phase_margin_deg") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_shortfall_desc";`);
    this.addSql(`create index "loop_sort_shortfall_desc" on "loop" (worst_shortfall desc nulls last, "key", "id") include ("loop_class_id", "product_id", "owner_id", "verdict", "failing_criteria", "verdict_changed_at", "last_revision_at", "wc_phase_margin_deg") where "archived_at" is null;`);
  }

  override async down(): Promise<void> {
    this.addSql(`drop index "loop_sort_key_asc";`);
    this.addSql(`create index "loop_sort_key_asc" on "loop" (key asc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_key_desc";`);
    this.addSql(`create index "loop_sort_key_desc" on "loop" (key desc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_name_asc";`);
    this.addSql(`create index "loop_sort_name_asc" on "loop" (name asc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_name_desc";`);
    this.addSql(`create index "loop_sort_name_desc" on "loop" (name desc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_verdict_asc";`);
    this.addSql(`create index "loop_sort_verdict_asc" on "loop" ((case verdict when 'compliant' then 0 when 'covered' then 1 when 'empty' then 2 when 'pending' then 2 when 'rejected' then 3 when 'noncompliant' then 4 when 'unstable' then 5 end) asc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_verdict_desc";`);
    this.addSql(`create index "loop_sort_verdict_desc" on "loop" ((case verdict when 'compliant' then 0 when 'covered' then 1 when 'empty' then 2 when 'pending' then 2 when 'rejected' then 3 when 'noncompliant' then 4 when 'unstable' then 5 end) desc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_updated_at_asc";`);
    this.addSql(`create index "loop_sort_updated_at_asc" on "loop" (updated_at asc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_updated_at_desc";`);
    this.addSql(`create index "loop_sort_updated_at_desc" on "loop" (updated_at desc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_phase_margin_asc";`);
    this.addSql(`create index "loop_sort_phase_margin_asc" on "loop" (abs(wc_phase_margin_deg) asc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_phase_margin_desc";`);
    this.addSql(`create index "loop_sort_phase_margin_desc" on "loop" (abs(wc_phase_margin_deg) desc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_upper_gain_margin_asc";`);
    this.addSql(`create index "loop_sort_upper_gain_margin_asc" on "loop" (wc_upper_gain_margin_db asc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_upper_gain_margin_desc";`);
    this.addSql(`create index "loop_sort_upper_gain_margin_desc" on "loop" (wc_upper_gain_margin_db desc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_delay_margin_asc";`);
    this.addSql(`create index "loop_sort_delay_margin_asc" on "loop" (wc_delay_margin_s asc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_delay_margin_desc";`);
    this.addSql(`create index "loop_sort_delay_margin_desc" on "loop" (wc_delay_margin_s desc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_modulus_margin_asc";`);
    this.addSql(`create index "loop_sort_modulus_margin_asc" on "loop" (wc_modulus_margin asc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_modulus_margin_desc";`);
    this.addSql(`create index "loop_sort_modulus_margin_desc" on "loop" (wc_modulus_margin desc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_shortfall_asc";`);
    this.addSql(`create index "loop_sort_shortfall_asc" on "loop" (worst_shortfall asc nulls last, "key", "id") where "archived_at" is null;`);
    this.addSql(`drop index "loop_sort_shortfall_desc";`);
    this.addSql(`create index "loop_sort_shortfall_desc" on "loop" (worst_shortfall desc nulls last, "key", "id") where "archived_at" is null;`);
  }

}
