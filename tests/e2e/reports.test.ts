import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readFile } from 'node:fs/promises';
import type { Browser, Page } from 'playwright-core';
import { baseUrl, launch, snap } from './support/browser';
import { signInOn } from './support/session';

let browser: Browser;
beforeAll(async () => {
	browser = await launch();
});
afterAll(async () => {
	await browser?.close();
});

/** Export from the page and wait, without reloading, until the new row is ready; then download it. */
async function exportAndDownload(page: Page, format: 'PDF' | 'CSV') {
	const rows = page.getByTestId('report-row');
	const before = await rows.count();
	await page.getByRole('radio', { name: new RegExp('^\\s*' + format + '\\b') }).check();
	await page.getByRole('button', { name: 'Export report' }).click();
	await expect.poll(() => rows.count(), { timeout: 10_000 }).toBe(before + 1);
	const row = rows.first();
	expect(await row.getAttribute('data-format')).toBe(format.toLowerCase());
	expect(await row.getByTestId('report-state').innerText()).toMatch(/Queued|Rendering|Ready/);
	await page
		.locator(
			`[data-testid="report-row"][data-state="ready"][data-format="${format.toLowerCase()}"]`
		)
		.first()
		.waitFor({ timeout: 90_000 });
	const download = page.waitForEvent('download');
	await rows
		.first()
		.getByRole('link', { name: /Download/ })
		.click();
	const file = await download;
	expect(file.suggestedFilename()).toMatch(
		new RegExp(`^headroom-compliance-\\d{8}-\\d{4}-[0-9a-f]{8}\\.${format.toLowerCase()}$`)
	);
	return readFile((await file.path())!);
}

describe('compliance reports in the browser', () => {
	it('exports a PDF and a CSV of the dashboard filter from the reports page, live, and downloads both', async () => {
		const context = await browser.newContext({
			viewport: { width: 1280, height: 900 },
			acceptDownloads: true
		});
		const page = await context.newPage();
		// A viewer: audits need reports, so every role may export them.
		await signInOn(page, 'viewer@headroom.test');
		await page
			.getByRole('navigation', { name: 'Main' })
			.getByRole('link', { name: 'Reports' })
			.click();
		await page.waitForURL(baseUrl() + '/reports');
		if (await page.getByTestId('reports-empty').count())
			expect(await page.getByTestId('reports-empty').innerText()).toMatch(/No reports yet/);

		await page.goto(baseUrl() + '/reports?verdict=noncompliant&sort=key');
		expect(await page.getByTestId('report-scope').innerText()).toBe('Non-compliant loops; sorted by loop key, ascending');
		let reloads = 0;
		page.on('framenavigated', () => reloads++);

		const pdf = await exportAndDownload(page, 'PDF');
		expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
		expect(pdf.byteLength).toBeGreaterThan(5_000);
		await snap(page, 'reports-desktop');

		const csv = (await exportAndDownload(page, 'CSV')).toString('utf8');
		const lines = csv.trimEnd().split('\r\n');
		expect(lines[0]).toMatch(/^product,loop_key,loop_name,class,requirement_version,verdict,/);
		expect(lines.length).toBeGreaterThan(1);
		// Only non-compliant loops: the verdict column of every row says so.
		expect(lines.slice(1).every((l) => /,noncompliant,/.test(l))).toBe(true);
		expect(reloads).toBe(0);

		const rows = page.getByTestId('report-row');
		expect(await rows.first().innerText()).toMatch(/Non-compliant loops/);
		await context.close();
	});

	it('fits a phone screen', async () => {
		const context = await browser.newContext({
			viewport: { width: 390, height: 844 },
			isMobile: true
		});
		const page = await context.newPage();
		await signInOn(page, 'engineer@headroom.test');
		await page.goto(baseUrl() + '/reports?product=tarn-s2');
		await page.getByRole('heading', { name: 'New report' }).waitFor();
		expect(await page.getByTestId('report-scope').innerText()).toMatch(/product tarn-s2/);
		await page.getByTestId('report-table').waitFor();
		await snap(page, 'reports-phone');
		await context.close();
	});
});
