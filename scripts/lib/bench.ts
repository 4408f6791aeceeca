/**
 * What the `npm run bench:*` scripts share: a scratch folder, a supervisor, a throwaway
 * PostgreSQL cluster with one database and an S3 fake, all removed by `finish`.
 */
import { chmodSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { startCluster, type Cluster } from './postgres';
import { startS3Fake } from './s3';
import { freePort } from './ports';
import { Supervisor } from './processes';
import { randomSecret } from './secrets';

export interface BenchServices {
	supervisor: Supervisor;
	pg: Cluster;
	s3Port: number;
	/** The bench database on the cluster. */
	databaseUrl: string;
}

/** Percentile p (0–1) of xs, nearest rank. */
export const pct = (xs: number[], p: number) => [...xs].sort((a, b) => a - b)[Math.min(xs.length - 1, Math.floor(p * xs.length))];

/** Runs `main` against fresh services, then stops them and deletes their data whatever happened. */
export function runBench(name: string, root: string, main: (services: BenchServices) => Promise<void>): void {
	const temp = mkdtempSync(join(tmpdir(), `headroom-${name}-`));
	// PostgreSQL runs as its own user and must reach its data folder inside.
	chmodSync(temp, 0o755);
	const supervisor = new Supervisor();
	const start = async () => {
		const pg = await startCluster({ dataDir: join(temp, 'pg'), port: await freePort(), logFile: join(temp, 'pg.log'), superuserPassword: randomSecret(), throwaway: true });
		supervisor.defer('postgres', () => pg.stop(), () => pg.stopSync());
		await pg.createDatabase('bench');
		const s3Port = await freePort();
		await startS3Fake(supervisor, { root, port: s3Port, dir: join(temp, 's3'), bucket: 'headroom' });
		const url = new URL(pg.adminUrl);
		url.pathname = '/bench';
		await main({ supervisor, pg, s3Port, databaseUrl: url.toString() });
	};
	start()
		.catch((e) => {
			console.error(e);
			process.exitCode = 1;
		})
		.finally(async () => {
			await supervisor.stopAll();
			rmSync(temp, { recursive: true, force: true });
		});
}
