/**
 * `npm run bench:jobs`: the revision pipeline against throwaway local services (its own
 * PostgreSQL cluster and S3 fake, removed afterwards). Prints figures and the targets next to
 * them; it never fails on timing.
 *   - upload → verdict visible: median and 95th percentile over sequential uploads
 *   - revisions computed and judged per second, with one worker process and with two
 *   - a new target version for a class of 10,000 loops: every loop judged again
 */
import { resolve } from 'node:path';
import { spawn, type ChildProcess } from 'node:child_process';
import { s3Env } from './lib/s3';
import { pct, runBench, type BenchServices } from './lib/bench';

const root = resolve(import.meta.dirname, '..');
const UPLOADS = Number(process.env.BENCH_UPLOADS ?? 40);
const BATCH = Number(process.env.BENCH_BATCH ?? 600);
const CLASS_LOOPS = Number(process.env.BENCH_CLASS_LOOPS ?? 10_000);

const model = (i: number) =>
	new TextEncoder().encode(
		JSON.stringify({
			format: 'headroom-loop-model/1',
			// A PI speed loop around a two-mass plant: a realistic order-5 rational loop per upload.
			blocks: [
				{ type: 'pid', kp: 0.8 + i * 1e-6, ki: 40 },
				{ type: 'factored', zeros: [[-20, 300], [-20, -300]], poles: [0, [-15, 420], [-15, -420], -2000], gain: 2.2e6 }
			]
		})
	);

function startWorker(env: NodeJS.ProcessEnv): Promise<ChildProcess> {
	const child = spawn(process.execPath, ['--import', 'tsx', 'scripts/worker.ts'], { cwd: root, env, stdio: ['ignore', 'pipe', 'inherit'] });
	return new Promise((res) => child.stdout!.on('data', (d) => String(d).includes('ready') && res(child)));
}
const stopWorker = (c: ChildProcess) => new Promise((res) => (c.once('exit', res), c.kill('SIGTERM')));

async function main({ pg, s3Port, databaseUrl }: BenchServices) {
	const env: NodeJS.ProcessEnv = { ...process.env, DATABASE_URL: databaseUrl, ...s3Env(s3Port, 'headroom'), NODE_ENV: 'production' };
	Object.assign(process.env, env);

	// Imported after the environment is set: the server modules read it on first use.
	const { MikroORM } = await import('@mikro-orm/postgresql');
	const { ormOptions } = await import('../src/lib/server/db/options');
	const { migrate } = await import('../src/lib/server/db/orm');
	const { ensureBucket } = await import('../src/lib/server/storage/s3');
	const { uploadRevision } = await import('../src/lib/server/revisions/upload');
	const { createProduct } = await import('../src/lib/server/registry/products');
	const { createClass } = await import('../src/lib/server/registry/classes');
	const { createLoop } = await import('../src/lib/server/registry/loops');
	const { judgeLoops } = await import('../src/lib/server/verdicts/judge-loops');
	const { UserSchema } = await import('../src/lib/server/db/entities');

	const orm = await MikroORM.init(ormOptions(env.DATABASE_URL!));
	await migrate(orm);
	await ensureBucket();
	const em = () => orm.em.fork();
	const e0 = em();
	const u = e0.create(UserSchema, { email: 'bench-lead@bench.test', name: 'Bench Lead', role: 'lead', active: true, createdAt: new Date() });
	await e0.flush();
	const lead = { id: u.id, email: u.email, name: u.name, role: 'lead' as const };
	await createProduct(em(), lead, { key: 'bench', name: 'Bench drive' });
	await createClass(em(), lead, { key: 'speed', name: 'Speed loop', targets: { minPhaseMarginDeg: '45', minUpperGainMarginDb: '6' } });
	const loop = await createLoop(em(), lead, { product: 'bench', class: 'speed', key: 'ax1-speed', name: 'Axis 1 speed', owner: lead.email });
	const conn = em().getConnection();
	const verdictOf = async () => (await conn.execute<{ judged_revision_id: string | null }[]>('select judged_revision_id from loop where id = ?', [loop.id]))[0].judged_revision_id;

	console.log(`\nHeadroom jobs benchmark (PostgreSQL ${pg.port}, S3 fake ${s3Port})\n`);
	let worker = await startWorker(env);
	const latencies: number[] = [];
	for (let i = 0; i < UPLOADS; i++) {
		const t0 = performance.now();
		const rev = await uploadRevision(em(), lead, loop.id, { bytes: model(i) });
		while ((await verdictOf()) !== rev.id) await new Promise((r) => setTimeout(r, 5));
		latencies.push(performance.now() - t0);
	}
	console.log(`upload → verdict visible (${UPLOADS} uploads): median ${pct(latencies, 0.5).toFixed(0)} ms (target ≤ 1000), p95 ${pct(latencies, 0.95).toFixed(0)} ms (target ≤ 2000)`);

	async function throughput(workers: number, offset: number): Promise<number> {
		const loops: string[] = [];
		for (let i = 0; i < 20; i++) {
			loops.push((await createLoop(em(), lead, { product: 'bench', class: 'speed', key: `t${offset}-${i}`, name: `Throughput ${i}`, owner: lead.email })).id);
		}
		// Upload with no worker running, then time the backlog being drained.
		await stopWorker(worker);
		for (let i = 0; i < BATCH; i++) await uploadRevision(em(), lead, loops[i % loops.length], { bytes: model(offset + i + 1000) });
		const t0 = performance.now();
		const started = await Promise.all(Array.from({ length: workers }, () => startWorker(env)));
		const spawnMs = performance.now() - t0;
		for (;;) {
			const [{ n }] = await conn.execute<{ n: number }[]>(`select count(*)::int as n from revision where state in ('queued', 'computing')`);
			if (n === 0) break;
			await new Promise((r) => setTimeout(r, 20));
		}
		const seconds = (performance.now() - t0 - spawnMs) / 1000;
		await Promise.all(started.slice(1).map(stopWorker));
		worker = started[0];
		return BATCH / seconds;
	}
	const one = await throughput(1, 100_000);
	console.log(`one worker: ${one.toFixed(0)} revisions/s computed and judged (target ≥ 100)`);
	const two = await throughput(2, 200_000);
	console.log(`two workers: ${two.toFixed(0)} revisions/s (${(two / one).toFixed(2)}× one worker; target ≈ 2×, on this 2-core machine the database shares the cores)`);
	await stopWorker(worker);

	// 10,000 loops of one class, each with a computed report (copied in SQL), judged in one go.
	const [{ id: classId }] = await conn.execute<{ id: string }[]>(`select id from loop_class where key = 'speed'`);
	const [{ id: productId }] = await conn.execute<{ id: string }[]>(`select id from product where key = 'bench'`);
	await conn.execute(
		`insert into loop (id, product_id, loop_class_id, key, name, owner_id, tags, note, verdict)
		 select gen_random_uuid(), ?, ?, 'bulk-' || g, 'Bulk ' || g, ?, '{}', '', 'empty' from generate_series(1, ?) g`,
		[productId, classId, lead.id, CLASS_LOOPS]
	);
	await conn.execute(
		`with src as (select r.id, mr.result from revision r join margin_report mr on mr.revision_id = r.id where r.loop_id = ? limit 1),
		      rev as (insert into revision (id, loop_id, number, state, object_key, file_name, uploaded_by_id, sha256)
		              select gen_random_uuid(), l.id, 1, 'computed', 'bench/' || l.id, 'm.json', ?, md5(l.id::text) from loop l where l.key like 'bulk-%'
		              returning id)
		 insert into margin_report (revision_id, engine_version, result, compute_ms) select rev.id, 'bench', src.result, 0 from rev, src`,
		[loop.id, lead.id]
	);
	const ids = (await conn.execute<{ id: string }[]>('select id from loop where loop_class_id = ?', [classId])).map((r) => r.id);
	const t0 = performance.now();
	await em().transactional((tx) => judgeLoops(tx, ids, 'requirement'));
	const judgeS = (performance.now() - t0) / 1000;
	console.log(`re-judge a class of ${ids.length} loops: ${judgeS.toFixed(2)} s (target ≤ 5 s)`);
	await orm.close(true);
}

runBench('bench', root, main);
