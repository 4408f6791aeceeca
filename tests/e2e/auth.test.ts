import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { baseUrl, launch, snap } from './support/browser';

const PASSWORD = 'headroom-demo';
const NAMES = { viewer: 'Vera Viewer', engineer: 'Emil Engineer', lead: 'Lena Lead', admin: 'Ada Admin' } as const;
type Role = keyof typeof NAMES;

let browser: Browser;

beforeAll(async () => {
	browser = await launch();
});
afterAll(async () => {
	await browser?.close();
});

/** Each person gets a fresh browser profile: no cookie carries over between roles. */
async function fresh(): Promise<{ context: BrowserContext; page: Page }> {
	const context = await browser.newContext({ viewport: { width: 1280, height: 800 } });
	return { context, page: await context.newPage() };
}

async function signInWithKeyboard(page: Page, email: string) {
	await page.goto(baseUrl() + '/signin');
	await page.getByLabel('E-mail').focus();
	await page.keyboard.type(email);
	await page.keyboard.press('Tab');
	await page.keyboard.type(PASSWORD);
	await page.keyboard.press('Enter');
	await page.waitForURL(baseUrl() + '/');
}

const navLabels = async (page: Page) =>
	(await page.getByRole('navigation', { name: 'Main' }).first().getByRole('link').allInnerTexts()).map((t) => t.trim());

describe('sign-in in the browser', () => {
	it('sends an anonymous visitor of a protected page to the sign-in form and back', async () => {
		const { context, page } = await fresh();
		await page.goto(baseUrl() + '/settings/tokens');
		expect(new URL(page.url()).pathname).toBe('/signin');
		expect(new URL(page.url()).searchParams.get('next')).toBe('/settings/tokens');
		await snap(page, 'auth-signin');
		await page.getByLabel('E-mail').fill('engineer@headroom.test');
		await page.getByLabel('Password').fill(PASSWORD);
		await page.getByRole('button', { name: 'Sign in', exact: true }).click();
		await page.waitForURL(baseUrl() + '/settings/tokens');
		await expect(page.getByRole('heading', { name: 'API tokens' }).isVisible()).resolves.toBe(true);
		await context.close();
	});

	it('shows one answer for a wrong password, keeps the e-mail and clears the password', async () => {
		const { context, page } = await fresh();
		await page.goto(baseUrl() + '/signin');
		await page.getByLabel('E-mail').fill('lead@headroom.test');
		await page.getByLabel('Password').fill('not the password');
		await page.getByRole('button', { name: 'Sign in', exact: true }).click();
		await page.getByRole('alert').filter({ hasText: 'do not match' }).waitFor();
		expect(await page.getByLabel('E-mail').inputValue()).toBe('lead@headroom.test');
		expect(await page.getByLabel('Password').inputValue()).toBe('');
		await snap(page, 'auth-signin-refused');
		await context.close();
	});

	for (const role of Object.keys(NAMES) as Role[]) {
		it(`signs the demo ${role} in and shows only what the role allows`, async () => {
			const { context, page } = await fresh();
			await signInWithKeyboard(page, `${role}@headroom.test`);
			expect(await page.getByTestId('current-user').innerText()).toBe(`${NAMES[role]} · ${role}`);

			const nav = await navLabels(page);
			expect(nav).toContain('Tokens');
			expect(nav.includes('Users')).toBe(role === 'admin');
			await snap(page, `auth-${role}-home`);

			const users = await page.goto(baseUrl() + '/users');
			if (role === 'admin') {
				expect(users?.status()).toBe(200);
				const table = page.getByTestId('users-table');
				for (const r of Object.keys(NAMES)) await expect(table.getByText(`${r}@headroom.test`).isVisible()).resolves.toBe(true);
				await expect(page.getByRole('button', { name: `Deactivate ${NAMES.admin}` }).count()).resolves.toBe(0);
				await expect(page.getByRole('button', { name: `Deactivate ${NAMES.viewer}` }).count()).resolves.toBe(1);
				await snap(page, 'auth-admin-users');
			} else {
				expect(users?.status()).toBe(403);
				expect(await page.getByRole('main').innerText()).toContain('needs the admin role');
			}

			await page.goto(baseUrl() + '/settings/tokens');
			const upload = page.getByRole('checkbox', { name: /upload/ });
			await expect(upload.isDisabled()).resolves.toBe(role === 'viewer');
			await expect(page.getByTestId('tokens-table').getByText('Demo token').isVisible()).resolves.toBe(true);
			await snap(page, `auth-${role}-tokens`);

			await page.getByTestId('sign-out').click();
			await page.waitForURL(/\/signin\?signedOut=1$/);
			await expect(page.getByRole('status').filter({ hasText: 'You are signed out' }).isVisible()).resolves.toBe(true);
			const after = await page.goto(baseUrl() + '/settings/tokens');
			expect(new URL(after!.url()).pathname).toBe('/signin');
			await context.close();
		});
	}
});

describe('API tokens in the browser', () => {
	it('creates a token, shows its value once, and the value works as a bearer token', async () => {
		const { context, page } = await fresh();
		await signInWithKeyboard(page, 'engineer@headroom.test');
		await page.goto(baseUrl() + '/settings/tokens');
		await page.getByLabel('Name').fill('e2e pipeline');
		await page.getByRole('checkbox', { name: /upload/ }).check();
		await page.getByRole('button', { name: 'Create token' }).click();
		const value = await page.getByTestId('new-token-value').innerText();
		expect(value).toMatch(/^hr_[\w-]{40,}$/);
		await snap(page, 'auth-token-created');

		const answer = await page.request.get(baseUrl() + '/api/me', { headers: { authorization: `Bearer ${value}` } });
		expect(await answer.json()).toMatchObject({ user: { email: 'engineer@headroom.test' }, scopes: ['read', 'upload'] });

		await page.reload();
		expect(await page.getByTestId('new-token-value').count()).toBe(0);
		expect(await page.content()).not.toContain(value);
		await page.getByRole('button', { name: 'Revoke the token e2e pipeline' }).click();
		await page.getByText(/revoked \d{4}-/).waitFor();
		const refused = await page.request.get(baseUrl() + '/api/me', { headers: { authorization: `Bearer ${value}` } });
		expect(refused.status()).toBe(401);
		await context.close();
	});
});

// Runs when the e2e stage starts the OpenID provider fake and configures the app for it.
describe.skipIf(!process.env.OIDC_ISSUER)('single sign-on in the browser', () => {
	it('signs a newcomer in through the company sign-in page as a viewer', async () => {
		const { context, page } = await fresh();
		await page.goto(baseUrl() + '/signin');
		await page.getByTestId('sso-button').click();
		await page.getByLabel('E-mail').fill(process.env.E2E_SSO_EMAIL ?? 'newcomer@headroom.test');
		await page.getByLabel('Password').fill(process.env.E2E_SSO_PASSWORD ?? 'headroom-sso');
		await snap(page, 'auth-sso-idp');
		await page.getByRole('button', { name: 'Sign in' }).click();
		await page.waitForURL(baseUrl() + '/');
		expect(await page.getByTestId('current-user').innerText()).toMatch(/· viewer$/);
		await snap(page, 'auth-sso-signed-in');
		await context.close();
	});
});
