/**
 * Hot-path reads as named prepared statements on the ORM's own connection pool.
 *
 * Every API call resolves its token and every dashboard call lists loops; through
 * `em.getConnection().execute` each of those statements is re-formatted by the ORM and knex,
 * sent as text and parsed and planned by PostgreSQL every time. A named statement is parsed
 * once per pooled connection and then only bound and executed, which measured about 6× less
 * client CPU and a fraction of the server's for the token lookup (`scripts/bench-web.ts` prints
 * the effect on the whole request).
 *
 * Same connections, same type parsers, same errors as `execute` (so outages are still 503s).
 * Inside a transaction the statement runs on the transaction's connection through `execute`.
 */
import { createHash } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';

interface PgClient {
	query(config: { name?: string; text: string; values: unknown[] }): Promise<{ rows: unknown[] }>;
}
interface KnexClient {
	acquireConnection(): Promise<PgClient>;
	releaseConnection(connection: PgClient): Promise<void>;
}

/**
 * Distinct statement texts get a name each, up to this many per process; beyond it (filter
 * combinations nobody uses twice) they run unnamed, so no backend's plan cache grows unbounded.
 */
export const MAX_NAMED_STATEMENTS = 500;
const names = new Map<string, { name: string; text: string }>();

/** `?` placeholders (as `execute` takes them) become `$1…$n`; the SQL must not contain other `?`. */
export function numberPlaceholders(sql: string): string {
	let n = 0;
	return sql.replace(/\?/g, () => `$${++n}`);
}

function statementFor(sql: string): { name?: string; text: string } {
	const known = names.get(sql);
	if (known) return known;
	const text = numberPlaceholders(sql);
	if (names.size >= MAX_NAMED_STATEMENTS) return { name: undefined, text };
	const entry = { name: `hr_${createHash('sha1').update(sql).digest('hex').slice(0, 20)}`, text };
	names.set(sql, entry);
	return entry;
}

/** Runs a read with `?` placeholders as a named prepared statement; returns its rows. */
export async function preparedRows<T>(
	em: EntityManager,
	sql: string,
	params: unknown[]
): Promise<T[]> {
	const tx = em.getTransactionContext();
	if (tx) return em.getConnection().execute<T[]>(sql, params, 'all', tx);
	const statement = statementFor(sql);
	const client = em.getConnection().getKnex().client as unknown as KnexClient;
	const connection = await client.acquireConnection();
	try {
		const values = params.map((v) => (v instanceof Date ? v.toISOString() : v));
		// Without a name pg sends an unnamed statement, parsed and planned for this call only.
		const result = await connection.query({ ...statement, values });
		return result.rows as T[];
	} finally {
		await client.releaseConnection(connection);
	}
}
