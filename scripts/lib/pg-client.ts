// Administrative SQL (roles, databases) through the `pg` driver the app already depends on.
// The project has no @types/pg, so the few calls used here are typed locally.
import { createRequire } from 'node:module';

export interface PgConnection {
	/** A postgres:// URL, or a socket folder as host for the superuser of a local cluster. */
	connectionString?: string;
	host?: string;
	port?: number;
	user?: string;
	database?: string;
	password?: string;
}

interface PgClient {
	connect(): Promise<void>;
	query(sql: string, values?: unknown[]): Promise<{ rows: Record<string, unknown>[] }>;
	end(): Promise<void>;
}

const require = createRequire(import.meta.url);
const { Client } = require('pg') as { Client: new (config: PgConnection) => PgClient };

export async function withClient<T>(
	connection: PgConnection,
	use: (client: PgClient) => Promise<T>
) {
	const client = new Client(connection);
	await client.connect();
	try {
		return await use(client);
	} finally {
		await client.end();
	}
}

/** DDL takes no bind parameters: names and literals are quoted here instead. */
export const ident = (name: string) => `"${name.replace(/"/g, '""')}"`;
export const literal = (value: string) => `'${value.replace(/'/g, "''")}'`;

export async function databaseExists(connection: PgConnection, name: string): Promise<boolean> {
	return withClient(connection, async (client) => {
		const { rows } = await client.query('select 1 from pg_database where datname = $1', [name]);
		return rows.length > 0;
	});
}

export async function createDatabase(connection: PgConnection, name: string, owner?: string) {
	await withClient(connection, (client) =>
		client.query(`create database ${ident(name)}${owner ? ` owner ${ident(owner)}` : ''}`)
	);
}

/** WITH (FORCE) ends sessions a test left open (pools, pg-boss) instead of failing on them. */
export async function dropDatabase(connection: PgConnection, name: string) {
	await withClient(connection, (client) =>
		client.query(`drop database if exists ${ident(name)} with (force)`)
	);
}

/** A login role with this password (set again if the role exists) and its own database. */
export async function ensureRoleAndDatabase(
	connection: PgConnection,
	{ role, password, database }: { role: string; password: string; database: string }
) {
	await withClient(connection, async (client) => {
		const { rows } = await client.query('select 1 from pg_roles where rolname = $1', [role]);
		const verb = rows.length ? 'alter' : 'create';
		await client.query(`${verb} role ${ident(role)} login password ${literal(password)}`);
	});
	if (!(await databaseExists(connection, database)))
		await createDatabase(connection, database, role);
}
