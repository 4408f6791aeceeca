/**
 * The registry bench:web measures: seeded straight into the tables (then judged by the real
 * judge), so 10,000 loops and 100,000 revisions take seconds rather than the upload path's hours.
 */
import { createBenchLead } from './bench-app';
import { pct } from './bench';
import { mulberry32 } from './loop-generator';
import { syntheticResult } from './synthetic-margins';
import { parentOf } from './cpu-share';

export interface SeedOptions {
	loops: number;
	perLoop: number;
	password: string;
	/** [name, path] of each filter mix, whose SQL is timed alone. */
	mixes: [string, string][];
}

const ms = (v: number) => `${v.toFixed(1)} ms`;

/** 500 distinct worst cases, spread like a real product line: most pass, some short, a few unstable. */
function templates(n = 500) {
	const rand = mulberry32(20261202);
	return Array.from({ length: n }, (_, i) =>
		syntheticResult({
			phaseMarginDeg: 28 + rand() * 45,
			upperGainMarginDb: rand() < 0.05 ? null : 3 + rand() * 14,
			delayMarginSeconds: 0.0004 + rand() * 0.008,
			modulusMargin: 0.35 + rand() * 0.45,
			crossoverHz: 20 + rand() * 1500,
			stable: rand() > 0.03,
			caseName: ['nominal', 'cold', 'hot', 'worn'][i % 4]
		})
	);
}

/**
 * Seeds the bench's registry: LOOPS loops over 8 products, 6 classes and 24 owners, PER_LOOP
 * computed revisions each with a margin report, some deviations; judges every loop; prints the
 * SQL time of each mix alone. Returns the read token, the lead's e-mail and PostgreSQL's
 * postmaster pid (for CPU accounting).
 */
export async function seedBenchRegistry(
	env: NodeJS.ProcessEnv,
	{ loops: LOOPS, perLoop: PER_LOOP, password: PASSWORD, mixes }: SeedOptions
) {
	const { MikroORM } = await import('@mikro-orm/postgresql');
	const { ormOptions } = await import('../../src/lib/server/db/options');
	const { hashPassword } = await import('../../src/lib/server/auth/passwords');
	const { createToken } = await import('../../src/lib/server/auth/tokens');
	const { createProduct } = await import('../../src/lib/server/registry/products');
	const { createClass } = await import('../../src/lib/server/registry/classes');
	const { judgeLoops } = await import('../../src/lib/server/verdicts/judge-loops');

	const orm = await MikroORM.init(ormOptions(env.DATABASE_URL!));
	const em = () => orm.em.fork();
	const lead = await createBenchLead(em(), await hashPassword(PASSWORD));
	const { value: token } = await createToken(em(), lead, { name: 'bench', scopes: ['read'] });
	const products = ['s2', 'sp7', 'af40', 'm1', 'h3', 'k9', 'r5', 'x2'].map((k) => `tarn-${k}`);
	for (const key of products)
		await createProduct(em(), lead, { key, name: `Tarn ${key.slice(5).toUpperCase()}` });
	const classes: [string, string, Record<string, string>][] = [
		[
			'current',
			'Current loop',
			{ minUpperGainMarginDb: '8', minPhaseMarginDeg: '50', minModulusMargin: '0.5' }
		],
		[
			'speed',
			'Speed loop',
			{ minUpperGainMarginDb: '6', minPhaseMarginDeg: '45', maxPeakSensitivity: '2' }
		],
		[
			'position',
			'Position loop',
			{ minUpperGainMarginDb: '6', minPhaseMarginDeg: '50', minDelayMarginSeconds: '0.004' }
		],
		['dc-link', 'DC-link voltage loop', { minUpperGainMarginDb: '6', minPhaseMarginDeg: '45' }],
		[
			'pll',
			'Grid PLL',
			{ minUpperGainMarginDb: '6', minPhaseMarginDeg: '45', minModulusMargin: '0.45' }
		],
		['thermal', 'Temperature loop', { minUpperGainMarginDb: '4.6', minPhaseMarginDeg: '30' }]
	];
	for (const [key, name, targets] of classes) await createClass(em(), lead, { key, name, targets });
	const conn = em().getConnection();
	const t0 = performance.now();
	await conn.execute(
		`insert into app_user (email, name, role, active, created_at)
		 select 'engineer' || lpad(g::text, 2, '0') || '@bench.test', 'Engineer ' || lpad(g::text, 2, '0'), 'engineer', true, now()
		 from generate_series(1, 24) g`
	);
	// Loops spread over products, classes and owners; keys like tarn-s2/ax0042-speed.
	await conn.execute(
		`with p as (select id, row_number() over (order by key) - 1 as i from product),
		      c as (select id, key, row_number() over (order by key) - 1 as i from loop_class),
		      o as (select id, row_number() over (order by email) - 1 as i from app_user where email like 'engineer%')
		 insert into loop (id, product_id, loop_class_id, key, name, owner_id, tags, note, verdict, created_at, updated_at)
		 select gen_random_uuid(), p.id, c.id, 'ax' || lpad(g::text, 5, '0') || '-' || c.key, 'Axis ' || g || ' ' || c.key || ' loop', o.id,
		        array['axis-' || (g % 4), case when g % 3 = 0 then 'rig-b' else 'field' end], '', 'empty',
		        now() - interval '200 days', now() - (g % 180) * interval '1 day'
		 from generate_series(1, ?) g
		 join p on p.i = g % 8 join c on c.i = (g / 8) % 6 join o on o.i = g % 24`,
		[LOOPS]
	);
	await conn.execute('create table bench_template (i int primary key, result jsonb not null)');
	await conn.execute(
		`insert into bench_template select (e->>'i')::int, e->'r' from jsonb_array_elements(?::jsonb) e`,
		[JSON.stringify(templates().map((r, i) => ({ i, r })))]
	);
	// PER_LOOP computed revisions per loop, about nine days apart, each with its margin report.
	await conn.execute(
		`insert into revision (id, loop_id, number, state, object_key, file_name, size_bytes, sha256, uploaded_by_id, uploaded_at, computed_at)
		 select gen_random_uuid(), l.id, n, 'computed', 'bench/' || l.id || '/' || n, 'model.json', 2000, md5(l.id::text || n), l.owner_id,
		        now() - (? - n) * interval '9 days' - (abs(hashtext(l.id::text)) % 86400) * interval '1 second',
		        now() - (? - n) * interval '9 days'
		 from loop l cross join generate_series(1, ?) n`,
		[PER_LOOP, PER_LOOP, PER_LOOP]
	);
	await conn.execute(
		`insert into margin_report (revision_id, engine_version, result, compute_ms)
		 select r.id, 'bench', t.result, 3 from revision r join bench_template t on t.i = abs(hashtext(r.id::text)) % 500`
	);
	await conn.execute('drop table bench_template');
	// A few hundred active phase-margin deviations, so some loops are covered.
	await conn.execute(
		`insert into deviation (loop_id, criteria, min_phase_margin_deg, reason, approved_by_id, starts_at, expires_at)
		 select id, array['phaseMargin'], 25, 'Bench: field trial with the soft gain set.', ?, now() - interval '10 days', now() + interval '60 days'
		 from loop where abs(hashtext(id::text)) % 25 = 0`,
		[lead.id]
	);
	const seeded = performance.now() - t0;
	const ids = (await conn.execute<{ id: string }[]>('select id from loop')).map((r) => r.id);
	const t1 = performance.now();
	await em().transactional((tx) => judgeLoops(tx, ids, 'reconcile'));
	const judged = performance.now() - t1;
	// Verdicts that changed over the last quarter, for `changedSince`.
	await conn.execute(
		`update loop set verdict_changed_at = now() - (abs(hashtext(id::text || 'v')) % 90) * interval '1 day'`
	);
	await conn.execute('vacuum analyze');
	const [counts] = await conn.execute<{ revisions: number; verdicts: string }[]>(
		`select (select count(*)::int from revision) as revisions,
		        (select string_agg(verdict || ' ' || n, ', ' order by n desc) from (select verdict, count(*) n from loop group by verdict) v) as verdicts`
	);
	console.log(
		`seeded ${ids.length} loops, ${counts.revisions} revisions in ${(seeded / 1000).toFixed(1)} s; judged in ${(judged / 1000).toFixed(1)} s (${counts.verdicts})`
	);
	// The database's own share of each mix, without HTTP, auth or contention from the load.
	const { listQuery, loopFiltersFrom } = await import('../../src/lib/server/registry/loops');
	const { pagingFrom, offsetOf } = await import('../../src/lib/server/registry/common');
	console.log('\nSQL of each mix alone (EXPLAIN ANALYZE execution time, median of 5):');
	for (const [name, path] of mixes) {
		const params = new URL(path, 'http://x').searchParams;
		const paging = pagingFrom(params);
		const q = listQuery(loopFiltersFrom(params), paging.pageSize, offsetOf(paging));
		const times: number[] = [];
		for (let i = 0; i < 5; i++) {
			const [row] = await conn.execute<{ 'QUERY PLAN': [{ 'Execution Time': number }] }[]>(
				`explain (analyze, format json) ${q.sql}`,
				q.params
			);
			times.push(row['QUERY PLAN'][0]['Execution Time']);
		}
		console.log(`  ${name.padEnd(38)} ${ms(pct(times, 0.5))}`);
	}
	const [{ pid }] = await conn.execute<{ pid: number }[]>('select pg_backend_pid() as pid');
	const postmaster = parentOf(pid);
	await orm.close(true);
	return { token, email: lead.email, postmaster };
}
