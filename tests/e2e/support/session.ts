import type { Browser, BrowserContext, Page } from 'playwright-core';
import { baseUrl } from './browser';

/** A fresh browser context signed in through the sign-in form as one of the demo users. */
export async function signedIn(
	browser: Browser,
	email: string,
	viewport = { width: 1280, height: 900 }
): Promise<{ context: BrowserContext; page: Page }> {
	const context = await browser.newContext({ viewport, acceptDownloads: true });
	const page = await context.newPage();
	await signInOn(page, email);
	return { context, page };
}

/** Signs this page in through the sign-in form as one of the demo users; lands on the dashboard. */
export async function signInOn(page: Page, email: string): Promise<void> {
	await page.goto(baseUrl() + '/signin');
	await page.getByLabel('E-mail').fill(email);
	await page.getByLabel('Password').fill('headroom-demo');
	await page.getByRole('button', { name: 'Sign in', exact: true }).click();
	await page.waitForURL(baseUrl() + '/');
}
