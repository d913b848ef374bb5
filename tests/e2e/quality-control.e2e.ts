// The control charts of the rework-quality page in a real browser, as a quality engineer and a
// machinist of the demo shop see them: dates on the x axis, limits from a baseline (clipped at
// 100 % for a vacuum hold), the run rules chosen and every point that breaks one listed by rule,
// the recompute form (refused input changes nothing; a good period is stored and audited), the
// EWMA and the p-chart, on a 10-inch tablet and a laptop screen without sideways scrolling.
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { demoSignIns } from '../../src/lib/server/demo/generate';
import { withSystem } from '../../src/lib/server/db/scope';
import { raw, testDb } from '../helpers/db';
import { chartsSettled, launch, shot, signInWithPassword } from '../helpers/browser';

const baseURL = inject('baseURL');
const { db, sql } = testDb();
const people = Object.fromEntries(demoSignIns().filter((s) => s.shop === 'brackenford').map((s) => [s.role, s]));
let browser: Browser;
let shopId: string;

const PATH = '/quality?family=BIRCH-6&side=exhaust&measurement=vacuum_hold';

beforeAll(async () => {
	browser = await launch();
	const rows = await withSystem(db, (tx) => tx.execute<{ id: string }>(raw`select id from shops where slug = 'brackenford'`));
	shopId = rows[0].id;
});
afterAll(async () => {
	await browser?.close();
	await sql.end();
});

async function signedIn(role: string, width: number, height: number): Promise<Page> {
	const page = await browser.newPage({ viewport: { width, height } });
	page.on('pageerror', (e) => console.error('[page error]', e.message));
	await signInWithPassword(page, baseURL, people[role].email, people[role].password);
	return page;
}

async function open(page: Page, path: string) {
	const res = await page.goto(`${baseURL}${path}`);
	expect(res?.status(), path).toBe(200);
	await chartsSettled(page);
}

/** In the shop's scope: a SQL query's rows. */
async function inShop<T extends Record<string, unknown>>(query: string): Promise<T[]> {
	const rows = await sql.begin(async (t) => {
		await t`select set_config('lapmark.shop_id', ${shopId}, true)`;
		return t.unsafe(query);
	});
	return rows as unknown as T[];
}

const noSideways = (page: Page) => page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);

describe('control charts on the quality page', () => {
	for (const [width, height] of [
		[1024, 768],
		[1366, 900]
	] as const) {
		it(`dates on the x axis, limits clipped at 100 %, rules listed by rule, EWMA and p-chart, at ${width}×${height}`, async () => {
			const page = await signedIn('engineer', width, height);
			try {
				await open(page, PATH);
				const ichart = page.getByTestId('control-i');
				// The x axis is dates ("14 Mar 25"), not reading numbers.
				const ticks = await ichart.locator('.chart-area svg text').allTextContents();
				expect(ticks.filter((t) => /^\d{1,2} [A-Z][a-z]{2} \d{2}$/.test(t.trim())).length).toBeGreaterThanOrEqual(2);
				expect(ticks).toContain('Date measured (UTC)');
				// The first 100 final exhaust holds of BIRCH-6 give x̄ + 3σ above 100 %: drawn at 100, said so.
				expect((await page.getByTestId('baseline-source').textContent())?.trim()).toMatch(/^Where the limits come from: The first 100 readings of the series \(\d{4}-\d{2}-\d{2} to \d{4}-\d{2}-\d{2}\); no baseline period has been chosen/);
				expect(await ichart.getByTestId('clipped').textContent()).toMatch(/upper limit clipped at 100\.0, the most it can be; x̄ \+ 3σ would be 103\.06/);
				expect(ticks).toContain('upper limit clipped at the physical bound');
				// The Western Electric rules by default, each with its count.
				expect((await ichart.getByTestId('rule-summary').innerText()).replace(/\s+/g, ' ')).toBe('WE 1: 3 points WE 2: none WE 3: none WE 4: 1 point');
				expect(await ichart.locator('[data-mark="beyond"]').count()).toBe(3);
				expect(await ichart.locator('[data-mark="rule"]').count()).toBe(1);

				// Choosing Nelson 7 adds it to the URL and to the list.
				await page.getByRole('checkbox', { name: 'Nelson 7' }).check();
				await page.waitForURL((u) => u.searchParams.get('rules') === 'we1,we2,we3,we4,n7');
				await chartsSettled(page);
				expect((await ichart.getByTestId('rule-summary').innerText()).replace(/\s+/g, ' ')).toBe('WE 1: 3 points WE 2: none WE 3: none WE 4: 1 point Nelson 7: 3 points');

				// The table view lists every point that breaks a rule, by rule.
				await ichart.getByRole('button', { name: 'Table' }).click();
				const breaks = ichart.getByTestId('rule-breaks');
				expect(await breaks.locator('dt').allTextContents()).toEqual([
					'WE 1 — One point beyond 3σ (outside the control limits) (3)',
					'WE 4 — Eight points in a row on the same side of the centre line (1)',
					'Nelson 7 — Fifteen points in a row within 1σ of the centre line (either side) (3)'
				]);
				expect((await breaks.locator('dd').first().textContent())?.split(' · ')).toHaveLength(3);

				// EWMA of final clearance and the p-chart of positions outside the limits.
				const ewma = page.getByTestId('control-ewma');
				expect(await ewma.locator('[data-state="ready"]').count()).toBe(1);
				expect(await ewma.textContent()).toContain('λ = 0.2, L = 3');
				const p = page.getByTestId('control-p');
				expect(await p.locator('[data-state="ready"]').count()).toBe(1);
				expect(await p.textContent()).toMatch(/3 of 150 positions outside · p̄ 2\.0 %/);
				expect((await p.locator('.chart-area svg text').allTextContents()).some((t) => /^\d{1,2} [A-Z][a-z]{2} \d{2}$/.test(t.trim()))).toBe(true);

				expect(await noSideways(page), 'sideways scroll').toBeLessThanOrEqual(0);
				await shot(page, `quality-control-${width}`);
			} finally {
				await page.close();
			}
		});
	}

	it('an engineer recomputes the limits from a period: refused input changes nothing, a good period is stored and audited', async () => {
		const page = await signedIn('engineer', 1366, 900);
		try {
			await open(page, '/quality?family=BIRCH-6&side=intake&measurement=seat_width');
			const form = page.getByTestId('control-baseline');
			await form.getByLabel('Baseline from', { exact: true }).fill('2026-06-01');
			await form.getByLabel('to', { exact: true }).fill('2026-01-01');
			await form.getByRole('button', { name: 'Recompute limits' }).click();
			await expect.poll(async () => (await form.getByTestId('baseline-message').textContent())?.trim()).toBe('from must not be after to');
			expect(await inShop(`select 1 from control_baselines`)).toEqual([]);

			const [{ n }] = await inShop<{ n: number }>(`
				select count(*)::int as n from readings r join families f on f.id = r.family_id
				where f.code = 'BIRCH-6' and r.measurement = 'seat_width' and r.stage = 'final' and r.side = 'intake'
					and r.measured_at >= '2025-01-01' and r.measured_at < '2026-07-01'`);
			expect(n).toBeGreaterThanOrEqual(20);
			await form.getByLabel('Baseline from', { exact: true }).fill('2025-01-01');
			await form.getByLabel('to', { exact: true }).fill('2026-06-30');
			await form.getByRole('button', { name: 'Recompute limits' }).click();
			await expect.poll(async () => (await form.getByTestId('baseline-message').textContent())?.trim()).toBe(`Control limits recomputed from ${n} readings of 2025-01-01 to 2026-06-30.`);
			await chartsSettled(page);
			await expect.poll(async () => (await page.getByTestId('baseline-source').textContent())?.trim()).toMatch(new RegExp(`^Where the limits come from: Readings of 2025-01-01 to 2026-06-30 \\(${n}\\), chosen by .+ on \\d{4}-\\d{2}-\\d{2}\\. Centre`));
			const stored = await inShop<{ n: number; from_day: string }>(`select n, from_day::text from control_baselines`);
			expect(stored).toEqual([{ n, from_day: '2025-01-01' }]);
			const audits = await inShop<{ action: string; actor_label: string }>(`select action, actor_label from audit_log where entity = 'control_baseline'`);
			expect(audits).toEqual([{ action: 'create', actor_label: people.engineer.email }]);

			// The API says where the limits come from, whatever window is asked for.
			const a = await page.request.get(`${baseURL}/api/v1/stats/control?family=BIRCH-6&side=intake&measurement=seat_width&limit=50`);
			const b = await page.request.get(`${baseURL}/api/v1/stats/control?family=BIRCH-6&side=intake&measurement=seat_width&limit=1000`);
			const [ja, jb] = [await a.json(), await b.json()];
			expect(ja.baseline).toMatchObject({ source: 'stored', from: '2025-01-01', to: '2026-06-30', n });
			expect([ja.centre, ja.ucl, ja.lcl]).toEqual([jb.centre, jb.ucl, jb.lcl]);
			await shot(page, 'quality-control-recomputed');
		} finally {
			await page.close();
		}
	});

	it('a machinist sees the charts but not the recompute form, and may not post it', async () => {
		const page = await signedIn('machinist', 1024, 768);
		try {
			await open(page, PATH);
			expect(await page.getByRole('button', { name: 'Recompute limits' }).count()).toBe(0);
			expect(await page.getByTestId('control-baseline').textContent()).toContain('An engineer can recompute the limits from a chosen period');
			const res = await page.request.post(`${baseURL}/quality?/baseline`, {
				form: { family: 'BIRCH-6', side: 'exhaust', measurement: 'vacuum_hold', from: '2025-01-01', to: '2026-06-30' },
				headers: { origin: baseURL, 'x-sveltekit-action': 'true' }
			});
			expect(res.status()).toBe(403);
			expect(await inShop(`select 1 from control_baselines where measurement = 'vacuum_hold'`)).toEqual([]);
			expect(await noSideways(page)).toBeLessThanOrEqual(0);
		} finally {
			await page.close();
		}
	});
});
