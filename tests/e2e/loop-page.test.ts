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
const get = (path: string) =>
	fetch(baseUrl() + path, { headers: { authorization: `Bearer ${TOKEN}` } });
const api = async (path: string) => (await get(path)).json();

interface LoopItem {
	id: string;
	key: string;
	verdict: string;
}

/** The demo models are computed by the worker after seeding: wait until none is pending. */
async function settledLoops(): Promise<LoopItem[]> {
	let items: LoopItem[] = [];
	for (let i = 0; i < 120; i++) {
		items = (await api('/api/loops?pageSize=100')).items;
		if (!items.some((l) => l.verdict === 'pending')) break;
		await new Promise((r) => setTimeout(r, 500));
	}
	return items;
}

const signIn = (page: Page) => signInOn(page, 'engineer@headroom.test');

/** A gain (dB) just outside the range the page says meets every target. */
function outside(words: string): number {
	const m = words.match(/from (below )?([−+±]?[\d.]+) dB to (beyond )?([−+±]?[\d.]+) dB/);
	if (!m) throw new Error(`no range in: ${words}`);
	const num = (s: string) => Number(s.replace('−', '-').replace('±', ''));
	if (!m[3]) return Math.min(20, num(m[4]) + 1);
	if (!m[1]) return Math.max(-20, num(m[2]) - 1);
	throw new Error(`the loop meets its targets over the whole slider: ${words}`);
}

describe('the loop page', () => {
	let loop: LoopItem;

	it('serves the stored model of a revision, read-guarded like the revision itself', async () => {
		const loops = await settledLoops();
		loop = loops.find((l) => l.verdict === 'compliant')!;
		expect(loop, 'the demo has a compliant loop').toBeTruthy();
		const revisions = (await api(`/api/loops/${loop.id}/revisions`)).items;
		const rev = revisions.find((r: { state: string }) => r.state === 'computed');
		const res = await get(`/api/revisions/${rev.id}/model`);
		expect(res.status).toBe(200);
		const text = await res.text();
		expect(text.length).toBe(rev.sizeBytes);
		expect(res.headers.get('etag')).toBe(`"${rev.sha256}"`);
		const anonymous = await fetch(`${baseUrl()}/api/revisions/${rev.id}/model`);
		expect(anonymous.status).toBe(401);
		const missing = await get('/api/revisions/00000000-0000-4000-8000-000000000000/model');
		expect(missing.status).toBe(404);
		expect((await missing.json()).error.code).toBe('not_found');
	});

	it('shows the verdict per criterion, both plots with crossovers, and a gain slider that changes the verdict', async () => {
		const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
		const page = await context.newPage();
		const problems: string[] = [];
		page.on('pageerror', (e) => problems.push(e.message));
		await signIn(page);
		await page.goto(`${baseUrl()}/loops/${loop.id}`);

		const detail = page.getByTestId('verdict-detail');
		await detail.waitFor();
		expect(await detail.locator('tbody tr').count()).toBeGreaterThan(0);
		expect(await detail.locator('tbody tr').first().innerText()).toMatch(/≥|≤|within/);
		await expect
			.poll(() => page.getByRole('link', { name: 'History' }).getAttribute('href'), {
				timeout: 20_000
			})
			.toBe(`/loops/${loop.id}/history`);

		const bode = page.getByTestId('bode-plot');
		const nyquist = page.getByTestId('nyquist-plot');
		await bode.locator('svg[role="img"]').waitFor({ timeout: 30_000 });
		await nyquist.locator('svg[role="img"]').waitFor();
		expect(await bode.getByTestId('gain-crossover').count()).toBeGreaterThan(0);
		expect(await bode.locator('[data-testid="bode-magnitude"]').first().getAttribute('d')).toMatch(
			/^M[\d.]/
		);
		expect(await nyquist.getByTestId('critical-point').count()).toBe(1);
		expect(await nyquist.getByTestId('nyquist-curve').count()).toBeGreaterThan(0);
		expect(await bode.locator('svg[role="img"]').getAttribute('aria-label')).toMatch(
			/gain crossover/
		);
		expect(await page.getByTestId('safety-note').count()).toBeGreaterThan(0);

		// keyboard read-out
		await bode.locator('svg[role="img"]').focus();
		await page.keyboard.press('ArrowRight');
		expect(await bode.getByTestId('bode-readout').innerText()).toMatch(/Hz, .* dB, .*°/);

		// the range in words, then a gain beyond it: the what-if verdict changes
		const range = page.getByTestId('meets-range');
		await expect
			.poll(async () => range.innerText(), { timeout: 60_000 })
			.toMatch(/^Meets every target from/);
		const words = await range.innerText();
		expect(await page.getByTestId('loop-analysis').getAttribute('data-range-source')).toBe('worker');
		expect(await page.getByTestId('meets-band').count()).toBeGreaterThan(0);
		const whatIf = page.getByTestId('what-if-verdict');
		expect(await whatIf.locator('[data-verdict]').first().getAttribute('data-verdict')).toBe(
			'compliant'
		);
		const before = await bode.locator('[data-testid="bode-magnitude"]').first().getAttribute('d');
		await snap(page, 'loop-page-desktop');
		await bode.screenshot({ path: 'test-results/loop-page-bode.png' });
		await nyquist.screenshot({ path: 'test-results/loop-page-nyquist.png' });

		const gain = outside(words);
		await page.getByLabel('Gain change (dB)').fill(String(gain));
		await expect
			.poll(async () => page.getByTestId('what-if-figures').locator('h3').innerText(), {
				timeout: 20_000
			})
			.toMatch(/Worst case at [+−]/);
		await expect
			.poll(async () => whatIf.locator('[data-verdict]').first().getAttribute('data-verdict'), {
				timeout: 20_000
			})
			.not.toBe('compliant');
		expect(await bode.locator('[data-testid="bode-magnitude"]').first().getAttribute('d')).not.toBe(
			before
		);
		await snap(page, 'loop-page-desktop-what-if');
		await page
			.getByTestId('loop-analysis')
			.screenshot({ path: 'test-results/loop-page-what-if.png' });

		// the case picker: one case in front, then that case alone
		if (await page.getByTestId('case-picker').count()) {
			const cases = await bode.locator('[data-testid="bode-magnitude"]').count();
			expect(cases).toBeGreaterThan(1);
			await page.getByLabel('Operating case').selectOption({ index: 2 });
			await page.getByLabel('Show only this case').check();
			await expect
				.poll(() => bode.locator('[data-testid="bode-magnitude"]').count(), { timeout: 20_000 })
				.toBe(1);
			await page.getByLabel('Operating case').selectOption({ index: 0 });
			await expect
				.poll(() => bode.locator('[data-testid="bode-magnitude"]').count(), { timeout: 20_000 })
				.toBe(cases);
		}

		// and the slider itself moves it back
		await page.getByRole('button', { name: 'Back to 0 dB' }).click();
		await expect
			.poll(async () => whatIf.locator('[data-verdict]').first().getAttribute('data-verdict'), {
				timeout: 20_000
			})
			.toBe('compliant');
		expect(problems).toEqual([]);
		await context.close();
	});

	it('fits a phone screen', async () => {
		const context = await browser.newContext({
			viewport: { width: 390, height: 844 },
			deviceScaleFactor: 2,
			isMobile: true,
			hasTouch: true
		});
		const page = await context.newPage();
		await signIn(page);
		await page.goto(`${baseUrl()}/loops/${loop.id}`);
		await page.getByTestId('bode-plot').locator('svg[role="img"]').waitFor({ timeout: 30_000 });
		await page.getByTestId('nyquist-plot').locator('svg[role="img"]').waitFor();
		const svgWidth = await page
			.getByTestId('bode-plot')
			.locator('svg[role="img"]')
			.evaluate((s) => s.getBoundingClientRect().width);
		expect(svgWidth).toBeLessThanOrEqual(390);
		const overflow = await page.evaluate(
			() => document.documentElement.scrollWidth - window.innerWidth
		);
		expect(overflow).toBeLessThanOrEqual(0);
		await snap(page, 'loop-page-phone');
		await page
			.getByTestId('loop-analysis')
			.screenshot({ path: 'test-results/loop-page-phone-analysis.png' });
		await context.close();
	});

	it('plots unstable, covered and measured loops too, and says where an unstable one would meet its targets', async () => {
		const loops = await settledLoops();
		const picks = [
			loops.find((l) => l.verdict === 'unstable'),
			loops.find((l) => l.verdict === 'covered'),
			loops.find((l) => l.key === 'speed' && l.verdict !== 'empty')
		].filter((l): l is LoopItem => !!l);
		expect(picks.length).toBeGreaterThanOrEqual(2);
		const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
		const page = await context.newPage();
		const problems: string[] = [];
		page.on('pageerror', (e) => problems.push(e.message));
		await signIn(page);
		for (const l of picks) {
			await page.goto(`${baseUrl()}/loops/${l.id}`);
			await page.getByTestId('bode-plot').locator('svg[role="img"]').waitFor({ timeout: 30_000 });
			await page.getByTestId('nyquist-plot').locator('svg[role="img"]').waitFor();
			const range = page.getByTestId('meets-range');
			await expect
				.poll(async () => range.innerText(), { timeout: 60_000 })
				.toMatch(/^(Meets|Does not meet)/);
			const words = await range.innerText();
			if (l.verdict === 'unstable')
				expect(words).toMatch(
					/^Does not meet its targets (at nominal gain; it would from|at any gain from)/
				);
			if (l.verdict === 'covered')
				expect(
					await page.getByTestId('verdict-detail').locator('tr[data-status="covered"]').count()
				).toBeGreaterThan(0);
			await page
				.getByTestId('loop-analysis')
				.screenshot({ path: `test-results/loop-page-${l.verdict}-${l.key}.png` });
		}
		expect(problems).toEqual([]);
		await context.close();
	});

	it('says so when a loop has no computed revision', async () => {
		const loops = await settledLoops();
		const empty = loops.find((l) => l.verdict === 'empty');
		if (!empty) return; // the demo may give every loop a model
		const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
		const page = await context.newPage();
		await signIn(page);
		await page.goto(`${baseUrl()}/loops/${empty.id}`);
		expect(await page.getByTestId('analysis-empty').innerText()).toMatch(/No plots yet/);
		await context.close();
	});
});
