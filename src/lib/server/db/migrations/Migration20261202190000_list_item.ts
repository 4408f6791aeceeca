import { Migration } from '@mikro-orm/migrations';

const iso = (column: string) =>
  `to_char(${column} at time zone 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"')`;

/**
 * loop.list_item: the loop as GET /api/loops lists it (JSON text, all but `activeDeviations`,
 * which depends on the clock and is added per request), so a page of the list is a
 * concatenation of stored text instead of JSON built per row and request.
 *
 * A trigger writes it on every insert and update of a loop, whatever the code path (judgements,
 * edits, archiving, bulk loads), and renaming a product, a class or an owner rewrites the items
 * of their loops. list-json.test.ts holds it equal to the list's objects after each such write.
 *
 * The deviation table notifies `headroom_registry` too (registry_notify_change, migration
 * …170000): the web server keeps whole pages of the list between writes, and a page counts the
 * deviations in force on its loops.
 */
export class Migration20261202190000_list_item extends Migration {

  override async up(): Promise<void> {
    this.addSql(`alter table "loop" add column "list_item" text null;`);
    this.addSql(`create function loop_list_item(l loop) returns text language sql stable as $$
      select json_build_object(
        'id', l.id, 'key', l.key, 'name', l.name,
        'product', (select json_build_object('id', p.id, 'key', p.key, 'name', p.name) from product p where p.id = l.product_id),
        'class', (select json_build_object('id', c.id, 'key', c.key, 'name', c.name) from loop_class c where c.id = l.loop_class_id),
        'owner', (select json_build_object('id', u.id, 'name', u.name, 'email', u.email) from app_user u where u.id = l.owner_id),
        'tags', l.tags, 'note', l.note, 'verdict', l.verdict,
        'archivedAt', ${iso('l.archived_at')}, 'createdAt', ${iso('l.created_at')}, 'updatedAt', ${iso('l.updated_at')},
        'worstCase', json_build_object('phaseMarginDeg', l.wc_phase_margin_deg, 'upperGainMarginDb', l.wc_upper_gain_margin_db,
          'delayMarginS', l.wc_delay_margin_s, 'modulusMargin', l.wc_modulus_margin),
        'criteria', coalesce(l.verdict_detail->'criteria', '[]'::jsonb),
        'failing', l.failing_criteria, 'worstShortfall', l.worst_shortfall,
        'judgedAt', ${iso('l.judged_at')}, 'verdictChangedAt', ${iso('l.verdict_changed_at')})::text
    $$;`);
    this.addSql(`create function loop_keep_list_item() returns trigger language plpgsql as $$
      begin
        new.list_item := loop_list_item(new);
        return new;
      end $$;`);
    this.addSql(`create trigger loop_list_item before insert or update on "loop" for each row execute function loop_keep_list_item();`);
    // A rename rewrites the items that name it (the trigger above computes them again).
    this.addSql(`create function loop_list_item_renamed() returns trigger language plpgsql as $$
      begin
        if tg_table_name = 'product' then
          update loop set list_item = null where product_id = new.id;
        elsif tg_table_name = 'loop_class' then
          update loop set list_item = null where loop_class_id = new.id;
        else
          update loop set list_item = null where owner_id = new.id;
        end if;
        return null;
      end $$;`);
    this.addSql(`create trigger product_list_item after update of key, name on "product" for each row when (old.key is distinct from new.key or old.name is distinct from new.name) execute function loop_list_item_renamed();`);
    this.addSql(`create trigger loop_class_list_item after update of key, name on "loop_class" for each row when (old.key is distinct from new.key or old.name is distinct from new.name) execute function loop_list_item_renamed();`);
    this.addSql(`create trigger app_user_list_item after update of name, email on "app_user" for each row when (old.name is distinct from new.name or old.email is distinct from new.email) execute function loop_list_item_renamed();`);
    this.addSql(`update "loop" set "list_item" = null;`);
    this.addSql(`create trigger deviation_notify_change after insert or update or delete or truncate on "deviation" for each statement execute function registry_notify_change();`);
  }

  override async down(): Promise<void> {
    this.addSql(`drop trigger deviation_notify_change on "deviation";`);
    this.addSql(`drop trigger app_user_list_item on "app_user";`);
    this.addSql(`drop trigger loop_class_list_item on "loop_class";`);
    this.addSql(`drop trigger product_list_item on "product";`);
    this.addSql(`drop function loop_list_item_renamed();`);
    this.addSql(`drop trigger loop_list_item on "loop";`);
    this.addSql(`drop function loop_keep_list_item();`);
    this.addSql(`drop function loop_list_item(loop);`);
    this.addSql(`alter table "loop" drop column "list_item";`);
  }

}
