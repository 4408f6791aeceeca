import type { Page } from 'playwright-core';

/**
 * The dashboard fetches rows after its URL changes; wait until the rows on screen belong to the
 * URL in the address bar (the view records the query it shows) and no fetch is running.
 */
export async function viewSettled(page: Page): Promise<void> {
	await page.waitForFunction(() => {
		const view = document.querySelector('[data-testid="loops-view"]');
		return !!view && view.getAttribute('data-view') === location.search && view.getAttribute('aria-busy') !== 'true';
	});
}
