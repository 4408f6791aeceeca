import type PgBoss from 'pg-boss';
import type { EntityManager } from '@mikro-orm/postgresql';

/**
 * Rewrite pg-boss's `$n` placeholders into knex's `?` form (repeating values where a placeholder
 * recurs), so its statements can run on the connection of a MikroORM transaction.
 */
export function toPositional(text: string, values: unknown[]): { sql: string; bindings: unknown[] } {
	const bindings: unknown[] = [];
	// A literal "?" would otherwise be taken for a placeholder by knex.
	const sql = text.replace(/\?/g, '\\?').replace(/\$(\d+)/g, (_, n: string) => {
		const value = values[Number(n) - 1];
		// knex refuses undefined bindings; pg-boss means "not given", which SQL spells NULL.
		bindings.push(value === undefined ? null : value);
		return '?';
	});
	return { sql, bindings };
}

/**
 * A pg-boss `db` that runs on the EntityManager's current transaction: a job sent with it is
 * committed or rolled back together with the rows it belongs to, so no revision is ever stored
 * without its job, and no job refers to a row that was never committed.
 */
export function transactionalDb(em: EntityManager): PgBoss.Db {
	return {
		async executeSql(text, values) {
			const { sql, bindings } = toPositional(text, values);
			const rows = await em
				.getConnection()
				.execute(sql, bindings as never[], 'all', em.getTransactionContext());
			return { rows: rows as unknown[] };
		}
	};
}
