/**
 * Stored markup and paths in user input, on the built app: product, class and loop names, loop
 * notes, revision file names and notes, and deviation reasons carrying HTML render as text in
 * every page that shows them and in the verdict e-mail (its HTML part); file names with path
 * parts never reach an object key or a file path. (The PDF report is checked by the reports suite.)
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BUILD_TIMEOUT_MS, startBuiltApp, type BuiltApp } from '../support/built-app';
import { waitForMessage } from '../support/mail';
import { HttpClient } from '../support/http-client';
import { apiUpload, boxedFetch, demoSessions, startWorker, trustAppEnv, until, type WorkerProcess } from './support';

let app: BuiltApp;
let worker: WorkerProcess;
let engineer: HttpClient;
const run = Math.random().toString(36).slice(2, 8);
/** Each payload carries its field's name, so a leak says where it came from. */
const payload = (field: string) => `<img src=x onerror=alert('${field}')><script>alert('${field}')</script>"'&`;
const RAW = /<img src=x onerror|<script>alert/;
const FILE_NAME = `<img src=x onerror=alert('file name')>.json`;
const keys = { product: `xss-p-${run}`, class: `xss-c-${run}`, loop: `xss-l-${run}` };
let loopId = '';

const sql = <T>(q: string, p: unknown[] = []) => app.orm.em.getConnection().execute<T[]>(q, p);
async function postJson(path: string, token: string, body: unknown) {
	const r = await boxedFetch(`${app.url}${path}`, {
		method: 'POST',
		headers: { authorization: `Bearer ${token}`, 'content-type': 'application/json', accept: 'application/json' },
		body: JSON.stringify(body)
	});
	if (r.status >= 300) throw new Error(`${path}: HTTP ${r.status} ${r.body}`);
	return JSON.parse(r.body);
}

const w = 2 * Math.PI * 50;
const plant = (k: number) => JSON.stringify({ format: 'headroom-loop-model/1', blocks: [{ type: 'factored', zeros: [], poles: [-w, -2 * w, -3 * w], gain: k * w ** 3 }] });

beforeAll(async () => {
	app = await startBuiltApp({ prefix: 'trust_xss', seed: true, env: trustAppEnv });
	worker = await startWorker(app.db.url, { ORIGIN: app.url });
	engineer = (await demoSessions(app.url)).engineer;
	await postJson('/api/products', 'hr_demo_lead', { key: keys.product, name: payload('product name') });
	await postJson('/api/classes', 'hr_demo_lead', {
		key: keys.class,
		name: payload('class name'),
		description: payload('class description'),
		lead: 'lead@headroom.test',
		targets: { minPhaseMarginDeg: '45', minUpperGainMarginDb: '6', reason: payload('requirement reason') }
	});
	const loop = await postJson('/api/loops', 'hr_demo_engineer', {
		product: keys.product,
		class: keys.class,
		key: keys.loop,
		name: payload('loop name'),
		note: payload('loop note')
	});
	loopId = loop.id ?? loop.loop?.id;
	const settle = async (id: string) =>
		until(`revision ${id}`, async () => {
			const [r] = await sql<{ state: string }>('select state from revision where id = ?', [id]);
			return r.state === 'computed' || r.state === 'rejected' ? r.state : undefined;
		}, 60_000, () => worker.log());
	const first = await apiUpload(app.url, loopId, 'hr_demo_engineer', plant(8), FILE_NAME, payload('revision note'));
	expect(first.status, first.body).toBe(202);
	expect(await settle(first.json.revision!.id)).toBe('computed');
	// Worse: the owner and the class lead are mailed, the loop's name in the message.
	const second = await apiUpload(app.url, loopId, 'hr_demo_engineer', plant(24), '../../../../etc/passwd', payload('second note'));
	expect(second.status, second.body).toBe(202);
	expect(await settle(second.json.revision!.id)).toBe('computed');
	await postJson(`/api/loops/${loopId}/deviations`, 'hr_demo_lead', {
		criteria: ['phaseMargin'],
		relaxed: { minPhaseMarginDeg: '30' },
		reason: payload('deviation reason'),
		expiresAt: new Date(Date.now() + 30 * 86_400_000).toISOString()
	});
}, BUILD_TIMEOUT_MS);

afterAll(async () => {
	await worker?.stop();
	await app?.stop();
});

describe('stored markup renders as text', () => {
	it.each(['/loops/{id}', '/loops/{id}/history', `/?q=${'xss-l'}`, '/products', '/classes', `/classes/{class}`, '/audit', '/'])('in the page %s', async (template) => {
		const path = template.replace('{id}', loopId).replace('{class}', keys.class);
		const response = await engineer.request(path);
		expect(response.status).toBe(200);
		const html = await response.text();
		const leak = RAW.exec(html);
		expect(leak ? html.slice(Math.max(0, leak.index - 200), leak.index + 100) : null).toBeNull();
	});

	it('shows the text itself, escaped, where it belongs on the loop page', async () => {
		const html = await (await engineer.request(`/loops/${loopId}`)).text();
		for (const field of ['loop name', 'loop note', 'deviation reason']) {
			expect(html, field).toContain(`&lt;img src=x onerror=alert('${field}')>`);
		}
		// The revision list comes with the page or from the API; either way as text.
		const api = await boxedFetch(`${app.url}/api/loops/${loopId}/revisions`, { headers: { authorization: 'Bearer hr_demo_engineer' } });
		expect(api.body).toContain("onerror=alert('file name')");
	});

	it('escapes it in the verdict e-mail', async () => {
		const mail = await waitForMessage({ to: 'lead@headroom.test', subject: new RegExp(`${keys.loop} is now noncompliant`) }, 60_000);
		expect(mail.html).toBeDefined();
		expect(mail.html).not.toMatch(RAW);
		expect(mail.html).toContain('&lt;img src=x onerror=alert(&#39;loop name&#39;)&gt;');
		expect(mail.html).toContain('&lt;img src=x onerror=alert(&#39;product name&#39;)&gt;');
		// The text part is plain text: the name appears as typed, which is harmless there.
		expect(mail.text).toContain("<img src=x onerror=alert('loop name')>");
	});
});

describe('no user input in object keys or file paths', () => {
	it('names every stored object from ids only, and keeps only the last part of a file name for display', async () => {
		const rows = await sql<{ object_key: string; file_name: string }>('select object_key, file_name from revision');
		expect(rows.length).toBeGreaterThanOrEqual(2);
		for (const r of rows) expect(r.object_key).toMatch(/^models\/[0-9a-f-]{36}\/[0-9a-f-]{36}$/);
		const mine = await sql<{ file_name: string }>('select file_name from revision where loop_id = ? order by number', [loopId]);
		expect(mine.map((r) => r.file_name)).toEqual([FILE_NAME, 'passwd']);
		const presign = await postJson(`/api/loops/${loopId}/revisions/upload-url`, 'hr_demo_engineer', { fileName: '../../models/other-loop/x.json' });
		const key = new URL(presign.uploadUrl).pathname;
		expect(key).toMatch(new RegExp(`/models/${loopId}/[0-9a-f-]{36}$`));
	});
});
