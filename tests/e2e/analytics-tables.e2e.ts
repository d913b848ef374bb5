// The table pages in a real browser, signed in as the demo shop's people: unusual readings,
// failure rates, explore and export, and the API guide. Each changes a filter and sees the URL
// and the table follow, sorts a column, and the export downloaded from the page holds exactly
// the readings a SQL count of the same filter finds. Screenshots go to tests/e2e/screenshots/.
import { readFileSync } from 'node:fs';
import Papa from 'papaparse';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { demoSignIns } from '../../src/lib/server/demo/generate';
import { withSystem } from '../../src/lib/server/db/scope';
import { raw, testDb } from '../helpers/db';
import { axeSerious, launch, shot, signInWithPassword } from '../helpers/browser';

const baseURL = inject('baseURL');
const { db, sql } = testDb();
const people = Object.fromEntries(demoSignIns().filter((s) => s.shop === 'brackenford').map((s) => [s.role, s]));
let browser: Browser;
let shopId: string;

beforeAll(async () => {
	browser = await launch();
	const rows = await withSystem(db, (tx) => tx.execute<{ id: string }>(raw`select id from shops where slug = 'brackenford'`));
	shopId = rows[0].id;
});
afterAll(async () => {
	await browser?.close();
	await sql.end();
});

async function signedIn(role: string): Promise<Page> {
	const page = await browser.newPage({ viewport: { width: 1440, height: 1000 }, acceptDownloads: true });
	page.on('pageerror', (e) => console.error('[page error]', e.message));
	await signInWithPassword(page, baseURL, people[role].email, people[role].password);
	return page;
}

/** Readings of the demo shop matching a SQL condition on readings r and heads h. */
async function sqlCount(condition: string): Promise<number> {
	const [r] = await sql.begin(async (t) => {
		await t`select set_config('lapmark.shop_id', ${shopId}, true)`;
		return t.unsafe<{ n: number }[]>(`select count(*)::int as n from readings r join heads h on h.id = r.head_id join families f on f.id = r.family_id where ${condition}`);
	});
	return r.n;
}

const cellTexts = (page: Page, table: string, column: number) =>
	page.locator(`[data-testid="${table}"] tbody tr[data-testid="table-row"] td:nth-child(${column})`).allInnerTexts();
const numbers = (texts: string[]) => texts.map((t) => Number(t.replace(/[^\d.]/g, '')));

describe('unusual readings', () => {
	it('filters, sorts and pages in the URL, each row linked to its head', async () => {
		const page = await signedIn('machinist');
		await page.goto(`${baseURL}/outliers`);
		await page.getByTestId('outlier-count').waitFor();
		const before = await page.getByTestId('outlier-count').innerText();
		await page.getByLabel('Side').selectOption('exhaust');
		await page.waitForURL((u) => u.searchParams.get('side') === 'exhaust');
		await page.waitForFunction((b) => document.querySelector('[data-testid="outlier-count"]')?.textContent?.trim() !== b, before.trim());
		const positions = await cellTexts(page, 'outliers-table', 3);
		expect(positions.length).toBeGreaterThan(0);
		for (const p of positions) expect(p).toMatch(/^Exhaust · cyl \d+ · valve \d+$/);
		// Every row says why, in words.
		const reasons = await page.getByTestId('reasons').first().innerText();
		expect(reasons).toMatch(/Above the limit|Below the limit|for the fleet|Far from the median/);

		await page.getByRole('link', { name: /^Value/ }).click();
		await page.waitForURL((u) => u.searchParams.get('sort') === '-value');
		await expect.poll(async () => page.locator('th[aria-sort="descending"]').innerText()).toMatch(/Value/);
		await expect.poll(async () => {
			const v = numbers(await cellTexts(page, 'outliers-table', 5));
			return v.length > 1 && v.every((x, i) => i === 0 || x <= v[i - 1]);
		}).toBe(true);
		await shot(page, 'tables-outliers');

		const next = page.getByRole('link', { name: 'Next' });
		if (await next.count()) {
			await next.click();
			await page.waitForURL((u) => u.searchParams.get('page') === '2' && u.searchParams.get('sort') === '-value');
			await page.getByText(/Page 2 of/).waitFor();
		}
		const link = page.locator('[data-testid="outliers-table"] tbody a').first();
		const href = await link.getAttribute('href');
		expect(href).toMatch(/^\/heads\/[0-9a-f-]{36}$/);
		await page.close();
	});

	it('says what is wrong with a bad filter in the URL', async () => {
		const page = await signedIn('engineer');
		await page.goto(`${baseURL}/outliers?side=left&sort=sideways`);
		await page.getByText('side must be one of: intake, exhaust').waitFor();
		await page.getByText(/Could not load the unusual readings: sort must be one of/).waitFor();
		await page.close();
	});
});

describe('failure rates', () => {
	it('shows each side with its interval and the test, and follows the chosen check', async () => {
		const page = await signedIn('machinist');
		await page.goto(`${baseURL}/rates`);
		await page.getByTestId('rates-by-side').waitFor();
		const sides = await cellTexts(page, 'rates-by-side', 1);
		expect(sides).toEqual(['Intake', 'Exhaust']);
		await page.getByTestId('side-difference').getByText(/Miettinen–Nurminen score test/).waitFor();
		expect(await page.getByTestId('side-difference').innerText()).toMatch(/p [=<] [\d.e-]+/);
		expect(await page.locator('[data-testid="rates-by-family"] tbody tr').count()).toBeGreaterThan(1);
		expect(await page.locator('[data-testid="rates-by-cylinder"] tbody tr').count()).toBeGreaterThan(1);
		await shot(page, 'tables-rates');

		const overall = await page.getByTestId('overall-rate').innerText();
		await page.getByLabel('Check', { exact: true }).selectOption('decision:replace_guide');
		await page.waitForURL((u) => u.searchParams.get('check') === 'decision:replace_guide');
		await page.getByText('Share of valve positions given a new guide').waitFor();
		await expect.poll(() => page.getByTestId('overall-rate').innerText()).not.toBe(overall);
		// A decision has no stage: the stage filter goes away.
		expect(await page.getByLabel('Stage').count()).toBe(0);

		// Sorting a client-side table: the family table by its intake rate.
		await page.locator('[data-testid="rates-by-family"] th', { hasText: 'Intake share' }).getByRole('button').click();
		await expect.poll(async () => page.locator('[data-testid="rates-by-family"] th[aria-sort="descending"], [data-testid="rates-by-family"] th[aria-sort="ascending"]').innerText()).toMatch(/Intake share/);
		await page.close();
	});
});

describe('explore and export', () => {
	it('filters the table in the URL and downloads exactly the filtered readings', async () => {
		const page = await signedIn('engineer');
		await page.goto(`${baseURL}/explore`);
		await page.getByTestId('readings-table').waitFor();
		const all = await page.getByTestId('reading-total').innerText();
		expect(numbers([all])[0]).toBe(await sqlCount('true'));

		await page.getByLabel('Measurement').selectOption('seat_width');
		await page.waitForURL((u) => u.searchParams.get('measurement') === 'seat_width');
		await page.getByLabel('Side').selectOption('intake');
		await page.waitForURL((u) => u.searchParams.get('side') === 'intake' && u.searchParams.get('measurement') === 'seat_width');
		await page.getByLabel('Family').selectOption('ALDER-4');
		await page.waitForURL((u) => u.searchParams.get('family') === 'ALDER-4');
		const want = await sqlCount(`r.measurement = 'seat_width' and r.side = 'intake' and f.code = 'ALDER-4'`);
		expect(want).toBeGreaterThan(0);
		await expect.poll(async () => numbers([await page.getByTestId('reading-total').innerText()])[0]).toBe(want);
		for (const m of await cellTexts(page, 'readings-table', 6)) expect(m).toBe('Seat width');

		await page.getByRole('link', { name: /^Value/ }).click();
		await page.waitForURL((u) => u.searchParams.get('sort') === '-value');
		await expect.poll(async () => {
			const v = numbers(await cellTexts(page, 'readings-table', 7));
			return v.length > 1 && v.every((x, i) => i === 0 || x <= v[i - 1]);
		}).toBe(true);
		await shot(page, 'tables-explore');

		const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('download-csv').click()]);
		expect(download.suggestedFilename()).toMatch(/^lapmark-readings-ALDER-4-seat_width-\d{4}-\d{2}-\d{2}\.csv$/);
		const parsed = Papa.parse<Record<string, string>>(readFileSync((await download.path())!, 'utf8'), { header: true, skipEmptyLines: true });
		expect(parsed.errors).toEqual([]);
		expect(parsed.data).toHaveLength(want);
		for (const r of parsed.data) expect([r.family, r.measurement, r.side]).toEqual(['ALDER-4', 'seat_width', 'intake']);

		const [json] = await Promise.all([page.waitForEvent('download'), page.getByTestId('download-json').click()]);
		const rows = JSON.parse(readFileSync((await json.path())!, 'utf8')) as unknown[];
		expect(rows).toHaveLength(want);

		await page.getByRole('button', { name: 'Clear' }).click();
		await page.waitForURL((u) => u.search === '?sort=-value');
		await page.close();
	});

	it('works without JavaScript as a GET form', async () => {
		const context = await browser.newContext({ javaScriptEnabled: false, viewport: { width: 1280, height: 900 } });
		const page = await context.newPage();
		await signInWithPassword(page, baseURL, people.engineer.email, people.engineer.password);
		await page.goto(`${baseURL}/explore`);
		await page.getByLabel('Stage').selectOption('final');
		await page.getByRole('button', { name: 'Apply' }).click();
		await page.waitForURL((u) => u.searchParams.get('stage') === 'final');
		await expect.poll(async () => numbers([await page.getByTestId('reading-total').innerText()])[0]).toBe(await sqlCount(`r.stage = 'final'`));
		await context.close();
	});

	it('is refused to a machinist, and not offered in the menu', async () => {
		const page = await signedIn('machinist');
		const res = await page.goto(`${baseURL}/explore`);
		expect(res?.status()).toBe(403);
		expect(await page.getByRole('link', { name: 'Explore and export' }).count()).toBe(0);
		await page.close();
	});
});

describe('the API guide', () => {
	it('lists every route with a curl line, and links the OpenAPI document', async () => {
		const page = await signedIn('engineer');
		await page.goto(`${baseURL}/api-guide`);
		const doc = await (await page.request.get(`${baseURL}/api/v1/openapi.json`)).json();
		const operations = Object.values(doc.paths as Record<string, object>).reduce((n: number, p) => n + Object.keys(p).length, 0);
		expect(await page.getByTestId('api-operation').count()).toBe(operations);
		const readings = page.locator('#get-api-v1-readings');
		expect(await readings.getByTestId('curl').innerText()).toMatch(/curl \\\s+-OJ \\\s+-H "Authorization: Bearer lmk_…" \\\s+"http:\/\/127\.0\.0\.1:\d+\/api\/v1\/readings\?family=ALDER-4&measurement=clearance/);
		await readings.getByText('sort', { exact: true }).first().waitFor();
		await shot(page, 'tables-api-guide');
		await page.close();
	});
});

describe('accessibility', () => {
	it('finds no serious or critical axe-core violation on the table pages, light or dark', async () => {
		const found: string[] = [];
		for (const colorScheme of ['light', 'dark'] as const) {
			const context = await browser.newContext({ viewport: { width: 1440, height: 1000 }, colorScheme });
			const page = await context.newPage();
			await signInWithPassword(page, baseURL, people.engineer.email, people.engineer.password);
			for (const [path, ready] of [
				['/outliers', 'outlier-count'],
				['/rates', 'rates-by-family'],
				['/explore?measurement=clearance', 'readings-table'],
				['/api-guide', 'api-operation']
			]) {
				await page.goto(`${baseURL}${path}`);
				await page.getByTestId(ready).first().waitFor();
				for (const v of await axeSerious(page)) found.push(`${colorScheme} ${path}: ${v.impact} ${v.id} (${v.help}) at ${v.nodes.map((n) => n.target.join(' ')).join(', ')}`);
			}
			if (colorScheme === 'dark') await shot(page, 'tables-api-guide-dark');
			await context.close();
		}
		expect(found).toEqual([]);
	});
});
