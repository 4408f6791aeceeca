/**
 * What the benchmarks that drive the app's own services share (bench:jobs, bench:reports): the
 * environment pointing at the bench services, a migrated ORM with a lead to act as, worker
 * processes, the model they upload and a wait for the compute backlog to drain.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import type { EntityManager } from '@mikro-orm/postgresql';
import { s3Env } from './s3';
import type { BenchServices } from './bench';

/**
 * A PI speed loop around a two-mass plant: a realistic order-5 rational loop. Each benchmark
 * varies the gains a little per upload, so every model is a distinct revision.
 */
export const speedLoopModel = (kp: number, ki: number) =>
	new TextEncoder().encode(
		JSON.stringify({
			format: 'headroom-loop-model/1',
			blocks: [
				{ type: 'pid', kp, ki },
				{
					type: 'factored',
					zeros: [
						[-20, 300],
						[-20, -300]
					],
					poles: [0, [-15, 420], [-15, -420], -2000],
					gain: 2.2e6
				}
			]
		})
	);

/** The environment of the bench's own processes; also set on this one, whose server modules read it. */
export function benchEnv({ databaseUrl, s3Port }: BenchServices): NodeJS.ProcessEnv {
	const env: NodeJS.ProcessEnv = {
		...process.env,
		DATABASE_URL: databaseUrl,
		...s3Env(s3Port, 'headroom'),
		NODE_ENV: 'production'
	};
	Object.assign(process.env, env);
	return env;
}

/** The lead the benchmarks act as (`bench-lead@bench.test`), with a password when one is given. */
export async function createBenchLead(em: EntityManager, passwordHash?: string) {
	const { UserSchema } = await import('../../src/lib/server/db/entities');
	const u = em.create(UserSchema, {
		email: 'bench-lead@bench.test',
		name: 'Bench Lead',
		role: 'lead',
		active: true,
		...(passwordHash === undefined ? {} : { passwordHash }),
		createdAt: new Date()
	});
	await em.flush();
	return { id: u.id, email: u.email, name: u.name, role: 'lead' as const };
}

/**
 * A migrated ORM on the bench database, the bucket, a lead to act as, and the registry and
 * upload services the benchmarks seed with. Call after `benchEnv`: the server modules are
 * imported here, after the environment is set, because they read it on first use.
 */
export async function openBenchApp(databaseUrl: string) {
	const { MikroORM } = await import('@mikro-orm/postgresql');
	const { ormOptions } = await import('../../src/lib/server/db/options');
	const { migrate } = await import('../../src/lib/server/db/orm');
	const { ensureBucket } = await import('../../src/lib/server/storage/s3');
	const { createProduct } = await import('../../src/lib/server/registry/products');
	const { createClass } = await import('../../src/lib/server/registry/classes');
	const { createLoop } = await import('../../src/lib/server/registry/loops');
	const { uploadRevision } = await import('../../src/lib/server/revisions/upload');

	const orm = await MikroORM.init(ormOptions(databaseUrl));
	await migrate(orm);
	await ensureBucket();
	const em = () => orm.em.fork();
	const lead = await createBenchLead(em());
	return {
		orm,
		em,
		lead,
		conn: em().getConnection(),
		createProduct,
		createClass,
		createLoop,
		uploadRevision
	};
}

type Connection = Awaited<ReturnType<typeof openBenchApp>>['conn'];

/** Resolves when no revision is queued or computing any more, polling every `pollMs`. */
export async function untilComputed(conn: Connection, pollMs: number): Promise<void> {
	for (;;) {
		const [{ n }] = await conn.execute<{ n: number }[]>(
			`select count(*)::int as n from revision where state in ('queued', 'computing')`
		);
		if (n === 0) return;
		await new Promise((r) => setTimeout(r, pollMs));
	}
}

/** A worker process (scripts/worker.ts), resolved once it says it is ready; `onOutput` sees its stdout. */
export function startWorker(
	root: string,
	env: NodeJS.ProcessEnv,
	onOutput?: (chunk: string) => void
): Promise<ChildProcess> {
	const child = spawn(process.execPath, ['--import', 'tsx', 'scripts/worker.ts'], {
		cwd: root,
		env,
		stdio: ['ignore', 'pipe', 'inherit']
	});
	if (onOutput) child.stdout!.on('data', (d) => onOutput(String(d)));
	return new Promise((res) =>
		child.stdout!.on('data', (d) => String(d).includes('ready') && res(child))
	);
}

export const stopWorker = (c: ChildProcess) =>
	new Promise((res) => (c.once('exit', res), c.kill('SIGTERM')));
