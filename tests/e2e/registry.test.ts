import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { baseUrl, launch, snap } from './support/browser';
import { viewSettled } from './support/dashboard';
import { signedIn as signInAs } from './support/session';

let browser: Browser;
beforeAll(async () => {
	browser = await launch();
});
afterAll(async () => {
	await browser?.close();
});

const signedIn = (email: string) => signInAs(browser, email);

describe('registry in the browser', () => {
	it('lets a lead change the phase-margin target of a class and shows the new version in the history', async () => {
		const { context, page } = await signedIn('lead@headroom.test');
		await page.getByRole('navigation', { name: 'Main' }).first().getByRole('link', { name: 'Classes' }).click();
		// The dashboard links classes too: wait until the classes page is the one on screen.
		await page.waitForURL(/\/classes$/);
		await page.getByRole('link', { name: 'Current loop' }).click();
		await page.waitForURL(/\/classes\/current$/);
		const pm = page.getByLabel('Minimum phase margin (°)');
		expect(await pm.inputValue()).toBe('50');
		await snap(page, 'registry-class-before');

		await pm.fill('52.5');
		await page.getByRole('button', { name: 'Save as version 3' }).click();
		// Without a reason the form refuses, next to the field.
		await page.getByText('Give a reason').waitFor();
		await page.getByLabel('Reason for this change').fill('Ringing on the S2 field units again at 50°.');
		await page.getByRole('button', { name: 'Save as version 3' }).click();
		await page.getByRole('status').filter({ hasText: 'Saved as version 3.' }).waitFor();

		const history = page.getByTestId('requirement-history');
		const v3 = history.locator('tr[data-version="3"]');
		await v3.waitFor();
		expect(await v3.innerText()).toContain('Ringing on the S2 field units again at 50°.');
		expect(await v3.innerText()).toContain('Lena Lead');
		expect(await v3.innerText()).toMatch(/50 → 52\.5/);
		await expect(page.getByRole('button', { name: 'Save as version 4' }).isVisible()).resolves.toBe(true);
		await snap(page, 'registry-class-after');

		// Side by side: version 2 against version 3.
		await page.goto(baseUrl() + '/classes/current?a=2&b=3');
		const compare = page.getByTestId('version-compare');
		const row = compare.getByRole('row', { name: /Minimum phase margin/ });
		expect((await row.innerText()).replace(/\s+/g, ' ')).toMatch(/50 52\.5 stricter/);
		await snap(page, 'registry-class-compare');

		// The API answers the same version, exactly as typed.
		const api = await page.request.get(baseUrl() + '/api/classes/current/requirement');
		expect(await api.json()).toMatchObject({ version: 3, targets: { minPhaseMarginDeg: '52.5' } });
		await context.close();
	});

	it('lists the demo loops with server-side sorting, filters and the verdict as text and shape', async () => {
		const { context, page } = await signedIn('engineer@headroom.test');
		// The old list address lands on the dashboard with the same query.
		await page.goto(baseUrl() + '/loops?pageSize=50');
		await page.waitForURL(baseUrl() + '/?pageSize=50');
		const table = page.getByTestId('loop-table');

		expect(await table.locator('tbody tr').count()).toBeGreaterThanOrEqual(30);
		await expect(table.locator('[data-verdict="empty"]').first().innerText()).resolves.toContain('No revision');
		await snap(page, 'registry-loops');

		await table.getByRole('button', { name: /^Loop/ }).click();
		await page.waitForURL(/sort=key&dir=desc/);
		await viewSettled(page);
		await page.getByLabel('Product').selectOption('tarn-af40');
		await page.getByRole('button', { name: 'Apply filters' }).click();
		await page.waitForURL(/product=tarn-af40/);
		// The rows are fetched after the URL changes: wait for the view of this URL.
		await viewSettled(page);
		const keys = await table.locator('tbody tr td:first-child .font-mono').allInnerTexts();
		expect(keys).toEqual([...keys].sort().reverse());
		expect(keys).toContain('pll-weak-grid');
		await snap(page, 'registry-loops-filtered');

		await table.getByRole('link', { name: 'Grid synchronisation PLL' }).click();
		await page.getByRole('heading', { name: 'Grid synchronisation PLL' }).waitFor();
		await expect(page.getByRole('heading', { name: 'Edit loop' }).isVisible()).resolves.toBe(false);
		await context.close();
	});

	it('shows a loop with its active deviation, and previews a CSV import row by row', async () => {
		const { context, page } = await signedIn('lead@headroom.test');
		await page.goto(baseUrl() + '/loops?q=ax2-speed');
		await page.getByRole('link', { name: /Axis 2 speed/ }).click();
		const deviations = page.getByTestId('deviations');
		await expect(deviations.locator('[data-status="active"]').innerText()).resolves.toMatch(/Phase margin[\s\S]*38/);
		await expect(page.getByRole('heading', { name: 'Grant a deviation' }).isVisible()).resolves.toBe(true);
		await snap(page, 'registry-loop-detail');

		await page.goto(baseUrl() + '/loops/import');
		await page.getByLabel(/CSV file/).setInputFiles({
			name: 'loops.csv',
			mimeType: 'text/csv',
			buffer: Buffer.from('product,class,key,name\ntarn-s2,current,ax3-iq,Axis 3 q current\nnope,current,x,Bad product\n')
		});
		await page.getByRole('button', { name: 'Preview' }).click();
		const preview = page.getByTestId('import-preview');
		await preview.waitFor();
		expect(await preview.innerText()).toContain('No product nope.');
		await expect(page.getByRole('button', { name: /^Import/ }).count()).resolves.toBe(0);
		await snap(page, 'registry-import-preview');
		await context.close();
	});

	it('lets a lead grant a deviation from the loop page and revoke it', async () => {
		const { context, page } = await signedIn('lead@headroom.test');
		await page.goto(baseUrl() + '/loops?q=pll-weak-grid');
		await page.getByRole('link', { name: 'PLL, weak-grid gain set' }).click();
		await page.getByRole('heading', { name: 'Grant a deviation' }).waitFor();
		await page.getByRole('checkbox', { name: 'Phase margin' }).check();
		const relaxed = page.getByLabel('Relaxed minimum phase margin (°)');
		// A "deviation" that tightens the target is refused next to the field.
		await relaxed.fill('50');
		await page.getByLabel('Reason', { exact: true }).fill('Weak-grid field trial, second round.');
		await page.getByRole('button', { name: 'Grant deviation' }).click();
		await page.getByText(/asks at least as much as the target 45/).waitFor();
		await relaxed.fill('36');
		await page.getByRole('button', { name: 'Grant deviation' }).click();
		await page.getByRole('status').filter({ hasText: 'Deviation granted.' }).waitFor();
		const active = page.getByTestId('deviations').locator('[data-status="active"]');
		await active.waitFor();
		expect(await active.innerText()).toContain('Weak-grid field trial, second round.');
		await expect(page.getByTestId('deviations').locator('[data-status="expired"]').count()).resolves.toBe(1);
		await snap(page, 'registry-deviation-granted');
		await active.getByRole('button', { name: 'Revoke' }).click();
		await page.getByTestId('deviations').locator('[data-status="revoked"]').waitFor();
		await context.close();
	});

	it('answers the JSON API with the demo tokens, by role', async () => {
		const { context, page } = await signedIn('viewer@headroom.test');
		const auth = (role: string) => ({ authorization: `Bearer hr_demo_${role}` });
		const list = await page.request.get(baseUrl() + '/api/loops?product=tarn-m1&pageSize=5', { headers: auth('viewer') });
		expect(list.status()).toBe(200);
		const body = await list.json();
		expect(body.total).toBeGreaterThan(5);
		expect(body.items).toHaveLength(5);
		expect(body.items[0]).toMatchObject({ product: { key: 'tarn-m1' }, verdict: 'empty' });
		const refused = await page.request.post(baseUrl() + '/api/products', { headers: auth('viewer'), data: { key: 'x', name: 'X' } });
		expect(refused.status()).toBe(403);
		const bad = await page.request.post(baseUrl() + '/api/products', { headers: auth('lead'), data: { key: 'Bad Key', name: 'X' } });
		expect(bad.status()).toBe(400);
		expect((await bad.json()).error).toMatchObject({ code: 'invalid', path: 'key' });
		await page.goto(baseUrl() + '/audit?entityType=requirement');
		await expect(page.getByTestId('audit-table').innerText()).resolves.toContain('requirement.create');
		await snap(page, 'registry-audit');
		await context.close();
	});
});
