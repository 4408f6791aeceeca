import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { auditRows, basicScenario, setupRegistry, type Registry } from './support';
import { domainError } from './errors';
import { createProduct, listProducts } from '../../../src/lib/server/registry/products';
import { createClass, updateClass } from '../../../src/lib/server/registry/classes';
import { createLoop, getLoop, listLoops, updateLoop } from '../../../src/lib/server/registry/loops';
import { existsSync, readFileSync } from 'node:fs';

let r: Registry;
let s: Awaited<ReturnType<typeof basicScenario>>;
beforeAll(async () => {
	r = await setupRegistry('reg_loops');
	s = await basicScenario(r);
});
afterAll(() => r?.close());
const paging = { page: 1, pageSize: 50 };

describe('products and classes', () => {
	it('need a lead; keys are unique and well-formed', async () => {
		expect((await domainError(createProduct(r.em(), r.users.engineer, { key: 'x', name: 'X' }))).code).toBe('forbidden');
		const dup = await domainError(createProduct(r.em(), r.users.lead, { key: 'drive', name: 'Again' }));
		expect([dup.code, dup.path]).toEqual(['conflict', 'key']);
		const bad = await domainError(createProduct(r.em(), r.users.lead, { key: 'Has Space', name: 'X' }));
		expect([bad.code, bad.path]).toEqual(['invalid', 'key']);
		expect((await domainError(createClass(r.em(), r.users.engineer, { key: 'pll', name: 'PLL' }))).code).toBe('forbidden');
		await expect(
			r.em().getConnection().execute(`insert into product (key, name) values ('Bad Key', 'x')`)
		).rejects.toThrow(/product_key_format/);
	});

	it('list with loop counts and audit their creation', async () => {
		const page = await listProducts(r.em(), paging);
		expect(page.items.find((p) => p.key === 'drive')!.loopCount).toBe(1);
		expect((await auditRows(r, 'product', s.product.id)).map((a) => a.action)).toEqual(['product.create']);
		expect((await auditRows(r, 'loop_class', s.loopClass.id)).map((a) => a.action)).toEqual(['loop_class.create']);
	});

	it('name only leads as class leads; edits are audited with before and after', async () => {
		const e = await domainError(updateClass(r.em(), r.users.lead, s.loopClass.key, { name: 'x', lead: r.users.engineer.email }));
		expect([e.code, e.path]).toEqual(['invalid', 'lead']);
		const c = await updateClass(r.em(), r.users.lead, s.loopClass.key, { name: 'Speed loop', lead: r.users.lead.email, openUploads: true });
		expect(c.lead?.email).toBe(r.users.lead.email);
		expect(c.openUploads).toBe(true);
		const rows = await auditRows(r, 'loop_class', s.loopClass.id);
		expect(rows.at(-1)).toMatchObject({ action: 'loop_class.update', before: { openUploads: false }, after: { openUploads: true } });
	});
});

describe('loops', () => {
	it('are created by engineers for themselves, by leads for anyone, never by viewers', async () => {
		const input = { product: 'drive', class: 'speed', key: 'ax2-speed', name: 'Axis 2 speed' };
		expect((await domainError(createLoop(r.em(), r.users.viewer, input))).code).toBe('forbidden');
		expect((await domainError(createLoop(r.em(), r.users.engineer, { ...input, owner: r.users.engineer2.email }))).code).toBe('forbidden');
		const viewerOwner = await domainError(createLoop(r.em(), r.users.lead, { ...input, owner: r.users.viewer.email }));
		expect([viewerOwner.code, viewerOwner.path]).toEqual(['invalid', 'owner']);
		const byLead = await createLoop(r.em(), r.users.lead, { ...input, owner: r.users.engineer2.email });
		expect(byLead).toMatchObject({ key: 'ax2-speed', owner: { email: r.users.engineer2.email }, verdict: 'empty', product: { key: 'drive' }, class: { key: 'speed' } });
		const rows = await auditRows(r, 'loop', byLead.id);
		expect(rows).toHaveLength(1);
		expect(rows[0]).toMatchObject({ action: 'loop.create', actor_id: r.users.lead.id, before: null, after: { key: 'ax2-speed' } });
	});

	it('have keys unique per product, naming the field; unknown product or class is a 400 on that field', async () => {
		const dup = await domainError(createLoop(r.em(), r.users.engineer, { product: 'drive', class: 'speed', key: 'ax1-speed', name: 'x' }));
		expect([dup.code, dup.path]).toEqual(['conflict', 'key']);
		const noProduct = await domainError(createLoop(r.em(), r.users.engineer, { product: 'nope', class: 'speed', key: 'k', name: 'x' }));
		expect([noProduct.code, noProduct.path]).toEqual(['invalid', 'product']);
		const noClass = await domainError(createLoop(r.em(), r.users.engineer, { product: 'drive', class: 'nope', key: 'k', name: 'x' }));
		expect(noClass.path).toBe('class');
		await createProduct(r.em(), r.users.lead, { key: 'other', name: 'Other' });
		// The same key on another product is a different loop.
		await createLoop(r.em(), r.users.engineer, { product: 'other', class: 'speed', key: 'ax1-speed', name: 'x' });
	});

	it('are edited by their owner or a lead, not by another engineer or a viewer', async () => {
		const id = s.loop.id;
		expect((await domainError(updateLoop(r.em(), r.users.engineer2, id, { name: 'mine now' }))).code).toBe('forbidden');
		expect((await domainError(updateLoop(r.em(), r.users.viewer, id, { name: 'x' }))).code).toBe('forbidden');
		const byOwner = await updateLoop(r.em(), r.users.engineer, id, { name: 'Axis 1 speed loop', tags: ['axis-1', 'rig-b', 'rig-b'], note: 'tuned on rig B' });
		expect(byOwner).toMatchObject({ name: 'Axis 1 speed loop', tags: ['axis-1', 'rig-b'], note: 'tuned on rig B' });
		const owner = await domainError(updateLoop(r.em(), r.users.engineer, id, { owner: r.users.engineer2.email }));
		expect(owner.code).toBe('forbidden');
		const byLead = await updateLoop(r.em(), r.users.lead, id, { owner: r.users.engineer2.email });
		expect(byLead.owner.email).toBe(r.users.engineer2.email);
		await updateLoop(r.em(), r.users.admin, id, { owner: r.users.engineer.email });
		const rows = await auditRows(r, 'loop', id);
		expect(rows.map((a) => a.action)).toEqual(['loop.create', 'loop.update', 'loop.update', 'loop.update']);
		expect(rows[1]).toMatchObject({ before: { name: 'Axis 1 speed' }, after: { name: 'Axis 1 speed loop', note: 'tuned on rig B' } });
	});

	it('refuse unknown fields and bad tags with the field named', async () => {
		const unknown = await domainError(updateLoop(r.em(), r.users.lead, s.loop.id, { colour: 'red' }));
		expect([unknown.code, unknown.path]).toEqual(['invalid', 'colour']);
		const tag = await domainError(updateLoop(r.em(), r.users.lead, s.loop.id, { tags: ['ok', '!!'] }));
		expect(tag.path).toBe('tags.1');
	});

	it('are archived and restored, never deleted; archived loops refuse edits and leave the default list', async () => {
		const archived = await updateLoop(r.em(), r.users.engineer, s.loop.id, { archived: true });
		expect(archived.archivedAt).not.toBeNull();
		expect((await domainError(updateLoop(r.em(), r.users.engineer, s.loop.id, { name: 'x' }))).code).toBe('conflict');
		const active = await listLoops(r.em(), {}, paging);
		expect(active.items.map((l) => l.id)).not.toContain(s.loop.id);
		const all = await listLoops(r.em(), { archived: 'archived' }, paging);
		expect(all.items.map((l) => l.id)).toEqual([s.loop.id]);
		const restored = await updateLoop(r.em(), r.users.engineer, s.loop.id, { archived: false });
		expect(restored.archivedAt).toBeNull();
		const actions = (await auditRows(r, 'loop', s.loop.id)).map((a) => a.action);
		expect(actions.slice(-2)).toEqual(['loop.archive', 'loop.restore']);
		// No route deletes a loop.
		const route = readFileSync('src/routes/api/loops/[id]/+server.ts', 'utf8');
		expect(route).not.toMatch(/export const DELETE/);
		expect(existsSync('src/routes/api/loops/[id]/+server.ts')).toBe(true);
		await expect(r.em().getConnection().execute(`delete from product where id = ?`, [s.product.id])).rejects.toThrow(/foreign key/);
	});

	it('list with filters, sorting and paging, and a total', async () => {
		for (let i = 0; i < 5; i++) {
			await createLoop(r.em(), r.users.lead, { product: 'drive', class: 'speed', key: `bulk-${i}`, name: `Bulk ${i}`, owner: r.users.engineer2.email, tags: i % 2 ? ['odd'] : [] });
		}
		const page1 = await listLoops(r.em(), { product: 'drive', sort: 'key', dir: 'desc' }, { page: 1, pageSize: 3 });
		const page2 = await listLoops(r.em(), { product: 'drive', sort: 'key', dir: 'desc' }, { page: 2, pageSize: 3 });
		expect(page1.total).toBe(7);
		expect(page1.items).toHaveLength(3);
		const keys = [...page1.items, ...page2.items].map((l) => l.key);
		expect(keys).toEqual([...keys].sort().reverse());
		expect(new Set(keys).size).toBe(6);
		expect((await listLoops(r.em(), { tag: 'odd' }, paging)).total).toBe(2);
		expect((await listLoops(r.em(), { q: 'BULK 3' }, paging)).items.map((l) => l.key)).toEqual(['bulk-3']);
		expect((await listLoops(r.em(), { owner: r.users.engineer2.email }, paging)).total).toBe(6);
		expect((await listLoops(r.em(), { verdict: 'compliant' }, paging)).total).toBe(0);
		expect((await listLoops(r.em(), { q: '100%_' }, paging)).total).toBe(0);
		const one = await getLoop(r.em(), page1.items[0].id);
		expect(Object.keys(one)).toEqual(expect.arrayContaining(['id', 'key', 'name', 'product', 'class', 'owner', 'verdict']));
		expect((await domainError(getLoop(r.em(), 'not-a-uuid'))).code).toBe('not_found');
	});

	it('keep the verdict to the list the compliance rules define', async () => {
		await expect(
			r.em().getConnection().execute(`update loop set verdict = 'great' where id = ?`, [s.loop.id])
		).rejects.toThrow(/check constraint/);
	});
});
