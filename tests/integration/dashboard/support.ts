/**
 * A small judged registry for the dashboard's list, counts and export: two products, two
 * classes with targets, loops whose synthetic worst cases pass, fall short on one criterion,
 * are covered by a deviation, are unstable, have no revision or are archived. Revisions are
 * written straight into the tables (as the compute job would leave them) and then judged by the
 * real set-based judge, so the cached columns are the ones production fills.
 */
import { setupRegistry, type Registry } from '../registry/support';
import { createProduct } from '../../../src/lib/server/registry/products';
import { createClass } from '../../../src/lib/server/registry/classes';
import { createLoop, updateLoop } from '../../../src/lib/server/registry/loops';
import { grantDeviation } from '../../../src/lib/server/registry/deviations';
import { judgeLoops } from '../../../src/lib/server/verdicts/judge-loops';
import { syntheticResult, type SyntheticFigures } from '../../../scripts/lib/synthetic-margins';

export const OLD = '2026-01-01T00:00:00.000Z';

export async function addComputedRevision(r: Registry, loopId: string, figures: SyntheticFigures, uploadedAt = OLD) {
	const conn = r.em().getConnection();
	const [{ n }] = await conn.execute<{ n: number }[]>('select count(*)::int as n from revision where loop_id = ?', [loopId]);
	const id = crypto.randomUUID();
	await conn.execute(
		`insert into revision (id, loop_id, number, state, object_key, file_name, uploaded_by_id, sha256, uploaded_at, computed_at)
		 values (?, ?, ?, 'computed', ?, 'model.json', ?, md5(?), ?, ?)`,
		[id, loopId, n + 1, `test/${id}`, r.users.lead.id, id, uploadedAt, uploadedAt]
	);
	await conn.execute(`insert into margin_report (revision_id, engine_version, result, compute_ms) values (?, 'synthetic', ?::jsonb, 0)`, [
		id,
		JSON.stringify(syntheticResult(figures))
	]);
	return id;
}

const good = { phaseMarginDeg: 60, upperGainMarginDb: 10, delayMarginSeconds: 0.005, modulusMargin: 0.7 };

export async function dashboardScenario(prefix: string) {
	const r = await setupRegistry(prefix);
	const lead = r.users.lead;
	await createProduct(r.em(), lead, { key: 'drive', name: 'Drive' });
	await createProduct(r.em(), lead, { key: 'stage', name: 'Stage' });
	await createClass(r.em(), lead, {
		key: 'speed',
		name: 'Speed loop',
		targets: { minPhaseMarginDeg: '45', minUpperGainMarginDb: '6', minDelayMarginSeconds: '0.002', minModulusMargin: '0.5' }
	});
	await createClass(r.em(), lead, { key: 'current', name: 'Current loop', targets: { minPhaseMarginDeg: '50', minUpperGainMarginDb: '8' } });
	const make = (product: string, cls: string, key: string, name: string, owner = r.users.engineer.email, tags: string[] = []) =>
		createLoop(r.em(), lead, { product, class: cls, key, name, owner, tags });
	const loops = {
		ok: await make('drive', 'speed', 'a-ok', 'Axis A speed'),
		pm: await make('drive', 'speed', 'b-pm', 'Axis B speed 100%'),
		gm: await make('drive', 'current', 'c-gm', 'Axis C current', r.users.engineer2.email, ['rig-b']),
		unstable: await make('stage', 'speed', 'd-unstable', 'Stage D speed'),
		empty: await make('stage', 'current', 'e-empty', '=SUM(1) current'),
		covered: await make('stage', 'speed', 'f-covered', 'Stage F speed', r.users.engineer2.email, ['rig-b']),
		archived: await make('drive', 'speed', 'g-archived', 'Old G speed')
	};
	await addComputedRevision(r, loops.ok.id, good);
	await addComputedRevision(r, loops.pm.id, good);
	await addComputedRevision(r, loops.pm.id, { ...good, phaseMarginDeg: 40 }, '2026-06-01T00:00:00.000Z');
	await addComputedRevision(r, loops.gm.id, { ...good, upperGainMarginDb: 4, phaseMarginDeg: 55 });
	await addComputedRevision(r, loops.unstable.id, { ...good, stable: false });
	await addComputedRevision(r, loops.covered.id, { ...good, phaseMarginDeg: 42, modulusMargin: 0.55 });
	await addComputedRevision(r, loops.archived.id, good);
	await grantDeviation(r.em(), lead, loops.covered.id, {
		criteria: ['phaseMargin'],
		relaxed: { minPhaseMarginDeg: '40' },
		reason: 'Field trial with the softer gain set.',
		expiresAt: new Date(Date.now() + 30 * 86_400_000).toISOString()
	});
	await updateLoop(r.em(), lead, loops.archived.id, { archived: true });
	await r.em().transactional((tx) => judgeLoops(tx, Object.values(loops).map((l) => l.id), 'revision'));
	// Known moments for `changedSince`: every verdict changed long ago except c-gm's.
	const conn = r.em().getConnection();
	await conn.execute(`update loop set verdict_changed_at = ?`, [OLD]);
	await conn.execute(`update loop set verdict_changed_at = '2026-07-01T00:00:00Z' where id = ?`, [loops.gm.id]);
	return { r, loops };
}
