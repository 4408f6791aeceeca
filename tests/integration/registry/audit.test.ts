import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { basicScenario, setupRegistry, type Registry } from './support';
import { auditFacets, auditFiltersFrom, listAudit } from '../../../src/lib/server/registry/audit';
import { updateLoop } from '../../../src/lib/server/registry/loops';
import { domainError } from './errors';

let r: Registry;
let s: Awaited<ReturnType<typeof basicScenario>>;
beforeAll(async () => {
	r = await setupRegistry('reg_audit');
	s = await basicScenario(r);
	await updateLoop(r.em(), r.users.engineer, s.loop.id, { note: 'first note' });
});
afterAll(() => r?.close());
const paging = { page: 1, pageSize: 50 };

describe('audit trail', () => {
	it('cannot be edited, deleted or truncated, even by the table owner', async () => {
		const conn = r.em().getConnection();
		await expect(conn.execute(`update audit_event set action = 'nothing happened'`)).rejects.toThrow(/insert-only/);
		await expect(conn.execute(`delete from audit_event`)).rejects.toThrow(/insert-only/);
		await expect(conn.execute(`truncate audit_event`)).rejects.toThrow(/insert-only/);
		// Appending still works.
		await conn.execute(`insert into audit_event (action, entity_type, entity_id) values ('test.append', 'test', '1')`);
	});

	it('lists newest first and filters by actor, entity type, action and date', async () => {
		const all = await listAudit(r.em(), {}, paging);
		expect(all.items[0].action).toBe('test.append');
		expect(all.items[0].actor).toBeNull();
		const byEngineer = await listAudit(r.em(), { actor: r.users.engineer.email }, paging);
		expect(byEngineer.items.map((e) => e.action)).toEqual(['loop.update', 'loop.create']);
		const system = await listAudit(r.em(), { actor: 'system' }, paging);
		expect(system.items.map((e) => e.action)).toEqual(['test.append']);
		const loops = await listAudit(r.em(), { entityType: 'loop', action: 'loop.update' }, paging);
		expect(loops.total).toBe(1);
		expect(loops.items[0]).toMatchObject({ entityId: s.loop.id, before: { note: '' }, after: { note: 'first note' } });
		const today = new Date().toISOString().slice(0, 10);
		const filters = auditFiltersFrom(new URLSearchParams({ from: today, to: today }));
		expect((await listAudit(r.em(), filters, paging)).total).toBe(all.total);
		const future = auditFiltersFrom(new URLSearchParams({ from: '2999-01-01' }));
		expect((await listAudit(r.em(), future, paging)).total).toBe(0);
		const paged = await listAudit(r.em(), {}, { page: 2, pageSize: 2 });
		expect(paged.items.map((e) => e.id)).toEqual(all.items.slice(2, 4).map((e) => e.id));
	});

	it('rejects a date it cannot read, naming the parameter', async () => {
		const e = await domainError(Promise.resolve().then(() => auditFiltersFrom(new URLSearchParams({ to: 'yesterday' }))));
		expect([e.code, e.path]).toEqual(['invalid', 'to']);
	});

	it('offers the actors, entity types and actions present as filter values', async () => {
		const facets = await auditFacets(r.em());
		expect(facets.entityTypes).toEqual(expect.arrayContaining(['loop', 'loop_class', 'product', 'requirement', 'test']));
		expect(facets.actions).toContain('requirement.create');
		expect(facets.actors.map((a) => a.email).sort()).toEqual([r.users.engineer.email, r.users.lead.email].sort());
	});
});
