// Debian's chromium driven by playwright-core: never a browser download.
import { mkdirSync } from 'node:fs';
import { chromium, type Browser, type Page } from 'playwright-core';

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
