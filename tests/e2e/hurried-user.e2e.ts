// What a hurried person does, in a real browser: a mileage with a thousands comma, a negative
// one, a limit typed in inches; the audit trail's sentence for that limit; a new API token
// copied with one click and used.
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { launch, shot, signInWithPassword } from '../helpers/browser';

const baseURL = inject('baseURL');
const serial = `TYPED-${Date.now().toString(36).toUpperCase()}`;
let browser: Browser;

beforeAll(async () => {
	browser = await launch();
});
afterAll(async () => {
	await browser?.close();
});

describe('numbers as typed', () => {
	it('refuses a negative mileage in words, keeps the text, and reads "142,350" miles as 229,090 km', async () => {
		const page = await browser.newPage({ viewport: { width: 1024, height: 768 } });
		await signInWithPassword(page, baseURL, 'machinist@brackenford.example', 'brackenford-machinist-demo');
		await page.goto(`${baseURL}/heads/new`);
		await page.getByLabel('Serial or casting number').fill(serial);
		const family = await page.locator('#familyId option', { hasText: 'CEDAR-V8' }).getAttribute('value');
		await page.locator('#familyId').selectOption(family!);
		await page.getByLabel('Customer', { exact: true }).fill('Invented Typing Garage');
		await page.locator('#usageUnit').selectOption('mi');
		await page.locator('#usage').fill('−100');
		await page.getByRole('button', { name: 'Take in the head' }).click();
		await page.getByText('Mileage cannot be negative.').waitFor();
		expect(await page.locator('#usage').inputValue()).toBe('−100');

		await page.locator('#usage').fill('142,350');
		await page.locator('#usageUnit').selectOption('mi');
		await page.getByRole('button', { name: 'Take in the head' }).click();
		await page.waitForURL(/\/heads\/[0-9a-f-]{36}\?taken=1$/);
		// 142,350 miles × 1.609344 = 229,090.1 km, kept to the km.
		await page.getByText('229,090 km').waitFor();
		await shot(page, 'typed-01-mileage');
		await page.close();
	});

	it('takes a limit typed "0,0045" in inches and words it in the audit trail', async () => {
		const page = await browser.newPage({ viewport: { width: 1024, height: 768 } });
		await signInWithPassword(page, baseURL, 'engineer@brackenford.example', 'brackenford-engineer-demo');
		await page.goto(`${baseURL}/families`);
		await page.getByRole('link', { name: 'ALDER-4' }).first().click();
		await page.waitForURL(/\/families\/[0-9a-f-]{36}/);
		await page.locator('#stage').selectOption('final');
		await page.locator('#measurement').selectOption('seat_runout');
		await page.locator('#side').selectOption('exhaust');
		await page.locator('#max').fill('0,0045');
		await page.locator('#unit').selectOption('in');
		// Far in the future, so that no figure of today moves for the other tests.
		await page.locator('#effectiveFrom').fill('2999-12-31');
		await page.getByRole('button', { name: 'Save the version' }).click();
		await page.getByText('New limit version from 2999-12-31 saved.').waitFor();

		// The limits table keeps its columns apart: the maximum's digits end well before the day starts.
		const row = page.locator('[data-testid="limits"] tbody tr').first();
		const [maxCell, sinceCell] = [row.locator('td').nth(4), row.locator('td').nth(5)];
		const text = await maxCell.evaluate((td) => {
			const r = document.createRange();
			r.selectNodeContents(td);
			return r.getBoundingClientRect().right;
		});
		const since = await sinceCell.evaluate((td) => {
			const r = document.createRange();
			r.selectNodeContents(td);
			return r.getBoundingClientRect().left;
		});
		expect(since - text).toBeGreaterThanOrEqual(12);

		await page.goto(`${baseURL}/audit?entity=limit`);
		const first = page.getByTestId('audit-sentence').first();
		// 0.0045 in × 25.4 = 0.1143 mm.
		// Named by the person's name, not the e-mail kept as the entry's label.
		const sentence = (await first.textContent()) ?? '';
		expect(sentence.startsWith('engineer@')).toBe(false);
		expect(sentence).toMatch(/^\S+ \S+ set the final exhaust seat runout \(TIR\) limit of ALDER-4 to at most 0\.114 mm, typed at most 0\.0045 in, effective 31 Dec 2999\.$/);
		await page.getByText('As recorded: limit · create').first().click();
		await page.getByText('"max":0.0045', { exact: false }).first().waitFor();
		await shot(page, 'typed-02-audit');
		await page.close();
	});

	it('copies a new API token with one click, and the copy works against the API', async () => {
		const ctx = await browser.newContext({ viewport: { width: 1024, height: 768 }, permissions: ['clipboard-read', 'clipboard-write'] });
		const page = await ctx.newPage();
		await signInWithPassword(page, baseURL, 'engineer@brackenford.example', 'brackenford-engineer-demo');
		await page.goto(`${baseURL}/settings/tokens`);
		await page.getByLabel('Name (what it is for)').fill(`copy test ${serial}`);
		await page.getByRole('button', { name: 'Create token' }).click();
		await page.getByTestId('copy-token').click();
		await page.getByText('Copied to the clipboard.').waitFor();
		const shown = await page.getByTestId('new-token').inputValue();
		const copied = await page.evaluate(() => navigator.clipboard.readText());
		expect(copied).toBe(shown);
		expect(copied).toMatch(/^lmk_[A-Za-z0-9_-]{40}$/);
		const res = await fetch(`${baseURL}/api/v1/families`, { headers: { authorization: `Bearer ${copied}` } });
		expect(res.status).toBe(200);
		await ctx.close();
	});
});
