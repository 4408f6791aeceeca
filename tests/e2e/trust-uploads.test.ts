/**
 * Bad model files through the file picker on the loop page (the API path is covered in
 * tests/integration/trust/hostile-uploads.test.ts): a file the worker refuses shows `rejected`
 * with the path and message in the revision table, a file over the size limit is refused with
 * the reason before anything is stored, and the loop's verdict does not move.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { baseUrl, launch, snap } from './support/browser';

let browser: Browser;
beforeAll(async () => {
	browser = await launch();
});
afterAll(async () => {
	await browser?.close();
});

const api = async (path: string, token = 'hr_demo_engineer') =>
	(await fetch(baseUrl() + path, { headers: { authorization: `Bearer ${token}` } })).json();

describe('bad files through the upload form', () => {
	it('shows the refusal in words and leaves the verdict alone', async () => {
		const me = await api('/api/me');
		const mine = await api(`/api/loops?owner=${encodeURIComponent(me.user.email)}&pageSize=100`);
		const loop = mine.items.find((l: { verdict: string }) => l.verdict !== 'empty' && l.verdict !== 'pending') ?? mine.items[0];
		const before = (await api(`/api/loops/${loop.id}`)).verdict ?? loop.verdict;

		const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
		const page = await context.newPage();
		await page.goto(baseUrl() + '/signin');
		await page.getByLabel('E-mail').fill('engineer@headroom.test');
		await page.getByLabel('Password').fill('headroom-demo');
		await page.getByRole('button', { name: 'Sign in', exact: true }).click();
		await page.waitForURL(baseUrl() + '/');
		await page.goto(`${baseUrl()}/loops/${loop.id}`);
		await page.getByRole('heading', { name: 'Model revisions' }).waitFor();

		// A model the worker refuses: rejected, with where and what, in the table.
		const bad = { format: 'headroom-loop-model/1', title: `bad ${Math.random()}`, blocks: [{ type: 'polynomial', numerator: [1], denominator: [0, 1, 2] }] };
		await page.getByTestId('revision-file').setInputFiles({ name: '<em>bad<em>.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(bad)) });
		const row = page.locator('[data-testid="revision-table"] tbody tr').first();
		await row.and(page.locator('[data-state="rejected"]')).waitFor({ timeout: 30_000 });
		const text = await row.innerText();
		expect(text).toMatch(/blocks\[0\]\.denominator/);
		expect(text).toMatch(/leading coefficient is zero/);
		// The file name with markup is shown as typed, not rendered.
		expect(text).toContain('<em>bad<em>.json');
		expect(await row.locator('em').count()).toBe(0);
		await snap(page, 'trust-upload-rejected');

		// Over the size limit: refused with the reason, nothing stored.
		const countBefore = (await api(`/api/loops/${loop.id}/revisions`)).total;
		await page.getByTestId('revision-file').setInputFiles({ name: 'huge.json', mimeType: 'application/json', buffer: Buffer.alloc(6 * 1024 * 1024, 0x20) });
		await page.getByRole('alert').filter({ hasText: /limit/i }).waitFor({ timeout: 30_000 });
		expect((await api(`/api/loops/${loop.id}/revisions`)).total).toBe(countBefore);

		// A binary file: refused by the worker as not text.
		const garbage = Buffer.from(Array.from({ length: 4096 }, (_, i) => (i * 7919 + 255) & 0xff));
		garbage[0] = 0xff;
		await page.getByTestId('revision-file').setInputFiles({ name: 'firmware.bin', mimeType: 'application/octet-stream', buffer: garbage });
		await page.locator('[data-testid="revision-table"] tbody tr').first().and(page.locator('[data-state="rejected"]')).filter({ hasText: 'firmware.bin' }).waitFor({ timeout: 30_000 });
		expect(await page.locator('[data-testid="revision-table"] tbody tr').first().innerText()).toMatch(/not a text file/);

		const after = (await api(`/api/loops/${loop.id}`)).verdict ?? loop.verdict;
		expect(after).toBe(before);
		await context.close();
	});
});
