/**
 * `npm run bench:jobs`: the revision pipeline against throwaway local services (its own
 * PostgreSQL cluster and S3 fake, removed afterwards). Prints figures and the targets next to
 * them; it never fails on timing.
 *   - upload → verdict visible: median and 95th percentile over sequential uploads
 *   - revisions computed and judged per second, with one worker process and with two
 *   - a new target version for a class of 10,000 loops: every loop judged again
 *   - where a revision's time goes: the compute path run in this process, phase by phase, in
 *     batches and one revision at a time, and the re-judge's phases
 * The machine may be shared, so each figure is also printed relative to a reference measured in
 * this process just before it (the bare engine's models per second and `select 1` round trips
 * per second): those ratios move less with the machine's load than the raw figures.
 */
import { resolve } from 'node:path';
import { pct, runBench, type BenchServices } from './lib/bench';
import {
	benchEnv,
	openBenchApp,
	speedLoopModel,
	startWorker as startWorkerIn,
	stopWorker,
	untilComputed
} from './lib/bench-app';

const root = resolve(import.meta.dirname, '..');
const UPLOADS = Number(process.env.BENCH_UPLOADS ?? 40);
const BATCH = Number(process.env.BENCH_BATCH ?? 600);
const CLASS_LOOPS = Number(process.env.BENCH_CLASS_LOOPS ?? 10_000);

const model = (i: number) => speedLoopModel(0.8 + i * 1e-6, 40);
const startWorker = (env: NodeJS.ProcessEnv) => startWorkerIn(root, env);

async function main(services: BenchServices) {
	const { pg, s3Port } = services;
	const env = benchEnv(services);
	const { orm, em, lead, conn, createProduct, createClass, createLoop, uploadRevision } =
		await openBenchApp(services.databaseUrl);

	// Imported after the environment is set: the server modules read it on first use.
	const { rejudgeClass } = await import('../src/lib/server/verdicts/rejudge');
	const { computeRevisions } = await import('../src/lib/server/revisions/compute');
	const { computeMargins, parseModelText } = await import('../src/lib/margins');

	await createProduct(em(), lead, { key: 'bench', name: 'Bench drive' });
	await createClass(em(), lead, {
		key: 'speed',
		name: 'Speed loop',
		targets: { minPhaseMarginDeg: '45', minUpperGainMarginDb: '6' }
	});
	const loop = await createLoop(em(), lead, {
		product: 'bench',
		class: 'speed',
		key: 'ax1-speed',
		name: 'Axis 1 speed',
		owner: lead.email
	});
	const verdictOf = async () =>
		(
			await conn.execute<{ judged_revision_id: string | null }[]>(
				'select judged_revision_id from loop where id = ?',
				[loop.id]
			)
		)[0].judged_revision_id;

	/** 20 loops of the speed class, keys `<prefix>-<i>`, to spread a backlog over. */
	async function speedLoops(prefix: string, name: string): Promise<string[]> {
		const ids: string[] = [];
		for (let i = 0; i < 20; i++) {
			const loop = await createLoop(em(), lead, {
				product: 'bench',
				class: 'speed',
				key: `${prefix}-${i}`,
				name: `${name} ${i}`,
				owner: lead.email
			});
			ids.push(loop.id);
		}
		return ids;
	}

	console.log(`\nHeadroom jobs benchmark (PostgreSQL ${pg.port}, S3 fake ${s3Port})\n`);

	/** The machine right now: the bare engine's rate and the database's round-trip rate. */
	async function reference() {
		const text = new TextDecoder().decode(model(7));
		let t0 = performance.now();
		let n = 0;
		while (performance.now() - t0 < 500) {
			const parsed = parseModelText(text, 'm.json');
			if (parsed.ok) computeMargins(parsed.model);
			n++;
		}
		const engine = n / ((performance.now() - t0) / 1000);
		t0 = performance.now();
		for (let i = 0; i < 200; i++) await conn.execute('select 1');
		const trips = 200 / ((performance.now() - t0) / 1000);
		console.log(
			`  reference now: engine ${engine.toFixed(0)} models/s in this process, ${trips.toFixed(0)} database round trips/s`
		);
		return { engine, trips };
	}
	const relative = (perSecond: number, ref: { engine: number }) =>
		`${((perSecond / ref.engine) * 100).toFixed(1)}% of the bare engine rate`;
	const printTimings = (title: string, t: Record<string, number>, count: number, unit: string) => {
		const total = Object.values(t).reduce((a, b) => a + b, 0);
		console.log(`  ${title}:`);
		for (const [phase, ms] of Object.entries(t))
			console.log(
				`    ${phase.padEnd(28)} ${(ms / count).toFixed(3).padStart(8)} ms/${unit}  ${((ms / total) * 100).toFixed(0).padStart(3)}%`
			);
	};
	let worker = await startWorker(env);
	const latencies: number[] = [];
	for (let i = 0; i < UPLOADS; i++) {
		const t0 = performance.now();
		const rev = await uploadRevision(em(), lead, loop.id, { bytes: model(i) });
		while ((await verdictOf()) !== rev.id) await new Promise((r) => setTimeout(r, 5));
		latencies.push(performance.now() - t0);
	}
	console.log(
		`upload → verdict visible (${UPLOADS} uploads): median ${pct(latencies, 0.5).toFixed(0)} ms (target ≤ 1000), p95 ${pct(latencies, 0.95).toFixed(0)} ms (target ≤ 2000)`
	);

	async function throughput(workers: number, offset: number): Promise<number> {
		const loops = await speedLoops(`t${offset}`, 'Throughput');
		// Upload with no worker running, then time the backlog being drained.
		await stopWorker(worker);
		for (let i = 0; i < BATCH; i++)
			await uploadRevision(em(), lead, loops[i % loops.length], {
				bytes: model(offset + i + 1000)
			});
		const t0 = performance.now();
		const started = await Promise.all(Array.from({ length: workers }, () => startWorker(env)));
		const spawnMs = performance.now() - t0;
		await untilComputed(conn, 20);
		const seconds = (performance.now() - t0 - spawnMs) / 1000;
		await Promise.all(started.slice(1).map(stopWorker));
		worker = started[0];
		return BATCH / seconds;
	}
	const ref1 = await reference();
	const one = await throughput(1, 100_000);
	console.log(
		`one worker: ${one.toFixed(0)} revisions/s computed and judged (target ≥ 100); ${relative(one, ref1)}`
	);
	const ref2 = await reference();
	const two = await throughput(2, 200_000);
	console.log(
		`two workers: ${two.toFixed(0)} revisions/s (${(two / one).toFixed(2)}× one worker; target ≈ 2×, on this 2-core machine the database shares the cores); ${relative(two, ref2)}`
	);
	await stopWorker(worker);

	// Where a revision's time goes: the worker's compute path in this process (no pg-boss), with
	// the worker's batch size and one revision at a time, on the same kind of backlog.
	const PROFILE = Number(process.env.BENCH_PROFILE ?? 200);
	async function profile(batch: number, offset: number) {
		const loops = await speedLoops(`p${offset}`, 'Profile');
		const ids: string[] = [];
		for (let i = 0; i < PROFILE; i++)
			ids.push(
				(await uploadRevision(em(), lead, loops[i % loops.length], { bytes: model(offset + i) })).id
			);
		const timings: Record<string, number> = {};
		const t0 = performance.now();
		for (let i = 0; i < ids.length; i += batch)
			await computeRevisions(em(), ids.slice(i, i + batch), timings);
		const rate = ids.length / ((performance.now() - t0) / 1000);
		return { rate, timings };
	}
	const refP = await reference();
	const batched = await profile(25, 300_000);
	const single = await profile(1, 400_000);
	console.log(
		`in-process compute path, ${PROFILE} revisions: batches of 25 ${batched.rate.toFixed(0)}/s (${relative(batched.rate, refP)}), one at a time ${single.rate.toFixed(0)}/s (${relative(single.rate, refP)}); batching ${(batched.rate / single.rate).toFixed(2)}×`
	);
	printTimings('batches of 25, per revision', batched.timings, PROFILE, 'rev');
	printTimings('one at a time, per revision', single.timings, PROFILE, 'rev');
	console.log(
		`  pg-boss fetch/complete and polling: the rest of one worker's time (${(1000 / one).toFixed(2)} ms/rev in the worker vs ${(1000 / batched.rate).toFixed(2)} ms/rev here)`
	);

	// 10,000 loops of one class, each with a computed report (copied in SQL), judged in one go.
	const [{ id: classId }] = await conn.execute<{ id: string }[]>(
		`select id from loop_class where key = 'speed'`
	);
	const [{ id: productId }] = await conn.execute<{ id: string }[]>(
		`select id from product where key = 'bench'`
	);
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
	const [{ n: classSize }] = await conn.execute<{ n: number }[]>(
		'select count(*)::int as n from loop where loop_class_id = ?',
		[classId]
	);
	// Judged once against the targets in force, then a tighter target version makes every loop
	// worse: the measured re-judge stores 10,000 changes and enqueues their mails, as in real life.
	const { setRequirement } = await import('../src/lib/server/registry/requirements');
	await rejudgeClass(em(), classId, 'requirement');
	await setRequirement(em(), lead, 'speed', {
		minPhaseMarginDeg: '89',
		minUpperGainMarginDb: '6',
		reason: 'bench: tighter phase margin'
	});
	const refJ = await reference();
	const judgeTimings: Record<string, number> = {};
	const t0 = performance.now();
	// The job's own function: every loop judged, changes stored, their mails enqueued, one transaction.
	const changed = await rejudgeClass(em(), classId, 'requirement', judgeTimings);
	const judgeS = (performance.now() - t0) / 1000;
	console.log(
		`re-judge a class of ${classSize} loops: ${judgeS.toFixed(2)} s (target ≤ 5 s; ${changed.length} verdicts changed, ${changed.filter((c) => c.worse).length} mails enqueued); ${(judgeS * refJ.engine).toFixed(0)} engine-model times`
	);
	printTimings('re-judge phases, per 1000 loops', judgeTimings, classSize / 1000, '1000');
	await orm.close(true);
}

runBench('bench', root, main);
