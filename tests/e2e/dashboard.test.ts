import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { baseUrl, launch, snap } from './support/browser';
import { viewSettled } from './support/dashboard';
import { signedIn } from './support/session';

let browser: Browser;
beforeAll(async () => {
	browser = await launch();
});
afterAll(async () => {
	await browser?.close();
});

const api = async (path: string) =>
	(await fetch(baseUrl() + path, { headers: { authorization: 'Bearer hr_demo_viewer' } })).json();
const rowKeys = (page: Page) => page.getByTestId('loop-table').locator('tbody tr[data-loop]').evaluateAll((rows) => rows.map((r) => r.getAttribute('data-loop')));
const rowVerdicts = (page: Page) => page.getByTestId('loop-table').locator('tbody tr [data-verdict]').evaluateAll((els) => els.map((e) => e.getAttribute('data-verdict')));

/** The demo models are computed by the worker after start: wait until none is pending. */
async function demoJudged() {
	for (let i = 0; i < 120; i++) {
		const s = await api('/api/loops/summary');
		if (s.verdicts.pending === 0 && s.verdicts.noncompliant > 0) return s;
		await new Promise((r) => setTimeout(r, 500));
	}
	throw new Error('the demo loops were not judged in time');
}

describe('compliance dashboard', () => {
	it('filters to the non-compliant loops of one class, keeps the view in the URL, sorts a margin and exports it', async () => {
		const summary = await demoJudged();
		const cls = summary.classes.find((c: { verdicts: Record<string, number> }) => c.verdicts.noncompliant > 0);
		expect(cls, 'a demo class has non-compliant loops').toBeTruthy();
		const { context, page } = await signedIn(browser, 'engineer@headroom.test');
		await viewSettled(page);
		await expect(page.getByTestId('verdict-counts').innerText()).resolves.toMatch(/Non-compliant/);
		await snap(page, 'dashboard-desktop');

		await page.getByLabel('Class', { exact: true }).selectOption(cls.key);
		await page.getByLabel('Verdict', { exact: true }).selectOption('noncompliant');
		await page.getByRole('button', { name: 'Apply filters' }).click();
		await page.waitForURL((u) => u.searchParams.get('class') === cls.key && u.searchParams.get('verdict') === 'noncompliant');
		await viewSettled(page);
		const filteredKeys = await rowKeys(page);
		expect(filteredKeys).toHaveLength(cls.verdicts.noncompliant);
		expect(new Set(await rowVerdicts(page))).toEqual(new Set(['noncompliant']));
		// Shortfalls are said in words, not only in colour.
		await expect(page.getByTestId('loop-table').innerText()).resolves.toMatch(/short/);
		expect(await page.getByRole('link', { name: 'Compliance report…' }).getAttribute('href')).toBe(`/reports?class=${cls.key}&verdict=noncompliant`);
		await snap(page, 'dashboard-filtered');

		// Sort by phase margin from the keyboard: the header is a button with aria-sort.
		const pmHeader = page.getByRole('columnheader', { name: /Phase margin/ });
		expect(await pmHeader.getAttribute('aria-sort')).toBe('none');
		await pmHeader.getByRole('button').focus();
		await page.keyboard.press('Enter');
		await page.waitForURL(/sort=phaseMargin&dir=asc/);
		await viewSettled(page);
		expect(await pmHeader.getAttribute('aria-sort')).toBe('ascending');
		const expected = await api(`/api/loops?class=${cls.key}&verdict=noncompliant&sort=phaseMargin&dir=asc`);
		expect(await rowKeys(page)).toEqual(expected.items.map((l: { key: string }) => l.key));

		// The export downloads the current view: the same loops, in the same order.
		const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name: 'Export CSV' }).click()]);
		expect(download.suggestedFilename()).toMatch(/^headroom-loops-\d{8}-\d{4}\.csv$/);
		const lines = readFileSync((await download.path())!, 'utf8').trim().split(/\r\n/);
		expect(lines[0]).toMatch(/^loop_id,product,class,loop_key,/);
		expect(lines.slice(1).map((l) => l.split(',')[3])).toEqual(expected.items.map((l: { key: string }) => l.key));
		// and so does the report link: these loops, in this order
		expect(await page.getByRole('link', { name: 'Compliance report…' }).getAttribute('href')).toBe(`/reports?class=${cls.key}&verdict=noncompliant&sort=phaseMargin&dir=asc`);

		// Back restores the filtered view unsorted, then the unfiltered dashboard.
		await page.goBack();
		await page.waitForURL((u) => u.searchParams.get('verdict') === 'noncompliant' && !u.searchParams.has('sort'));
		await viewSettled(page);
		expect(await rowKeys(page)).toEqual(filteredKeys);
		expect(await page.getByLabel('Class', { exact: true }).inputValue()).toBe(cls.key);
		await page.goBack();
		await page.waitForURL(baseUrl() + '/');
		await viewSettled(page);
		expect(await page.getByLabel('Class', { exact: true }).inputValue()).toBe('');
		expect((await rowKeys(page)).length).toBeGreaterThan(filteredKeys.length);

		// A count is a filter link too.
		await page.getByTestId('verdict-counts').locator('[data-count-verdict="unstable"]').click();
		await page.waitForURL(/\?verdict=unstable$/);
		await viewSettled(page);
		expect(new Set(await rowVerdicts(page))).toEqual(new Set(['unstable']));
		await context.close();
	});

	it('renders a shared link on the server at phone width, and says when nothing matches or a filter is wrong', async () => {
		const summary = await demoJudged();
		const cls = summary.classes.find((c: { verdicts: Record<string, number> }) => c.verdicts.noncompliant > 0);
		const { context, page } = await signedIn(browser, 'viewer@headroom.test', { width: 390, height: 844 });
		await page.goto(`${baseUrl()}/?class=${cls.key}&verdict=noncompliant&sort=shortfall&dir=desc`);
		await viewSettled(page);
		expect(await rowKeys(page)).toHaveLength(cls.verdicts.noncompliant);
		expect(await page.getByRole('columnheader', { name: /Worst shortfall/ }).getAttribute('aria-sort')).toBe('descending');
		await snap(page, 'dashboard-phone');

		await page.goto(`${baseUrl()}/?q=no-such-loop-anywhere`);
		await page.getByTestId('empty-filtered').waitFor();
		await page.getByTestId('empty-filtered').getByRole('link', { name: 'Clear the filters' }).click();
		await page.waitForURL(baseUrl() + '/');
		await viewSettled(page);
		expect((await rowKeys(page)).length).toBeGreaterThan(0);

		await page.goto(`${baseUrl()}/?changedSince=last-week`);
		await expect(page.getByRole('alert').innerText()).resolves.toMatch(/changedSince must be an ISO date/);
		expect(await page.getByLabel('Changed since', { exact: true }).getAttribute('aria-invalid')).toBe('true');
		await snap(page, 'dashboard-phone-bad-filter');
		await context.close();
	});
});
