import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { baseUrl, launch, snap } from './support/browser';
import { signInOn } from './support/session';

let browser: Browser;

beforeAll(async () => {
	browser = await launch();
});
afterAll(async () => {
	await browser?.close();
});

describe('notification settings', () => {
	it('lets a lead choose the daily digest with the keyboard, and keeps the choice', async () => {
		const context = await browser.newContext({ viewport: { width: 1280, height: 800 } });
		const page = await context.newPage();
		await signInOn(page, 'lead@headroom.test');
		await page.getByRole('navigation', { name: 'Main' }).first().getByRole('link', { name: 'Notifications' }).click();
		await page.waitForURL(baseUrl() + '/settings/notifications');
		const immediate = page.getByRole('radio', { name: 'A message for every change' });
		const digest = page.getByRole('radio', { name: 'One daily digest' });
		expect(await immediate.isChecked()).toBe(true);
		await immediate.focus();
		await page.keyboard.press('ArrowDown');
		expect(await digest.isChecked()).toBe(true);
		await page.getByRole('button', { name: 'Save' }).click();
		await page.getByRole('status').filter({ hasText: 'you get one digest a day' }).waitFor();
		await snap(page, 'settings-notifications-digest');
		await page.reload();
		expect(await page.getByRole('radio', { name: 'One daily digest' }).isChecked()).toBe(true);
		await expect(page.getByText(/Current choice since/).isVisible()).resolves.toBe(true);
		// Back to the demo's default for the other suites.
		await page.getByRole('radio', { name: 'A message for every change' }).check();
		await page.getByRole('button', { name: 'Save' }).click();
		await page.getByRole('status').filter({ hasText: 'a message for every change' }).waitFor();
		await context.close();
	});

	it('tells an engineer that owners always get a message per change, with no choice to make', async () => {
		const context = await browser.newContext({ viewport: { width: 1280, height: 800 } });
		const page = await context.newPage();
		await signInOn(page, 'engineer@headroom.test');
		await page.goto(baseUrl() + '/settings/notifications');
		await expect(page.getByText(/You get a message whenever a loop you own/).isVisible()).resolves.toBe(true);
		expect(await page.getByRole('radio').count()).toBe(0);
		await context.close();
	});
});
