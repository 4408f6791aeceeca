import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { MikroORM } from '@mikro-orm/postgresql';
import { ormOptions } from '../../src/lib/server/db/options';
import { migrate } from '../../src/lib/server/db/orm';
import { createTestDatabase, type TestDatabase } from './support/db';

let db: TestDatabase;
const saved = { ...process.env };

beforeAll(async () => {
	db = await createTestDatabase('health');
	const orm = await MikroORM.init(ormOptions(db.url));
	await migrate(orm);
	await orm.close(true);
});
afterAll(async () => {
	process.env = saved;
	await db?.drop();
});

/** A fresh copy of the server modules, so each case starts with its own connections. */
async function freshHealth(env: Record<string, string>) {
	vi.resetModules();
	Object.assign(process.env, env);
	const health = await import('../../src/lib/server/health/health');
	const orm = await import('../../src/lib/server/db/orm');
	const boss = await import('../../src/lib/server/jobs/boss');
	// pg-boss installs its schema on first start, as a worker would.
	return {
		check: health.checkHealth,
		close: async () => {
			await boss.stopBoss();
			await orm.closeOrm();
		}
	};
}

describe('health', () => {
	it('reports every component up against the real services', async () => {
		const h = await freshHealth({ DATABASE_URL: db.url, S3_ENDPOINT: saved.S3_ENDPOINT! });
		try {
			const report = await h.check();
			expect(report.down).toEqual([]);
			expect(report.status).toBe('up');
			expect(report.components.database.status).toBe('up');
		} finally {
			await h.close();
		}
	});

	it('names the object store when it is unreachable', async () => {
		const h = await freshHealth({ DATABASE_URL: db.url, S3_ENDPOINT: 'http://127.0.0.1:9' });
		try {
			const report = await h.check();
			expect(report.status).toBe('down');
			expect(report.down).toEqual(['storage']);
			expect(report.components.storage.error).toBeTruthy();
		} finally {
			await h.close();
		}
	});

	it('names the database (and the queue it holds) when PostgreSQL is unreachable', async () => {
		const broken = db.url.replace(/:(\d+)\//, ':9/');
		const h = await freshHealth({ DATABASE_URL: broken, S3_ENDPOINT: saved.S3_ENDPOINT! });
		try {
			const started = Date.now();
			const report = await h.check();
			expect(report.down).toContain('database');
			expect(report.down).not.toContain('storage');
			expect(Date.now() - started).toBeLessThan(10_000);
		} finally {
			await h.close().catch(() => undefined);
		}
	});
});
