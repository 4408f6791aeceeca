import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { baseUrl, launch, snap } from './support/browser';

let browser: Browser;
let page: Page;

beforeAll(async () => {
	browser = await launch();
	page = await browser.newPage();
});
afterAll(async () => {
	await browser?.close();
});

describe('app shell', () => {
	it('shows the product name, the safety caution and every service up', async () => {
		const response = await page.goto(baseUrl() + '/');
		expect(response?.status()).toBe(200);
		await expect(page.title()).resolves.toBe('Headroom');
		expect(await page.getByTestId('safety-note').textContent()).toMatch(
			/only as good as the model/
		);
		const status = await page.getByTestId('system-status').innerText();
		expect(status).not.toMatch(/down/);
		expect(status.match(/up/g)).toHaveLength(3);
		await snap(page, 'shell-light');
	});

	it('switches to the dark theme and remembers it across a reload', async () => {
		await page.getByTestId('theme-select').selectOption('dark');
		expect(await page.evaluate(() => document.documentElement.dataset.theme)).toBe('dark');
		await page.reload();
		expect(await page.evaluate(() => document.documentElement.dataset.theme)).toBe('dark');
		const background = await page.evaluate(() => getComputedStyle(document.documentElement).backgroundColor);
		expect(background).toBe('rgb(15, 21, 19)');
		await snap(page, 'shell-dark');
	});

	it('serves the fonts from the app itself, never from another origin', async () => {
		const origins = new Set<string>();
		page.on('request', (request) => origins.add(new URL(request.url()).origin));
		await page.goto(baseUrl() + '/');
		await page.evaluate(() => document.fonts.ready);
		const plexLoaded = await page.evaluate(() => document.fonts.check('16px "IBM Plex Sans"'));
		expect(plexLoaded).toBe(true);
		expect([...origins]).toEqual([new URL(baseUrl()).origin]);
	});

	it('answers /api/health with JSON naming each component', async () => {
		const response = await page.request.get(baseUrl() + '/api/health');
		expect(response.status()).toBe(200);
		const body = await response.json();
		expect(body.components.database.status).toBe('up');
		expect(body.components.storage.status).toBe('up');
		expect(body.components.queue.status).toBe('up');
		expect(body.version).toMatch(/^\d+\.\d+\.\d+/);
	});
});
