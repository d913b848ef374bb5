// One head through the shop in a real browser: intake with leak-down, as-received entry typed in
// inches on the keyboard (with a dropped connection on the way), decisions with the seat-cut
// warning, final entry with bench seal tests, a release blocked by a leaking valve and then
// allowed, the e-mailed report arriving in the local fake mail server, and a comeback.
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { listFakeMail } from '../../src/lib/server/mail/fake-inbox';
import { launch, shot, signInWithPassword } from '../helpers/browser';

const baseURL = inject('baseURL');
const serial = `E2E-${Date.now().toString(36).toUpperCase()}`;
const customerEmail = `service@e2e-${Date.now().toString(36)}.example`;
let browser: Browser;
let page: Page;
let headId = '';

beforeAll(async () => {
	browser = await launch();
	page = await browser.newPage({ viewport: { width: 1600, height: 1000 } });
	page.on('pageerror', (e) => console.error('[page error]', e.message));
	await signInWithPassword(page, baseURL, 'machinist@brackenford.example', 'brackenford-machinist-demo');
});
afterAll(async () => {
	await browser?.close();
});

const cell = (pos: string, field: string) => page.locator(`input[name="c|${pos}|${field}"]`);
const text = async (testId: string) => ((await page.getByTestId(testId).textContent()) ?? '').trim();

/** Every cell saved: none waiting or on its way, and the banner says so. */
async function allSaved() {
	await page.waitForFunction(() => !document.querySelector('[data-status="saving"],[data-status="unsaved"]') && Boolean(document.querySelector('[data-testid="all-saved"]')), null, {
		timeout: 20_000
	});
}

/** Types values into consecutive cells, pressing Enter after each, as a machinist does. */
async function typeRun(values: string[]) {
	for (const v of values) {
		await page.keyboard.type(v);
		await page.keyboard.press('Enter');
	}
}

describe('a head from intake to release', () => {
	it('takes in a head with its leak-down worked out from gauge pressures', async () => {
		await page.goto(`${baseURL}/heads/new`);
		await page.getByLabel('Serial or casting number').fill(serial);
		const family = await page.locator('#familyId option', { hasText: 'CEDAR-V8' }).getAttribute('value');
		await page.locator('#familyId').selectOption(family!);
		await page.getByLabel('Customer’s e-mail (for the report)').fill(customerEmail);
		await page.getByLabel('Customer', { exact: true }).fill(`Invented Test Garage ${serial}`);
		await page.locator('#usage').fill('60000');
		await page.locator('#usageUnit').selectOption('mi');
		await page.getByLabel('Complaint').fill('Failed leak-down on cylinder 1, exhaust side');
		await page.getByLabel('Gauge pressures').check();
		await page.getByLabel('Cylinder 1 pressure in').fill('100');
		await page.getByLabel('Cylinder 1 pressure held').fill('78');
		await page.getByLabel('Cylinder 1 leak heard at').selectOption('exhaust');
		// (100 − 78) / 100 × 100 = 22 %, shown while typing.
		expect(await text('leak-computed-1')).toBe('22.0 %');
		await shot(page, 'heads-01-intake');
		await page.getByRole('button', { name: 'Take in the head' }).click();
		await page.waitForURL(/\/heads\/[0-9a-f-]{36}\?taken=1$/);
		headId = new URL(page.url()).pathname.split('/')[2];
		expect(await text('head-serial')).toBe(serial);
		expect(await text('head-status')).toBe('Received');
		// 60 000 miles × 1.609344 = 96 560.64 km, kept to the km.
		await page.getByText('96,561 km').waitFor();
		await page.getByText('22.0 %').waitFor();

		// The list finds it by serial (filters live in the URL) and sorts by a column header.
		await page.goto(`${baseURL}/heads`);
		await page.getByLabel('Serial, customer or complaint').fill(serial);
		await page.getByLabel('Serial, customer or complaint').press('Enter');
		await page.waitForURL((u) => u.searchParams.get('q') === serial);
		await page.getByRole('link', { name: serial }).waitFor();
		expect(await page.getByTestId('head-row').count()).toBe(1);
		await page.getByRole('link', { name: 'Family', exact: true }).click();
		await page.waitForURL((u) => u.searchParams.get('sort') === 'family' && u.searchParams.get('dir') === 'asc');
		expect(await page.getByRole('columnheader', { name: /Family/ }).getAttribute('aria-sort')).toBe('ascending');
		await shot(page, 'heads-01b-list');
	});

	it('enters the as-received readings in inches, keyboard only, and flags as it goes', async () => {
		await page.goto(`${baseURL}/heads/${headId}/entry/as-received`);
		for (const column of ['stem_diameter', 'bore', 'face_runout', 'seat_runout', 'seat_width', 'margin']) {
			await page.getByTestId(`unit-${column}`).selectOption('in');
		}
		// The seat runout goes on the shop's dial indicator, whose calibration has run out (demo data).
		const dial = await page.getByTestId('gauge-seat_runout').locator('option', { hasText: 'Dial indicator' }).getAttribute('value');
		await page.getByTestId('gauge-seat_runout').selectOption(dial!);

		// Cylinder 1 exhaust, across the row: stem, bores along/across at top, middle, bottom,
		// face runout, seat runout, seat width, margin — in inches.
		await cell('1-exhaust-1', 'stem_diameter').click();
		await typeRun(['0.3130', '0.3170', '0.3165', '0.3163', '0.3162', '0.3168', '0.3164', '0.0005', '0.0030', '0.0700', '0.0600']);
		await allSaved();
		// Hand-worked (1 in = 25.4 mm): stem 7.9502 mm; largest bore 0.3170 in = 8.0518 mm;
		// clearance 8.0518 − 7.9502 = 0.1016 mm = 0.0040 in; ovality at the top 0.3170 − 0.3165 =
		// 0.0005 in; taper along 0.3170 − 0.3163 = 0.0007 in.
		expect(await text('largest-1-exhaust-1')).toBe('0.3170');
		expect(await text('clearance-1-exhaust-1')).toBe('0.0040');
		expect(await text('ovality-1-exhaust-1')).toBe('0.0005');
		expect(await text('taper-1-exhaust-1')).toBe('0.0007');
		// Seat runout 0.0030 in = 0.0762 mm, over the family's 0.050 mm: flagged at once, with the
		// reason in text and on hover; and the gauge's lapsed calibration too.
		expect(await cell('1-exhaust-1', 'seat_runout').getAttribute('data-flag')).toBe('bad');
		const flags = await text('flags-1-exhaust-1');
		expect(flags).toContain('Seat runout (TIR) 0.076 mm is above the maximum 0.050 mm');
		expect(flags).toContain('whose calibration ran out on');
		expect(await cell('1-exhaust-1', 'seat_runout').getAttribute('title')).toContain('above the maximum 0.050 mm');
		expect(await text('grid-head-status')).toBe('Inspected');

		// The rest of the seat runout column, going down.
		await page.getByTestId('gauge-seat_runout').selectOption('');
		await page.getByTestId('enter-moves').selectOption('down');
		await cell('1-intake-1', 'seat_runout').click();
		const rows = 16;
		await typeRun(Array.from({ length: rows }, (_, i) => (i === 1 ? '0.0030' : '0.0008')));
		await allSaved();
		await shot(page, 'heads-02-as-received');
	});

	it('keeps a value typed while the connection is down and saves it when it is back', async () => {
		await page.context().setOffline(true);
		await cell('2-intake-1', 'margin').click();
		await typeRun(['0.0550']);
		await page.getByTestId('not-saved').waitFor();
		expect(await cell('2-intake-1', 'margin').getAttribute('data-status')).toBe('unsaved');
		const kept = await page.evaluate((id) => localStorage.getItem(`lapmark:grid:${id}:as_received`), headId);
		expect(kept).toContain('0.0550');
		await shot(page, 'heads-03-not-saved');
		await page.context().setOffline(false);
		await allSaved();
		await page.reload();
		await page.getByTestId('unit-margin').selectOption('in');
		expect(await cell('2-intake-1', 'margin').inputValue()).toBe('0.055');
	});

	it('suggests decisions with the rule in words, warns against a seat cut on a worn guide, and records what a person chose', async () => {
		await page.goto(`${baseURL}/heads/${headId}/decisions`);
		const rule = await text('rule-1-exhaust-1');
		expect(rule).toMatch(/^Clearance 0\.102 mm is within the service limit 0\.120 mm but over the rework size 0\.080 mm: knurl and ream the guide/);
		expect(rule).toContain('seat runout 0.076 mm is over 0.050 mm (recut the seat)');
		expect(rule).toContain('Do the guide work first');
		const box = page.getByTestId('decision-1-exhaust-1');
		await box.locator('select[name="kind"]').selectOption('recut_seat');
		await box.getByRole('button', { name: 'Confirm' }).click();
		await box.getByRole('alert').waitFor();
		expect(await box.getByRole('alert').textContent()).toContain('knurl or replace the guide first');
		// The machinist takes the advice: a new guide, then the seat.
		await box.locator('select[name="kind"]').selectOption('replace_guide');
		await box.getByRole('button', { name: 'Confirm' }).click();
		await page.getByTestId('decided-1-exhaust-1').waitFor();
		expect(await text('decided-1-exhaust-1')).toContain('Replace the guide');
		expect(await text('decided-1-exhaust-1')).toContain('changed from the suggestion');
		await page.getByRole('button', { name: /Confirm the 15 suggestions/ }).click();
		await page.getByTestId('decided-8-exhaust-1').waitFor();
		await shot(page, 'heads-04-decisions');
		await page.goto(`${baseURL}/heads/${headId}`);
		expect(await text('head-status')).toBe('In rework');
	});

	it('enters the final readings and bench seal tests; a leaking valve blocks the release', async () => {
		await page.goto(`${baseURL}/heads/${headId}/entry/final`);
		await page.getByTestId('heights').selectOption('1');
		for (const column of ['stem_diameter', 'bore']) await page.getByTestId(`unit-${column}`).selectOption('in');
		// The new guide on cylinder 1 exhaust, sized: bore 0.3150 in both ways, stem 0.3130 in →
		// clearance 0.0020 in = 0.0508 mm, inside the rework spec 0.040–0.080 mm.
		await cell('1-exhaust-1', 'stem_diameter').click();
		await typeRun(['0.3130', '0.3150', '0.3150']);
		await allSaved();
		expect(await text('clearance-1-exhaust-1')).toBe('0.0020');
		expect(await cell('1-exhaust-1', 'stem_diameter').getAttribute('data-flag')).not.toBe('bad');

		// Vacuum test in inHg: 20 applied, held per valve; cylinder 5 intake holds only 17 (85 %).
		await page.getByTestId('enter-moves').selectOption('down');
		await page.getByTestId('unit-vacuum_hold').selectOption('inHg');
		await page.getByTestId('applied-vacuum').fill('20');
		await cell('1-intake-1', 'vacuum_hold').click();
		const positions = await page.locator('[data-testid="grid-row"]').evaluateAll((rows) => rows.map((r) => r.getAttribute('data-pos')!));
		await typeRun(positions.map((p) => (p === '5-intake-1' ? '17' : '19.5')));
		await allSaved();
		expect(await cell('5-intake-1', 'vacuum_hold').getAttribute('data-flag')).toBe('bad');
		expect(await text('flags-5-intake-1')).toContain('Vacuum hold 85.0 % is under the pass mark of 90 %');
		// Fluid test: no drip in 120 s on every valve.
		await cell('1-intake-1', 'fluid_hold').click();
		await typeRun(positions.map(() => '120'));
		await allSaved();
		expect(await text('grid-head-status')).toBe('Final check');
		await shot(page, 'heads-05-final');

		await page.goto(`${baseURL}/heads/${headId}`);
		await page.getByTestId('release-blocked').waitFor();
		expect(await text('blockers')).toContain('Cyl 5 intake: Vacuum hold 85.0 % is under the pass mark of 90 %');
		expect(await page.getByRole('button', { name: 'Release the head' }).isDisabled()).toBe(true);
		await shot(page, 'heads-06-release-blocked');
	});

	it('releases the head once the valve is lapped again and passes', async () => {
		await page.goto(`${baseURL}/heads/${headId}/entry/final`);
		await page.getByTestId('unit-vacuum_hold').selectOption('inHg');
		await page.getByTestId('applied-vacuum').fill('20');
		await cell('5-intake-1', 'vacuum_hold').click();
		await typeRun(['19']);
		await allSaved();
		expect(await cell('5-intake-1', 'vacuum_hold').getAttribute('data-flag')).not.toBe('bad');
		await page.goto(`${baseURL}/heads/${headId}`);
		await page.getByTestId('release-ready').waitFor();
		await page.getByRole('button', { name: 'Release the head' }).click();
		await page.getByText(/^Released on \d{4}-\d{2}-\d{2}\.$/).first().waitFor();
		expect(await text('head-status')).toBe('Released');
	});

	it('e-mails the report to the customer through the outbox', async () => {
		await page.getByRole('button', { name: `E-mail the report to ${customerEmail}` }).click();
		await page.getByText(`Report sent to ${customerEmail}.`).waitFor();
		const dir = process.env.LAPMARK_MAIL_DIR;
		expect(dir, 'LAPMARK_MAIL_DIR is set by npm test').toBeTruthy();
		let mail = null;
		for (let i = 0; i < 50 && !mail; i++) {
			mail = (await listFakeMail(dir!)).find((m) => m.to.includes(customerEmail)) ?? null;
			if (!mail) await new Promise((r) => setTimeout(r, 200));
		}
		expect(mail, 'the report reached the fake mail server').not.toBeNull();
		expect(mail!.subject).toBe(`Head report ${serial} from Brackenford Head Works`);
		expect(mail!.text).toContain('Cylinder 1: 22.0 %, heard at: Exhaust side');
		expect(mail!.text).toContain('Work done: Replace the guide');
		expect(mail!.text).toContain('Seal test: 95.0 % held; 120 s without a drip — pass');
		expect(mail!.text).toContain('A valve that drops into a cylinder destroys the engine.');
		expect(mail!.text).toContain('never replace the engine maker’s service data');
		await page.goto(`${baseURL}/heads/${headId}/report`);
		expect(await text('seal-5-intake-1')).toContain('95.0 % held; 120 s without a drip — pass');
		await page.emulateMedia({ media: 'print' });
		await shot(page, 'heads-07-report-print');
		await page.emulateMedia({ media: 'screen' });
	});

	it('records a comeback against the released head', async () => {
		await page.goto(`${baseURL}/heads/${headId}`);
		await page.getByText('Record a comeback').click();
		await page.locator('#cb-usage').fill('64000');
		await page.locator('select[name="usageUnit"]').last().selectOption('mi');
		await page.getByLabel('What failed').fill('Oil use again; cylinder 1 exhaust guide loose');
		await page.locator('input[name="positions"][value="1-exhaust-1"]').check();
		await page.getByRole('button', { name: 'Record the comeback' }).click();
		await page.getByText(`Comeback recorded as job ${serial}-C1.`).waitFor();
		expect(await text('comebacks')).toContain(`${serial}-C1`);
		expect(await text('comebacks')).toContain('Oil use again; cylinder 1 exhaust guide loose');
		expect(await text('comebacks')).toContain('102,998 km'); // 64 000 mi × 1.609344 km/mi = 102 998.016 km
		await shot(page, 'heads-08-comeback');
		await page.getByRole('link', { name: 'Open the comeback job' }).click();
		await page.getByText(`This job is a comeback of ${serial}`).waitFor();
		expect(await text('head-serial')).toBe(`${serial}-C1`);
	});
});
