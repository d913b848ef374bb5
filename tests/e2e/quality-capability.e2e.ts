// The capability panel as a quality engineer sees it, on the demo's ALDER-4 exhaust vacuum hold
// (final), a bounded, skewed series with readings below the 90 % limit: the verdict is no better
// than what the readings outside show, Ppk stands beside Cpk, the observed share beside the
// predicted one, the method and the interval are named; the machinists side by side; and the page
// fits a 1024×768 and a 1366×900 screen without sideways scrolling.
import { describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { chartsSettled, SCREENSHOTS, sharedBrowser, shot, signInWithPassword } from '../helpers/browser';

const baseURL = inject('baseURL');
const shared = sharedBrowser();

const QUERY = 'family=ALDER-4&side=exhaust&measurement=vacuum_hold';
const count = (n: number) => new Intl.NumberFormat('en-US').format(n);

async function fitsWidth(page: Page) {
	return page.evaluate(() => ({ scroll: document.documentElement.scrollWidth, client: document.documentElement.clientWidth }));
}

describe('/quality capability, as an engineer', () => {
	for (const [width, height] of [
		[1024, 768],
		[1366, 900]
	] as const) {
		it(`shows the verdict, Ppk, observed vs predicted, the method and the interval at ${width}×${height}`, async () => {
			const context = await shared.browser.newContext({ viewport: { width, height } });
			const page = await context.newPage();
			try {
				await signInWithPassword(page, baseURL, 'engineer@brackenford.example', 'brackenford-engineer-demo');
				const res = await page.goto(`${baseURL}/quality?${QUERY}`);
				expect(res?.status()).toBe(200);
				await chartsSettled(page);
				// The same answer the panel drew from, fetched with the page's own session.
				const api = await page.evaluate(async (q) => (await fetch(`/api/v1/stats/capability?${q}`)).json(), QUERY);
				expect(api.limits).toMatchObject({ min: 90, max: null });
				expect(api.observed.count).toBeGreaterThan(0);
				expect(api.observed.share).toBeGreaterThan(0.00135); // more than a Cpk of 1.00 allows on one side
				expect(api.method).toBe('percentile');
				expect(api.normality.rejected).toBe(true);
				expect(api.nearBound).toMatchObject({ side: 'max', value: 100 });
				expect(api.verdict.level).toBe('not_capable');

				const verdict = page.getByTestId('capability-verdict');
				expect(await verdict.getAttribute('data-level')).toBe('not_capable');
				expect(await verdict.textContent()).toContain('Does not hold the limits');
				expect(await verdict.textContent()).toContain(`${count(api.observed.count)} of ${count(api.n)} readings`);
				expect(await page.getByTestId('capability-method').textContent()).toMatch(/^Percentile method \(ISO 22514-2\): the readings fail the Anderson–Darling test/);
				expect(await page.getByTestId('cpk').textContent()).toBe(api.cpk.toFixed(2));
				expect(await page.getByTestId('ppk').textContent()).toBe(api.ppk.toFixed(2));
				expect(await page.getByTestId('cap-cpk').textContent()).toContain(`95 %: ${api.cpkInterval.lower.toFixed(2)}–${api.cpkInterval.upper.toFixed(2)}`);
				expect(await page.getByTestId('cap-observed').textContent()).toContain(`${(api.observed.share * 100).toFixed(1)} %`);
				expect(await page.getByTestId('cap-predicted').textContent()).toContain(`${(api.predicted.share * 100).toFixed(1)} %`);
				expect(await page.getByTestId('cap-normality').textContent()).toContain('not normal');
				// The histogram with its fitted curve and the limit.
				expect(await page.getByTestId('capability').locator('svg rect').count()).toBeGreaterThan(4);
				expect(await page.getByTestId('capability-fit').count()).toBe(1);
				expect(await page.getByTestId('capability').textContent()).toContain('lower limit');

				// Machinists side by side: one row each, with Cpk's interval.
				const byMachinist = await page.evaluate(async (q) => (await fetch(`/api/v1/stats/capability/machinists?${q}`)).json(), QUERY);
				expect(byMachinist.machinists.length).toBeGreaterThan(1);
				expect(byMachinist.machinists.reduce((s: number, m: { n: number }) => s + m.n, 0)).toBe(api.n);
				const card = page.getByTestId('capability-machinists');
				// The chart: one dot per machinist on Cpk's scale, with its interval as a bar.
				expect(await card.locator('svg circle').count()).toBe(byMachinist.machinists.length);
				await card.screenshot({ path: `${SCREENSHOTS}quality-machinists-chart-${width}.png` });
				await card.getByRole('button', { name: 'Table' }).click();
				const rows = card.locator('tbody tr');
				expect(await rows.count()).toBe(byMachinist.machinists.length);
				const first = byMachinist.machinists[0];
				expect(await rows.first().textContent()).toContain(first.machinist);
				expect(await rows.first().textContent()).toContain(`(${first.cpkInterval.lower.toFixed(2)}–${first.cpkInterval.upper.toFixed(2)})`);

				const { scroll, client } = await fitsWidth(page);
				expect(scroll, `no sideways scroll at ${width}px`).toBeLessThanOrEqual(client);
				await shot(page, `quality-capability-${width}`);
			} finally {
				await context.close();
			}
		});
	}
});
