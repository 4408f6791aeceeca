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

describe('model revisions in the browser', () => {
	it('shows the demo models computed by the worker, with verdicts on the loops', async () => {
		// npm test seeds the demo scenario, whose models go through the real upload path.
		let verdicts: string[] = [];
		for (let i = 0; i < 60; i++) {
			const page = await api('/api/loops?pageSize=100');
			verdicts = page.items.map((l: { verdict: string }) => l.verdict);
			if (!verdicts.includes('pending')) break;
			await new Promise((r) => setTimeout(r, 500));
		}
		expect(verdicts).toContain('compliant');
		expect(verdicts).toContain('noncompliant');
		expect(verdicts).toContain('unstable');
		expect(verdicts).toContain('covered');
	});

	it('lets an engineer upload a revision to their loop and watch it computed without a reload', async () => {
		const me = await api('/api/me');
		const mine = await api(`/api/loops?owner=${encodeURIComponent(me.user.email)}&pageSize=100`);
		const loop = mine.items.find((l: { verdict: string }) => l.verdict === 'empty') ?? mine.items[0];
		expect(loop, 'the demo engineer owns loops').toBeTruthy();

		const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
		const page = await context.newPage();
		await page.goto(baseUrl() + '/signin');
		await page.getByLabel('E-mail').fill('engineer@headroom.test');
		await page.getByLabel('Password').fill('headroom-demo');
		await page.getByRole('button', { name: 'Sign in', exact: true }).click();
		await page.waitForURL(baseUrl() + '/');
		// The home page counts the loops per verdict, each count a link to that filter.
		const counts = page.getByTestId('verdict-counts');
		expect(await counts.innerText()).toMatch(/Unstable/);
		expect(await counts.locator('[data-count-verdict="unstable"]').getAttribute('href')).toBe('/?verdict=unstable');
		await snap(page, 'home-signed-in');
		await page.goto(`${baseUrl()}/loops/${loop.id}`);
		await page.getByRole('heading', { name: 'Model revisions' }).waitFor();

		const gain = 2 + Math.random();
		const model = { format: 'headroom-loop-model/1', title: 'e2e upload', blocks: [{ type: 'polynomial', numerator: [gain * 1e6], denominator: [1, 600, 110000, 6e6] }] };
		let reloads = 0;
		page.on('framenavigated', () => reloads++);
		await page.getByTestId('revision-file').setInputFiles({ name: 'rig.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(model)) });
		await page.getByRole('status').filter({ hasText: /uploaded; computing/ }).waitFor();
		const row = page.locator('[data-testid="revision-table"] tbody tr').first();
		await row.and(page.locator('[data-state="computed"]')).waitFor({ timeout: 20_000 });
		expect(await row.innerText()).toMatch(/rig\.json/);
		expect(reloads).toBe(0);
		await snap(page, 'revisions-uploaded');

		// The same file again is recognised and refused with the revision it matches.
		await page.getByTestId('revision-file').setInputFiles({ name: 'again.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(model)) });
		await page.getByRole('alert').filter({ hasText: /identical to revision/ }).waitFor();
		await context.close();
	});
});
