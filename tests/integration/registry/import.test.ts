import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { basicScenario, setupRegistry, type Registry } from './support';
import { domainError } from './errors';
import { commitImport, previewImport } from '../../../src/lib/server/registry/loop-import';
import { listLoops } from '../../../src/lib/server/registry/loops';

let r: Registry;
beforeAll(async () => {
	r = await setupRegistry('reg_import');
	await basicScenario(r); // product drive, class speed, loop drive/ax1-speed
});
afterAll(() => r?.close());

const header = 'product,class,key,name,owner,tags,note';

describe('CSV import', () => {
	it('previews every row with its own errors, naming line and field', async () => {
		const csv = [
			header,
			'drive,speed,ax2-speed,Axis 2 speed,engineer@registry.test,axis-2; rig-b,"tuned, on rig ""B"""',
			'nope,speed,ax3-speed,Axis 3 speed,,,',
			'drive,speed,Bad Key,Axis 4,,,',
			'drive,speed,ax1-speed,Duplicate of an existing loop,,,',
			'drive,speed,ax2-speed,Duplicate within the file,,,',
			'drive,speed,ax5-speed,Unknown owner,ghost@registry.test,,',
			'drive,speed,ax6-speed,Too few fields'
		].join('\r\n');
		const p = await previewImport(r.em(), r.users.lead, csv);
		expect([p.valid, p.invalid]).toEqual([1, 6]);
		const byLine = Object.fromEntries(p.rows.map((row) => [row.line, row]));
		expect(byLine[2]).toMatchObject({ errors: [], tags: ['axis-2', 'rig-b'], note: 'tuned, on rig "B"' });
		expect(byLine[3].errors).toEqual([{ field: 'product', message: 'No product nope.' }]);
		expect(byLine[4].errors.map((e) => e.field)).toEqual(['key']);
		expect(byLine[5].errors[0].message).toMatch(/already has a loop ax1-speed/);
		expect(byLine[6].errors[0].message).toMatch(/Same product and key as line 2/);
		expect(byLine[7].errors).toEqual([{ field: 'owner', message: 'No active user ghost@registry.test.' }]);
		expect(byLine[8].errors[0].field).toBe('line');
	});

	it('refuses a file with any bad row whole: nothing is written', async () => {
		const before = (await listLoops(r.em(), {}, { page: 1, pageSize: 50 })).total;
		const e = await domainError(commitImport(r.em(), r.users.lead, `${header}\ndrive,speed,ok-1,Fine,,,\nnope,speed,ok-2,Bad,,,`));
		expect(e.message).toMatch(/^Line 3: No product nope/);
		expect((await listLoops(r.em(), {}, { page: 1, pageSize: 50 })).total).toBe(before);
	});

	it('writes every row of a clean file, each with its audit row', async () => {
		const csv = `${header}\ndrive,speed,cur-d,Current d,engineer@registry.test,,\ndrive,speed,cur-q,Current q,engineer2@registry.test,phase-a,`;
		expect(await commitImport(r.em(), r.users.lead, csv)).toEqual({ created: 2 });
		const loops = await listLoops(r.em(), { q: 'cur-' }, { page: 1, pageSize: 50 });
		expect(loops.items.map((l) => [l.key, l.owner.email])).toEqual([
			['cur-d', 'engineer@registry.test'],
			['cur-q', 'engineer2@registry.test']
		]);
		const audit = await r.em().getConnection().execute<{ n: number }[]>(
			`select count(*)::int as n from audit_event where action = 'loop.create' and after->>'via' = 'csv import'`
		);
		expect(audit[0].n).toBe(2);
	});

	it('lets engineers import only loops they own, and viewers nothing', async () => {
		const csv = `${header}\ndrive,speed,e-1,Mine,,,\ndrive,speed,e-2,Theirs,engineer2@registry.test,,`;
		const p = await previewImport(r.em(), r.users.engineer, csv);
		expect(p.rows[0].errors).toEqual([]);
		expect(p.rows[1].errors[0].field).toBe('owner');
		expect((await domainError(previewImport(r.em(), r.users.viewer, csv))).code).toBe('forbidden');
	});

	it('names what is wrong with the file itself', async () => {
		const cases: [string, RegExp][] = [
			['', /empty/],
			[header, /no loops/],
			['product,class,key\ndrive,speed,x', /Missing column name/],
			['product,class,key,name,colour\na,b,c,d,e', /Unknown column colour/],
			[`${header}\ndrive,speed,x,"never closed`, /Line 2: A quoted field is never closed/]
		];
		for (const [csv, message] of cases) {
			const e = await domainError(previewImport(r.em(), r.users.lead, csv));
			expect([e.code, e.path]).toEqual(['invalid', 'file']);
			expect(e.message).toMatch(message);
		}
		const big = `${header}\n` + 'drive,speed,k,n,,,\n'.repeat(2001);
		expect((await domainError(previewImport(r.em(), r.users.lead, big))).code).toBe('too_large');
	});
});
