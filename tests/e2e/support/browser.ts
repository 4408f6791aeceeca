import { chromium, type Browser, type Page } from 'playwright-core';

/** The app under test, started by `npm test` (scripts/test.ts) on a free loopback port. */
export function baseUrl(): string {
	const url = process.env.E2E_BASE_URL;
	if (!url) throw new Error('E2E_BASE_URL is not set: run the e2e suite through `npm test`.');
	return url.replace(/\/$/, '');
}

export async function launch(): Promise<Browser> {
	return chromium.launch({
		executablePath: process.env.CHROMIUM_PATH || '/usr/bin/chromium',
		args: [
			'--headless',
			'--no-sandbox',
			'--disable-gpu',
			'--disable-quic',
			'--no-first-run',
			'--disable-background-networking',
			'--disable-component-update',
			'--disable-sync'
		]
	});
}

/** Screenshots land in test-results/ (git-ignored) so a person can look at them. */
export async function snap(page: Page, name: string): Promise<void> {
	await page.screenshot({ path: `test-results/${name}.png`, fullPage: true });
}
