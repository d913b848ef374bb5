// Rates that read right, and the first-pass yield, on the demo shop: over HTTP, every family ×
// check's intake-vs-exhaust verdict, interval and p agree (the Miettinen–Nurminen test and the
// interval that inverts it, Miettinen & Nurminen 1985) and no p is 0; in a real browser at
// 1024×768 and 1366×900, the rates page words each check as what it counts, names its stage,
// gives differences in points, and neither it nor the rework-quality page with its first-pass
// panel scrolls sideways.
import type { Page } from 'playwright-core';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { demoSignIns } from '../../src/lib/server/demo/generate';
import { DECISION_KINDS, MEASUREMENTS, STAGES } from '../../src/lib/measurements';
import { chartsSettled, sharedBrowser, shot, signInWithPassword } from '../helpers/browser';
import { Client } from '../helpers/http';

const baseURL = inject('baseURL');
const people = Object.fromEntries(demoSignIns().filter((s) => s.shop === 'brackenford').map((s) => [s.role, s]));
const api = new Client(baseURL);
const held = sharedBrowser();

type Difference = { difference: number | null; ci95: { low: number | null; high: number | null }; p: number | null; pBelow: boolean; verdict: string; method: string };

beforeAll(async () => {
	const res = await api.signIn(people.engineer.email, people.engineer.password);
	expect(res.status).toBeLessThan(400);
});

async function get<T>(path: string): Promise<T> {
	const res = await api.request('GET', path, { headers: { accept: 'application/json' } });
	expect(res.status, path).toBe(200);
	return (await res.json()) as T;
}

/** The verdict a difference's interval gives, and whether p says the same. */
function disagreement(where: string, d: Difference): string | null {
	const { low, high } = d.ci95;
	if (low === null || high === null || d.p === null) return `${where}: missing interval or p`;
	if (!(d.p > 0 && d.p <= 1)) return `${where}: p = ${d.p}`;
	const excludes = low > 0 || high < 0;
	const expected = low > 0 ? 'intake_higher' : high < 0 ? 'exhaust_higher' : 'not_clearly_different';
	if (d.verdict !== expected) return `${where}: verdict ${d.verdict} beside ${low}..${high}`;
	if (excludes !== d.p < 0.05) return `${where}: p = ${d.p} beside ${low}..${high}`;
	if (d.method !== 'miettinen_nurminen') return `${where}: method ${d.method}`;
	return null;
}

describe('rates over HTTP on the demo shop', () => {
	it('verdict, interval and p agree for every family × check, and no p is 0', async () => {
		const checks = [...MEASUREMENTS.flatMap((m) => STAGES.map((s) => `check=${m}&stage=${s}`)), ...DECISION_KINDS.map((d) => `check=decision:${d}`)];
		const wrong: string[] = [];
		let compared = 0;
		let excluding = 0;
		for (const q of checks) {
			const r = await get<{ sideDifference: Difference | null; families: { family: { code: string }; sideDifference: Difference | null }[] }>(`/api/v1/stats/rates?${q}`);
			for (const [where, d] of [[`${q} all`, r.sideDifference] as const, ...r.families.map((f) => [`${q} ${f.family.code}`, f.sideDifference] as const)]) {
				if (!d) continue;
				compared++;
				if ((d.ci95.low ?? 0) > 0 || (d.ci95.high ?? 0) < 0) excluding++;
				const w = disagreement(where, d);
				if (w) wrong.push(w);
			}
		}
		expect(wrong).toEqual([]);
		// The demo has both kinds: differences clear of 0 and ones that are not.
		expect(compared).toBeGreaterThan(50);
		expect(excluding).toBeGreaterThan(0);
		expect(excluding).toBeLessThan(compared);
	});

	it('says which stage it judged: named, or the default and that it was the default', async () => {
		type Check = { check: { stage: string; stageDefaulted: boolean } };
		expect((await get<Check>('/api/v1/stats/rates?check=clearance')).check).toEqual({ kind: 'measurement', measurement: 'clearance', stage: 'as_received', stageDefaulted: true });
		expect((await get<Check>('/api/v1/stats/rates?check=vacuum_hold')).check).toMatchObject({ stage: 'final', stageDefaulted: true });
		expect((await get<Check>('/api/v1/stats/rates?check=clearance&stage=final')).check).toMatchObject({ stage: 'final', stageDefaulted: false });
	});

	it('first-pass yield: fewer heads pass first time than have a final check (the demo retests 2–3 % of seal tests)', async () => {
		type Cell = { heads: number; passed: number; rate: number | null; ci95: { low: number | null; high: number | null } };
		const y = await get<{ overall: Cell; families: (Cell & { family: { code: string }; byMachinist: (Cell & { machinist: string })[] })[]; byMachinist: (Cell & { machinist: string })[] }>(
			'/api/v1/stats/first-pass'
		);
		expect(y.overall.heads).toBeGreaterThan(0);
		expect(y.overall.passed).toBeLessThan(y.overall.heads);
		expect(y.families.reduce((s, f) => s + f.heads, 0)).toBe(y.overall.heads);
		expect(y.byMachinist.reduce((s, m) => s + m.heads, 0)).toBe(y.overall.heads);
		for (const f of y.families) {
			expect(f.byMachinist.reduce((s, m) => s + m.passed, 0)).toBe(f.passed);
			expect(f.ci95.low as number).toBeLessThanOrEqual(f.rate as number);
			expect(f.ci95.high as number).toBeGreaterThanOrEqual(f.rate as number);
		}
	});
});

const VIEWPORTS = [
	{ width: 1024, height: 768 },
	{ width: 1366, height: 900 }
];

async function noSidewaysScroll(page: Page, where: string) {
	const overflow = await page.evaluate(() => {
		const doc = document.documentElement;
		const out: string[] = [];
		if (doc.scrollWidth > doc.clientWidth) out.push(`page ${doc.scrollWidth} > ${doc.clientWidth}`);
		for (const el of document.querySelectorAll<HTMLElement>('.overflow-x-auto')) {
			if (el.offsetParent !== null && el.scrollWidth > el.clientWidth + 1) out.push(`${el.dataset.testid ?? el.className} ${el.scrollWidth} > ${el.clientWidth}`);
		}
		return out;
	});
	expect(overflow, where).toEqual([]);
}

describe('the rates page and the first-pass panel as a person sees them', () => {
	for (const viewport of VIEWPORTS) {
		it(`at ${viewport.width}×${viewport.height}: checks worded as what they count, the stage named, points, no sideways scroll`, async () => {
			const page = await held.browser.newPage({ viewport });
			page.on('pageerror', (e) => console.error('[page error]', e.message));
			await signInWithPassword(page, baseURL, people.machinist.email, people.machinist.password);

			await page.goto(`${baseURL}/rates`);
			await page.getByTestId('rates-by-family').waitFor();
			// The stage is named, with no "any" choice that would silently mean as received.
			const stage = page.getByLabel('Stage');
			expect(await stage.inputValue()).toBe('as_received');
			expect(await stage.locator('option', { hasText: /^any$/ }).count()).toBe(0);
			await page.getByText('at the as received check', { exact: false }).first().waitFor();
			const outside = await page.getByTestId('side-difference').innerText();
			expect(outside).toMatch(/Intake minus exhaust: [+−]?\d+\.\d points \(95 % interval [+−]?\d+\.\d to [+−]?\d+\.\d points\)/);
			expect(outside).toMatch(/Miettinen–Nurminen score test/);
			expect(outside).not.toMatch(/p = 0(\.0+)?\b(?!\.\d*[1-9])/);
			await noSidewaysScroll(page, `/rates ${viewport.width}`);
			await shot(page, `rates-read-right-${viewport.width}`);

			// A decision check counts positions given that decision, not failures.
			await page.getByLabel('Check', { exact: true }).selectOption('decision:reuse');
			await page.waitForURL((u) => u.searchParams.get('check') === 'decision:reuse');
			await expect.poll(() => page.getByTestId('side-difference').innerText()).toMatch(/reused as is more often|not clearly different/);
			const reuse = await page.getByTestId('side-difference').innerText();
			expect(reuse).not.toMatch(/fail/i);
			expect((await page.locator('[data-testid="rates-by-side"] th').allInnerTexts()).map((t) => t.split('\n')[0].trim())).toContain('Reused as is');
			// The verdict on screen follows the interval beside it.
			const verdict = await page.getByTestId('side-difference').getAttribute('data-verdict');
			const [low, high] = [...reuse.matchAll(/([+−]?\d+\.\d) to ([+−]?\d+\.\d) points/g)][0].slice(1).map((s) => Number(s.replace('−', '-')));
			expect(verdict).toBe(low > 0 ? 'intake_higher' : high < 0 ? 'exhaust_higher' : 'not_clearly_different');
			for (const cell of await page.locator('[data-testid="rates-by-family"] [data-verdict]').allInnerTexts()) {
				expect(cell).toMatch(/points/);
				expect(cell).toMatch(/p [=<] /);
			}
			await noSidewaysScroll(page, `/rates decision ${viewport.width}`);

			// The rework-quality page with the first-pass yield beside capability and control.
			await page.goto(`${baseURL}/quality`);
			await page.getByTestId('first-pass-families').waitFor();
			await chartsSettled(page);
			const card = page.getByTestId('first-pass-families');
			await card.getByRole('button', { name: 'Table' }).click();
			const rows = await card.locator('tbody tr').allInnerTexts();
			expect(rows.length).toBeGreaterThan(1);
			for (const r of rows) expect(r).toMatch(/\d+\.\d % – \d+\.\d %/);
			const machinists = page.getByTestId('first-pass-machinists');
			await machinists.getByRole('button', { name: 'Table' }).click();
			expect(await machinists.locator('tbody tr').count()).toBeGreaterThan(0);
			await noSidewaysScroll(page, `/quality ${viewport.width}`);
			await shot(page, `quality-first-pass-${viewport.width}`);
			await page.close();
		});
	}
});
