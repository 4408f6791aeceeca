import { Migration } from '@mikro-orm/migrations';

/**
 * API tokens notify `headroom_registry` too (registry_notify_change, migration …170000), so the
 * web server can keep what a bearer value stands for between changes
 * (src/lib/server/auth/tokens.ts): a revoked token stops working as soon as the notification
 * arrives. "Last used" stamps (written once a minute per token) do not notify.
 */
export class Migration20261202210000_token_changes extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create trigger api_token_notify_change after insert or update of owner_id, token_hash, scopes, revoked_at or delete or truncate on "api_token" for each statement execute function registry_notify_change();`);
  }

  override async down(): Promise<void> {
    this.addSql(`drop trigger api_token_notify_change on "api_token";`);
  }

}
