import { Migration } from '@mikro-orm/migrations';

export class Migration20261202033800_dashboard extends Migration {

  override async up(): Promise<void> {
    this.addSql(`alter table "loop" add column "failing_criteria" text[] not null default '{}', add column "worst_shortfall" double precision null;`);
    this.addSql(`create index "loop_failing_criteria_gin" on "loop" using gin ("failing_criteria");`);
    this.addSql(`create index "loop_verdict_changed_at_index" on "loop" ("verdict_changed_at");`);
    this.addSql(`create index "loop_updated_at_index" on "loop" ("updated_at");`);
    this.addSql(`create index "loop_wc_upper_gain_margin_db_index" on "loop" ("wc_upper_gain_margin_db");`);
    this.addSql(`create index "loop_wc_delay_margin_s_index" on "loop" ("wc_delay_margin_s");`);
    this.addSql(`create index "loop_wc_modulus_margin_index" on "loop" ("wc_modulus_margin");`);
    this.addSql(`create index "loop_worst_shortfall_index" on "loop" ("worst_shortfall");`);
    this.addSql(`create index "revision_uploaded_at_loop_index" on "revision" ("uploaded_at", "loop_id");`);

    // Loops judged before this migration: fill the new columns from the cached judgement.
    this.addSql(`update "loop" set "failing_criteria" = coalesce((select array_agg(c->>'criterion') from jsonb_array_elements("verdict_detail"->'criteria') c where c->>'status' in ('fail', 'covered')), '{}') where "verdict_detail" is not null;`);
  }

  override async down(): Promise<void> {
    this.addSql(`drop index "revision_uploaded_at_loop_index";`);
    this.addSql(`drop index "loop_failing_criteria_gin";`);
    this.addSql(`drop index "loop_verdict_changed_at_index";`);
    this.addSql(`drop index "loop_updated_at_index";`);
    this.addSql(`drop index "loop_wc_upper_gain_margin_db_index";`);
    this.addSql(`drop index "loop_wc_delay_margin_s_index";`);
    this.addSql(`drop index "loop_wc_modulus_margin_index";`);
    this.addSql(`drop index "loop_worst_shortfall_index";`);
    this.addSql(`alter table "loop" drop column "failing_criteria", drop column "worst_shortfall";`);
  }

}
