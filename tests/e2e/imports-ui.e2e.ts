// The Imports page in a real browser, as an engineer of the demo shop: a file dropped on the page,
// a column the server does not know matched by hand, a dry run with its first rejects, the import,
// the history row with its rejected rows as CSV, undo; and an upload cancelled half way, which
// leaves nothing stored.
import { describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { sharedBrowser, shot, signInWithPassword } from '../helpers/browser';

const baseURL = inject('baseURL');
const shared = sharedBrowser();

const HEAD = 'head_serial,family,stage,cylinder,side,valve,measured_at,measured_by,clearance_mm';

/** Rows of ALDER-4 heads (4 cylinders, 2 intake and 2 exhaust valves): 16 valve positions each. */
function rows(tag: string, count: number): string[] {
	return Array.from({ length: count }, (_, i) => {
		const p = i % 16;
		return `UI-${tag}-${i >> 4},ALDER-4,as_received,${(p >> 2) + 1},${p & 2 ? 'exhaust' : 'intake'},${(p & 1) + 1},2026-11-20T08:00:00Z,Wren,0.0${30 + (i % 40)}`;
	});
}

/** Drops a file on the upload area as a person would drag it there. */
async function drop(page: Page, name: string, text: string) {
	const transfer = await page.evaluateHandle(
		([n, t]) => {
			const dt = new DataTransfer();
			dt.items.add(new File([t], n, { type: 'text/csv' }));
			return dt;
		},
		[name, text] as const
	);
	const area = page.locator('label', { hasText: 'Drop a CSV file here' });
	await area.dispatchEvent('dragover', { dataTransfer: transfer });
	await area.dispatchEvent('drop', { dataTransfer: transfer });
}

describe('the Imports page', () => {
	it('maps an unknown column, checks, imports, offers the rejects and undoes, by drag and drop', async () => {
		const context = await shared.browser.newContext({ viewport: { width: 1280, height: 1000 } });
		const page = await context.newPage();
		page.on('dialog', (d) => void d.accept()); // the undo's confirmation
		try {
			await signInWithPassword(page, baseURL, 'engineer@brackenford.example', 'brackenford-engineer-demo');
			await page.goto(`${baseURL}/imports`);
			const tag = Date.now().toString(36);
			const good = rows(tag, 32); // two heads
			const bad = `UI-${tag}-9,ALDER-4,as_received,9,intake,1,2026-11-20T08:00:00Z,Wren,0.040`; // line 34: no cylinder 9
			// Two columns Lapmark does not know by these names: "Inspector" (a word shops use for
			// measured_by) and "bench_note" (nothing Lapmark stores).
			const file = [`${HEAD.replace('measured_by', 'Inspector')},bench_note`, ...good.map((r) => `${r},ok`), `${bad},odd`].join('\n') + '\n';
			const name = `ui-${tag}.csv`;
			await drop(page, name, file);

			// The mapping step suggests a name for each; a column left unmatched holds the file back.
			const mapping = page.getByTestId('mapping');
			await mapping.waitFor();
			const inspector = page.getByLabel('Lapmark name for column Inspector');
			const note = page.getByLabel('Lapmark name for column bench_note');
			expect(await inspector.inputValue()).toBe('measured_by');
			expect(await note.inputValue()).toBe('ignore');
			const importButton = page.getByRole('button', { name: 'Import', exact: true });
			await note.selectOption('');
			expect(await importButton.isDisabled()).toBe(true);
			await note.selectOption('ignore');
			expect(await importButton.isDisabled()).toBe(false);
			await page.getByLabel('skip that row, import the rest').check();

			// The dry run: counts and the first rejects, nothing stored.
			await page.getByRole('button', { name: 'Check without importing' }).click();
			const result = page.getByTestId('import-result');
			await result.getByText('Check finished: nothing was stored.').waitFor();
			expect(await result.getByTestId('accepted').textContent()).toBe('32');
			expect(await result.getByTestId('rejected').textContent()).toBe('1');
			expect(await result.getByTestId('readings').textContent()).toBe('32');
			expect(await result.locator('tbody tr').first().textContent()).toContain('cylinder 9 is outside ALDER-4');
			await shot(page, 'imports-dry-run');

			// The import itself.
			await importButton.click();
			await result.getByText('Imported.').waitFor();
			expect(await result.getByTestId('readings').textContent()).toBe('32');
			const row = page.getByTestId('batch-row').filter({ hasText: name });
			await row.getByText('stored').waitFor();
			expect((await row.locator('td').allTextContents()).slice(3, 6)).toEqual(['32', '1', '32']);
			await shot(page, 'imports-done');

			// Every rejected row as CSV, with its line and reason.
			const href = await row.getByRole('link', { name: 'Rejected rows' }).getAttribute('href');
			const rejects = await page.request.get(`${baseURL}${href}`);
			expect(rejects.status()).toBe(200);
			const csv = (await rejects.text()).split(/\r?\n/).filter(Boolean);
			expect(csv).toHaveLength(2);
			expect(csv[1]).toMatch(/^34,cylinder 9 is outside ALDER-4/);

			// Undo: the readings and the two heads go again.
			await row.getByRole('button', { name: 'Undo' }).click();
			await page.getByText('Import undone: 32 readings and 2 heads removed.').waitFor();
			await row.getByText('undone').waitFor();
		} finally {
			await context.close();
		}
	});

	it('cancels an upload half way and stores nothing of it', async () => {
		const context = await shared.browser.newContext({ viewport: { width: 1280, height: 1000 } });
		const page = await context.newPage();
		try {
			await signInWithPassword(page, baseURL, 'engineer@brackenford.example', 'brackenford-engineer-demo');
			await page.goto(`${baseURL}/imports`);
			const tag = `c${Date.now().toString(36)}`;
			// About 6 MB: the server reads the body only as fast as it checks and stores the rows, so
			// the upload is still running when Cancel is pressed.
			const text = [HEAD, ...rows(tag, 80_000)].join('\n') + '\n';
			const name = `cancel-${tag}.csv`;
			await page.getByTestId('file-input').setInputFiles({ name, mimeType: 'text/csv', buffer: Buffer.from(text) });
			await page.getByRole('button', { name: 'Import', exact: true }).click();
			const cancel = page.getByRole('button', { name: 'Cancel' });
			await cancel.waitFor();
			await page.getByRole('progressbar').waitFor();
			await cancel.click();
			await page.getByText('Upload cancelled. Nothing was imported.').waitFor();
			expect(await cancel.count()).toBe(0);

			// The history never shows it stored, and no head of the file is there.
			await page.goto(`${baseURL}/imports`);
			const row = page.getByTestId('batch-row').filter({ hasText: name });
			if (await row.count()) expect(await row.locator('td').nth(6).textContent()).not.toContain('stored');
			const heads = await page.request.get(`${baseURL}/heads?q=UI-${tag}`);
			expect(await heads.text()).not.toContain(`UI-${tag}-0`);
		} finally {
			await context.close();
		}
	});
});
