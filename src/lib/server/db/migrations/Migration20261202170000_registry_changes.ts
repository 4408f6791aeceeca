import { Migration } from '@mikro-orm/migrations';

/**
 * Every statement that writes the tables the loop list filters on (loop, and the product,
 * class and owner keys a filter names) notifies channel `headroom_registry`, so the web server
 * can keep counts until they change (src/lib/server/db/registry-changes.ts). One notification
 * per statement, and PostgreSQL folds identical ones of a transaction into one.
 */
export class Migration20261202170000_registry_changes extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create function registry_notify_change() returns trigger language plpgsql as $$
      begin
        perform pg_notify('headroom_registry', tg_table_name);
        return null;
      end $$;`);
    for (const table of ['loop', 'product', 'loop_class', 'app_user']) {
      this.addSql(`create trigger ${table}_notify_change after insert or update or delete or truncate on "${table}" for each statement execute function registry_notify_change();`);
    }
  }

  override async down(): Promise<void> {
    for (const table of ['loop', 'product', 'loop_class', 'app_user']) {
      this.addSql(`drop trigger ${table}_notify_change on "${table}";`);
    }
    this.addSql(`drop function registry_notify_change();`);
  }

}
