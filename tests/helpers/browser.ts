// Debian's chromium driven by playwright-core: never a browser download.
import { mkdirSync, readFileSync } from 'node:fs';
import { chromium, type Browser, type Page } from 'playwright-core';
import { afterAll, beforeAll } from 'vitest';

export const SCREENSHOTS = new URL('../e2e/screenshots/', import.meta.url).pathname;

export async function launch(): Promise<Browser> {
	return chromium.launch({
		executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
		args: [
			'--headless',
			'--no-sandbox',
			'--disable-gpu',
			'--disable-quic',
			'--no-first-run',
			'--disable-background-networking',
			'--disable-component-update',
			'--disable-sync'
		]
	});
}

/** One chromium for a test file, launched before its tests and closed after them; call it at the
 * file's top level and use `.browser` inside the tests. */
export function sharedBrowser(): { readonly browser: Browser } {
	const holder = {} as { browser: Browser };
	beforeAll(async () => {
		holder.browser = await launch();
	});
	afterAll(async () => {
		await holder.browser?.close();
	});
	return holder;
}

export async function shot(page: Page, name: string) {
	mkdirSync(SCREENSHOTS, { recursive: true });
	await page.screenshot({ path: `${SCREENSHOTS}${name}.png`, fullPage: true });
}

export async function signInWithPassword(page: Page, baseURL: string, email: string, password: string) {
	await page.goto(`${baseURL}/signin`);
	await page.getByLabel('E-mail address').fill(email);
	await page.getByLabel('Password').fill(password);
	await page.getByRole('button', { name: 'Sign in' }).click();
	await page.waitForURL((url) => !url.pathname.startsWith('/signin'));
}

/** Charts and lists on the page have settled: nothing loading, and none in an error state. */
export async function chartsSettled(page: Page, timeout = 30_000) {
	await page.waitForFunction(() => document.querySelectorAll('[data-state="loading"],[aria-busy="true"]').length === 0, null, { timeout });
	const errors = await page.locator('[data-state="error"]').allTextContents();
	if (errors.length) throw new Error(`charts in an error state on ${page.url()}: ${errors.join(' | ')}`);
}

export interface AxeViolation {
	id: string;
	impact: string | null;
	help: string;
	nodes: { target: string[] }[];
}

/**
 * axe-core (Deque's accessibility rules engine, from the npm registry) run in the page against
 * WCAG 2.x A and AA; returns the serious and critical violations.
 */
export async function axeSerious(page: Page): Promise<AxeViolation[]> {
	if (!(await page.evaluate(() => 'axe' in window))) {
		// Evaluated through the debugging protocol, so the page's content security policy (which
		// refuses inline scripts) does not apply to the test's own tool.
		await page.evaluate(readFileSync(new URL('../../node_modules/axe-core/axe.min.js', import.meta.url), 'utf8'));
	}
	const violations = await page.evaluate(async () => {
		// @ts-expect-error injected above
		const r = await window.axe.run(document, { runOnly: { type: 'tag', values: ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'] } });
		return r.violations.map((v: AxeViolation) => ({ id: v.id, impact: v.impact, help: v.help, nodes: v.nodes.slice(0, 5).map((n) => ({ target: n.target })) }));
	});
	return (violations as AxeViolation[]).filter((v) => v.impact === 'serious' || v.impact === 'critical');
}
