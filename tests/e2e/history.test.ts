import { afterAll, beforeAll, describe, expect, it } from 'vitest';
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

const TOKEN = 'hr_demo_engineer';
const api = async (path: string) =>
	(await fetch(baseUrl() + path, { headers: { authorization: `Bearer ${TOKEN}` } })).json();

/** k·1e6/((s+100)(s+200)(s+300)): a gain crossover once k > 6, unstable past k = 60; more gain, less phase margin. */
const model = (gain: number) =>
	JSON.stringify({
		format: 'headroom-loop-model/1',
		title: 'e2e history',
		blocks: [{ type: 'polynomial', numerator: [gain * 1e6], denominator: [1, 600, 110000, 6e6] }]
	});

async function uploadAndWait(loopId: string, gain: number, note: string): Promise<number> {
	const body = new FormData();
	body.set(
		'file',
		new Blob([model(gain)], { type: 'application/json' }),
		`gain-${gain.toFixed(3)}.json`
	);
	body.set('note', note);
	const response = await fetch(`${baseUrl()}/api/loops/${loopId}/revisions`, {
		method: 'POST',
		headers: { authorization: `Bearer ${TOKEN}`, origin: baseUrl() },
		body
	});
	expect(response.status, await response.clone().text()).toBe(202);
	const { revision } = await response.json();
	for (let i = 0; i < 120; i++) {
		const { revision: now } = await api(`/api/revisions/${revision.id}`);
		if (now.state === 'computed' || now.state === 'rejected') return now.number;
		await new Promise((r) => setTimeout(r, 500));
	}
	throw new Error(`revision ${revision.number} was not computed in time`);
}

async function signIn(width: number): Promise<Page> {
	const context = await browser.newContext({ viewport: { width, height: 900 } });
	const page = await context.newPage();
	await signInOn(page, 'engineer@headroom.test');
	return page;
}

describe('loop history in the browser', () => {
	it('charts the revisions and compares two of them, the choice kept in the URL', async () => {
		const me = await api('/api/me');
		const mine = await api(`/api/loops?owner=${encodeURIComponent(me.user.email)}&pageSize=100`);
		// A loop the demo seed gave a revision already, so there is a revision before the two added here.
		const loop = mine.items.find((l: { verdict: string }) => l.verdict !== 'empty');
		expect(loop, 'the demo engineer owns a loop with a model').toBeTruthy();
		const jitter = Math.random() * 0.1;
		const low = await uploadAndWait(loop.id, 10 + jitter, 'rig identification');
		const high = await uploadAndWait(loop.id, 30 + jitter, 'gain raised for stiffness');

		const page = await signIn(1280);
		await page.goto(`${baseUrl()}/loops/${loop.id}/history`);
		await page.getByRole('heading', { name: `History of ${loop.name}` }).waitFor();
		expect(await page.getByTestId('safety-note').first().isVisible()).toBe(true);
		// One panel per figure, each an image with a text description, plus the table alternative.
		for (const key of ['phaseMargin', 'upperGainMargin', 'delayMargin', 'modulusMargin']) {
			const label = await page
				.getByTestId(`trend-${key}`)
				.getByRole('img')
				.getAttribute('aria-label');
			expect(label).toMatch(new RegExp(`revision ${high} `));
		}
		// Keyboard read-out: focus the phase-margin slider and step back one revision.
		const slider = page.getByTestId('trend-phaseMargin').getByRole('slider');
		await slider.focus();
		await page.keyboard.press('ArrowLeft');
		expect(await slider.innerText()).toMatch(new RegExp(`^Revision ${high - 1}:`));
		expect(
			await page.locator(`[data-testid="history-table"] tr[data-number="${high}"]`).innerText()
		).toMatch(/gain raised for stiffness/);

		// Pick the two revisions in the selects: the comparison is a GET, so the URL carries it.
		await page.getByLabel('From revision').selectOption(String(low));
		await page.getByLabel('To revision').selectOption(String(high));
		await page.getByRole('button', { name: 'Compare' }).click();
		await page.waitForURL(new RegExp(`\\?a=${low}&b=${high}$`));
		const sentences = page.getByTestId('diff-sentences');
		await sentences
			.getByText(new RegExp(`Phase margin fell [0-9.]+° since revision ${low}`))
			.waitFor();
		expect(await page.getByTestId('diff-model').innerText()).toMatch(/numerator degree 0/);
		await snap(page, 'history-desktop');

		// The row link compares a revision with the one before it; Back returns to the earlier choice.
		await page
			.locator(`[data-testid="history-table"] tr[data-number="${low}"]`)
			.getByRole('link', { name: /Compare with/ })
			.click();
		await page.waitForURL(new RegExp(`\\?a=${low - 1}&b=${low}$`));
		await page.goBack();
		await page.waitForURL(new RegExp(`\\?a=${low}&b=${high}$`));
		// The URL changes before the page has its data again: wait for the restored comparison.
		await sentences
			.getByText(new RegExp(`Phase margin fell [0-9.]+° since revision ${low}`))
			.waitFor();
		expect(await page.getByLabel('From revision').inputValue()).toBe(String(low));

		await page.getByTestId('back-to-loop').click();
		await page.waitForURL(`${baseUrl()}/loops/${loop.id}`);
		await page.context().close();

		const phone = await signIn(390);
		await phone.goto(`${baseUrl()}/loops/${loop.id}/history?a=${low}&b=${high}`);
		await phone
			.getByTestId('diff-sentences')
			.getByText(/Phase margin fell/)
			.waitFor();
		// Wide tables scroll inside their own box; the page itself never scrolls sideways.
		expect(await phone.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(
			390
		);
		await snap(phone, 'history-phone');
		await phone.context().close();
	});

	it('says so when a loop has no revision yet', async () => {
		const all = await api('/api/loops?verdict=empty&pageSize=5');
		expect(all.items.length, 'the demo scenario has loops without a model').toBeGreaterThan(0);
		const page = await signIn(1280);
		await page.goto(`${baseUrl()}/loops/${all.items[0].id}/history`);
		expect(await page.getByTestId('history-empty').innerText()).toMatch(/No revision yet/);
		await snap(page, 'history-empty');
		await page.context().close();
	});
});
