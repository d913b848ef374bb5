// One figure per question, as a person sees it: FIR-6D's exhaust clearance as received is 39.1 %
// of valve positions outside the limits of their day (122 of 312) on the overview's Most worn
// table, the family page's histogram and side card, the families side by side and the rates
// page, each saying what it counts; the family page says separately how the readings stand
// against today's limits (159 of 312, 51.0 %). The printed family page starts with the shop, the
// selection and the day, and its histogram tables leave out empty bins. Both at a 10-inch tablet
// in landscape (1024×768) and a laptop (1366×900), with no sideways scrolling.
import { describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { demoSignIns } from '../../src/lib/server/demo/generate';
import { chartsSettled, sharedBrowser, signInWithPassword } from '../helpers/browser';

const baseURL = inject('baseURL');
const shared = sharedBrowser();
const owner = demoSignIns().find((s) => s.shop === 'brackenford' && s.role === 'owner')!;
const FIGURE = '39.1 %';
const today = new Date().toISOString().slice(0, 10);

async function noSidewaysScroll(page: Page) {
	const { scroll, client } = await page.evaluate(() => ({ scroll: document.documentElement.scrollWidth, client: document.documentElement.clientWidth }));
	expect(scroll, `${page.url()} scrolls sideways`).toBeLessThanOrEqual(client);
}

const text = async (page: Page, testid: string) => (await page.getByTestId(testid).first().innerText()).replace(/\s+/g, ' ').trim();

describe.each([
	[1024, 768],
	[1366, 900]
])('at %i × %i', (width, height) => {
	it('the overview, the family page, the families side by side and the rates page give the same share, labelled', async () => {
		const context = await shared.browser.newContext({ viewport: { width, height } });
		const page = await context.newPage();
		try {
			await signInWithPassword(page, baseURL, owner.email, owner.password);

			await page.goto(`${baseURL}/`);
			await chartsSettled(page);
			await noSidewaysScroll(page);
			const worn = page.getByTestId('worn');
			await worn.getByRole('button', { name: 'Table' }).click();
			expect(await worn.locator('thead').innerText()).toContain('Positions outside limits of their day');
			expect(await text(page, 'worn-FIR-6D')).toContain(`${FIGURE} (122 of 312)`);
			await noSidewaysScroll(page);

			await page.goto(`${baseURL}/fleet/FIR-6D?measurement=clearance&stage=as_received`);
			await chartsSettled(page);
			await noSidewaysScroll(page);
			expect(await text(page, 'hist-exhaust-failing')).toBe(`positions outside the limits of their day: ${FIGURE} (122 of 312)`);
			expect(await text(page, 'hist-exhaust-today')).toBe("Against today's limits (the dashed lines): 159 of 312 readings outside, 51.0 %.");
			// The side card beside it: the same share of the same positions.
			const card = page.getByTestId('rates-sides');
			expect(await card.innerText()).toContain('limits of its day');
			await card.getByRole('button', { name: 'Table' }).click();
			expect((await card.locator('tr', { hasText: 'Exhaust' }).innerText()).replace(/\s+/g, ' ')).toContain(FIGURE);

			await page.goto(`${baseURL}/fleet?measurement=clearance&side=exhaust&stage=as_received`);
			await chartsSettled(page);
			await noSidewaysScroll(page);
			const compare = page.getByTestId('compare');
			await compare.getByRole('button', { name: 'Table' }).click();
			expect(await compare.locator('thead').innerText()).toContain('Positions outside limits of their day');
			expect(await text(page, 'compare-FIR-6D-failing')).toBe(FIGURE);
			await noSidewaysScroll(page);

			await page.goto(`${baseURL}/rates?check=clearance&family=FIR-6D&stage=as_received`);
			await page.getByTestId('rates-by-side').first().waitFor();
			expect(await page.locator('main').innerText()).toContain('outside the limits of its day');
			expect((await page.getByTestId('rates-by-side').locator('tr', { hasText: 'Exhaust' }).first().innerText()).replace(/\s+/g, ' ')).toContain(FIGURE);
		} finally {
			await context.close();
		}
	});

	it('the printed family page: shop, selection and day first; histogram tables without empty bins', async () => {
		const context = await shared.browser.newContext({ viewport: { width, height } });
		const page = await context.newPage();
		try {
			await signInWithPassword(page, baseURL, owner.email, owner.password);
			await page.goto(`${baseURL}/fleet/FIR-6D?measurement=clearance&stage=as_received&from=2024-01-01`);
			await chartsSettled(page);
			// On screen the header is hidden and the histogram's table (Table view) keeps every bin.
			expect(await page.getByTestId('print-header').isVisible()).toBe(false);
			const exhaust = page.getByTestId('hist-exhaust');
			await exhaust.getByRole('button', { name: 'Table' }).click();
			expect(await exhaust.locator('tbody tr:visible').count()).toBe(19);
			await exhaust.getByRole('button', { name: 'Chart' }).click();

			await page.emulateMedia({ media: 'print' });
			const header = page.getByTestId('print-header');
			expect(await header.isVisible()).toBe(true);
			// It is the first thing on the page that shows.
			const top = await page.evaluate(() => {
				const h = document.querySelector('[data-testid="print-header"]')!.getBoundingClientRect().top;
				const title = document.querySelector('main h1')!.getBoundingClientRect().top;
				return { h, title };
			});
			expect(top.h).toBeLessThan(top.title);
			expect(await text(page, 'print-shop')).toBe(owner.shopName);
			expect(await text(page, 'print-selection')).toBe('Selection: FIR-6D · As received · Stem-to-guide clearance · 2024-01-01 to …');
			expect(await text(page, 'print-date')).toBe(today);
			// FIR-6D's exhaust clearances fall in 19 bins, one empty; intake in 29, eight empty.
			for (const [side, shown] of [
				['exhaust', 18],
				['intake', 21]
			] as const) {
				const rows = page.getByTestId(`hist-${side}`).locator('.print-only tbody tr:visible');
				expect(await rows.count(), side).toBe(shown);
				for (const cells of await rows.allInnerTexts()) expect(cells.trim().split(/\s+/).at(-1), side).not.toBe('0');
				// The chart draws a bar for bins with readings only.
				const bars = await page.getByTestId(`hist-${side}`).locator('svg rect[fill]').evaluateAll((rs) => rs.filter((r) => Number(r.getAttribute('height')) === 0).length);
				expect(bars, side).toBe(0);
			}
			await noSidewaysScroll(page);
		} finally {
			await context.close();
		}
	});
});
