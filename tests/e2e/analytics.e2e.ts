// The analysis screens in a real browser, as each role of the demo shop: every page opens, every
// chart renders with data (no error states), filters live in the URL, a reading is checked by
// keyboard alone, and no page has a serious or critical accessibility violation (axe-core).
// Screenshots land in tests/e2e/screenshots/ for a person to look at.
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { BrowserContext, Page } from 'playwright-core';
import { axeSerious, chartsSettled, sharedBrowser, shot, signInWithPassword } from '../helpers/browser';

const baseURL = inject('baseURL');
const shared = sharedBrowser();

async function signedIn(role: string, opts: { width?: number; dark?: boolean } = {}): Promise<{ context: BrowserContext; page: Page }> {
	const context = await shared.browser.newContext({ viewport: { width: opts.width ?? 1440, height: 1000 }, colorScheme: opts.dark ? 'dark' : 'light' });
	const page = await context.newPage();
	page.on('pageerror', (e) => console.error(`[page error as ${role}]`, e.message));
	await signInWithPassword(page, baseURL, `${role}@brackenford.example`, `brackenford-${role}-demo`);
	return { context, page };
}

/** Opens a page and waits until every chart and list on it has data or says it has none. */
async function open(page: Page, path: string) {
	const res = await page.goto(`${baseURL}${path}`);
	expect(res?.status(), path).toBe(200);
	await chartsSettled(page);
}

const ANALYSIS_PAGES = ['/', '/check', '/fleet', '/fleet/ALDER-4', '/quality'];

describe('every analysis page, as each role that may open it', () => {
	for (const role of ['owner', 'engineer', 'machinist'] as const) {
		it(`renders every chart with data, as ${role}`, async () => {
			const { context, page } = await signedIn(role);
			try {
				for (const path of ANALYSIS_PAGES) {
					await open(page, path);
					// A chart that is ready shows an SVG with marks in it.
					const ready = page.locator('.chart-area[data-state="ready"]');
					if (path !== '/check') expect(await ready.count(), `charts on ${path}`).toBeGreaterThan(0);
					for (const chart of await ready.all()) {
						if ((await chart.locator('svg').count()) === 0) continue; // a verdict card, not a drawing
						expect(await chart.locator('svg rect, svg circle, svg path, svg line').count(), `marks on ${path}`).toBeGreaterThan(0);
					}
					await shot(page, `analysis-${role}-${path === '/' ? 'overview' : path.slice(1).replaceAll('/', '-')}`);
				}
			} finally {
				await context.close();
			}
		});
	}

	it('shows a viewer the overview, without imports, and refuses the analysis pages', async () => {
		const { context, page } = await signedIn('viewer');
		try {
			await open(page, '/');
			expect(await page.getByTestId('overview-imports').count()).toBe(0);
			expect(await page.getByTestId('failing-intake').textContent()).toMatch(/\d+\.\d %/);
			await shot(page, 'analysis-viewer-overview');
			for (const path of ['/check', '/fleet', '/quality']) {
				const res = await page.goto(`${baseURL}${path}`);
				expect(res?.status(), path).toBe(403);
			}
			expect(await page.getByRole('link', { name: 'Check a reading' }).count()).toBe(0);
		} finally {
			await context.close();
		}
	});

	it('announces the overview requests in the head and fetches each once, taking the preloaded answer', async () => {
		const { context, page } = await signedIn('owner');
		try {
			await open(page, '/');
			const preloads = await page.locator('head link[rel="preload"][as="fetch"]').evaluateAll((links) => links.map((l) => new URL((l as HTMLLinkElement).href).pathname + new URL((l as HTMLLinkElement).href).search));
			expect(preloads.map((p) => p.split('?')[0]).sort()).toEqual(['/api/v1/overview', '/api/v1/stats/comebacks', '/api/v1/stats/compare', '/api/v1/stats/outliers', '/api/v1/stats/rates']);
			// A preload the page's fetch did not match would show as a second request for the same URL.
			const fetched = await page.evaluate(() => performance.getEntriesByType('resource').map((r) => new URL(r.name)).filter((u) => u.pathname.startsWith('/api/')).map((u) => u.pathname + u.search));
			expect(fetched.sort()).toEqual([...preloads].sort());
		} finally {
			await context.close();
		}
	});
});

describe('filters in the URL', () => {
	it('changes the family page with the measurement and stage, and the URL with them', async () => {
		const { context, page } = await signedIn('engineer');
		try {
			await open(page, '/fleet/ALDER-4');
			const title = page.getByTestId('hist-intake').locator('h2');
			expect(await title.textContent()).toMatch(/stem-to-guide clearance, as received/i);
			await page.getByLabel('Measurement').selectOption('seat_width');
			await page.waitForURL(/measurement=seat_width/);
			await page.getByLabel('Stage').selectOption('final');
			await page.waitForURL(/stage=final/);
			await chartsSettled(page);
			expect(await title.textContent()).toMatch(/seat width, final/i);
			// The table view holds the same bins as the chart.
			await page.getByTestId('hist-intake').getByRole('button', { name: 'Table' }).click();
			const rows = await page.getByTestId('hist-intake').locator('tbody tr').count();
			expect(rows).toBeGreaterThan(4);
			// The address can be shared: a fresh page with it shows the same selection.
			const url = page.url();
			await page.goto(url);
			await chartsSettled(page);
			expect(await page.getByLabel('Measurement').inputValue()).toBe('seat_width');
			expect(await title.textContent()).toMatch(/seat width, final/i);
			await shot(page, 'analysis-family-seat-width-final');
		} finally {
			await context.close();
		}
	});

	it('compares families for the side chosen, and links each to its page', async () => {
		const { context, page } = await signedIn('machinist');
		try {
			await open(page, '/fleet');
			expect(await page.getByTestId('compare').locator('h2').textContent()).toMatch(/^Exhaust/);
			await page.getByLabel('Side').selectOption('intake');
			await page.waitForURL(/side=intake/);
			await chartsSettled(page);
			expect(await page.getByTestId('compare').locator('h2').textContent()).toMatch(/^Intake/);
			await page.getByTestId('compare').getByRole('button', { name: 'Table' }).click();
			const links = page.getByTestId('compare').locator('tbody a');
			expect(await links.count()).toBeGreaterThan(3);
			await links.first().click();
			await page.waitForURL(/\/fleet\/[A-Z]/);
			await chartsSettled(page);
		} finally {
			await context.close();
		}
	});
});

describe('check a reading at the bench', () => {
	it('gives the verdict, percentile and decision by keyboard alone, in inches, and remembers the choices', async () => {
		const { context, page } = await signedIn('machinist', { width: 1024 });
		try {
			await open(page, '/check');
			// The value field has the focus; Shift+Tab walks back through the choices.
			expect(await page.evaluate(() => document.activeElement?.getAttribute('name'))).toBe('value');
			await page.getByLabel('Engine family').selectOption('ALDER-4');
			await page.getByLabel('Value').focus();
			await page.keyboard.press('Shift+Tab'); // the measurement
			await page.keyboard.press('Shift+Tab'); // the stage group
			await page.keyboard.press('Shift+Tab'); // the side group
			await page.keyboard.press('ArrowRight'); // exhaust
			expect(await page.locator('input[name="side"]:checked').getAttribute('value')).toBe('exhaust');
			await page.getByLabel('Value').focus();
			await page.keyboard.press('Tab'); // the unit group (mm)
			await page.keyboard.press('ArrowRight'); // inches
			expect(await page.locator('input[name="unit"]:checked').getAttribute('value')).toBe('in');
			await page.getByLabel('Value').focus();
			// 0.0079 in = 0.20066 mm: beyond ALDER-4's exhaust service limit of 0.12 mm (demo limits).
			await page.keyboard.type('0.0079');
			await page.keyboard.press('Enter');
			const verdict = page.getByTestId('verdict');
			await verdict.waitFor();
			await page.waitForFunction(() => document.querySelector('[data-testid="verdict"]')?.textContent?.includes('0.201'));
			expect(await verdict.getAttribute('data-tone')).toBe('bad');
			expect(await verdict.textContent()).toMatch(/Over the limit/);
			expect(await verdict.textContent()).toMatch(/entered 0\.0079 in/);
			expect(Number(await page.getByTestId('percentile').textContent())).toBeGreaterThan(90);
			expect(await page.getByTestId('suggestion').textContent()).toMatch(/Replace the guide/);
			await chartsSettled(page);
			expect(await page.getByTestId('check-distribution').locator('svg text', { hasText: 'this reading' }).count()).toBe(1);
			expect(page.url()).toMatch(/value=0\.0079/);
			await shot(page, 'analysis-check-over-limit-tablet');

			// A value inside the limits and the fleet's range.
			await page.getByLabel('Value').fill('0.0028');
			await page.waitForFunction(() => document.querySelector('[data-testid="verdict"]')?.textContent?.includes('0.071'));
			expect(await verdict.getAttribute('data-tone')).toBe('ok');

			// The choices are remembered on the next visit.
			await page.goto(`${baseURL}/check`);
			expect(await page.getByLabel('Engine family').inputValue()).toBe('ALDER-4');
			expect(await page.locator('input[name="side"]:checked').getAttribute('value')).toBe('exhaust');
			expect(await page.locator('input[name="unit"]:checked').getAttribute('value')).toBe('in');
		} finally {
			await context.close();
		}
	});

	it('answers without JavaScript too, from the form sent to the server', async () => {
		const context = await shared.browser.newContext({ javaScriptEnabled: false });
		const page = await context.newPage();
		try {
			await signInWithPasswordNoJs(page);
			await page.goto(`${baseURL}/check?family=ALDER-4&side=intake&stage=as_received&measurement=clearance&value=0.5&unit=mm`);
			expect(await page.getByTestId('verdict').textContent()).toMatch(/Over the limit/);
			await page.goto(`${baseURL}/check?family=ALDER-4&side=intake&stage=as_received&measurement=clearance&value=abc&unit=mm`);
			expect(await page.getByTestId('check-problem').textContent()).toMatch(/value must be a number/);
		} finally {
			await context.close();
		}
	});
});

/** The sign-in form posts without scripts as well. */
async function signInWithPasswordNoJs(page: Page) {
	await page.goto(`${baseURL}/signin`);
	await page.getByLabel('E-mail address').fill('machinist@brackenford.example');
	await page.getByLabel('Password').fill('brackenford-machinist-demo');
	await page.getByRole('button', { name: 'Sign in' }).click();
	await page.waitForURL((url) => !url.pathname.startsWith('/signin'));
}

describe('look and accessibility', () => {
	// One context per theme, one test per page (each with its own time limit).
	const A11Y_PAGES = [...ANALYSIS_PAGES, '/check?family=ALDER-4&side=exhaust&stage=as_received&measurement=clearance&value=0.2&unit=mm', '/heads', '/imports', '/families', '/instruments', '/audit', '/settings/tokens', '/settings/members', '/heads/new'];
	for (const dark of [false, true]) {
		describe(dark ? 'dark theme' : 'light theme', () => {
			let context: BrowserContext;
			let page: Page;
			beforeAll(async () => {
				({ context, page } = await signedIn('owner', { dark }));
			});
			afterAll(async () => {
				await context?.close();
			});
			it('has no serious or critical axe-core violation on the sign-in pages', async () => {
				const anon = await shared.browser.newContext({ colorScheme: dark ? 'dark' : 'light' });
				try {
					const p = await anon.newPage();
					const found: string[] = [];
					for (const path of ['/signin', '/signin/forgot']) {
						expect((await p.goto(`${baseURL}${path}`))?.status()).toBe(200);
						for (const v of await axeSerious(p)) found.push(`${path}: ${v.impact} ${v.id} (${v.help}) at ${v.nodes.map((n) => n.target.join(' ')).join(', ')}`);
					}
					expect(found).toEqual([]);
				} finally {
					await anon.close();
				}
			});
			it('has no serious or critical axe-core violation on a head and its pages', async () => {
				await open(page, '/heads');
				const href = await page.locator('[data-testid="head-row"] a').first().getAttribute('href');
				expect(href).toMatch(/^\/heads\/[0-9a-f-]{36}$/);
				const found: string[] = [];
				for (const path of [href!, `${href}/entry/as-received`, `${href}/entry/final`, `${href}/decisions`, `${href}/report`]) {
					await open(page, path);
					for (const v of await axeSerious(page)) found.push(`${path}: ${v.impact} ${v.id} (${v.help}) at ${v.nodes.map((n) => n.target.join(' ')).join(', ')}`);
				}
				expect(found).toEqual([]);
			});
			for (const path of A11Y_PAGES) {
				it(`has no serious or critical axe-core violation on ${path}`, async () => {
					await open(page, path);
					const found = (await axeSerious(page)).map((v) => `${v.impact} ${v.id} (${v.help}) at ${v.nodes.map((n) => n.target.join(' ')).join(', ')}`);
					expect(found).toEqual([]);
					if (dark && path === '/settings/members') await shot(page, 'analysis-dark-members');
				});
			}
		});
	}

	it('keeps the charts and their tables on paper', async () => {
		const { context, page } = await signedIn('engineer');
		try {
			await open(page, '/fleet/ALDER-4');
			await page.emulateMedia({ media: 'print' });
			expect(await page.locator('aside').isVisible()).toBe(false);
			expect(await page.locator('.print-only table').first().isVisible()).toBe(true);
			expect(await page.locator('.chart-area svg').first().isVisible()).toBe(true);
			await shot(page, 'analysis-family-print');
		} finally {
			await context.close();
		}
	});
});
