// Signing in as a person does it, in Debian's chromium: by password, by a link read from the
// local fake mail server, and by accepting an owner's invitation; then signing out.
import { describe, expect, inject, it } from 'vitest';
import { sharedBrowser, shot, signInWithPassword } from '../helpers/browser';
import { firstLink, waitForMail } from '../helpers/mail';
import { listFakeMail } from '../../src/lib/server/mail/fake-inbox';
import { uniqueEmail } from '../helpers/people';

const baseURL = inject('baseURL');
const shared = sharedBrowser();

describe('signing in and out', () => {
	it('by password, then out', async () => {
		const page = await shared.browser.newPage();
		await signInWithPassword(page, baseURL, 'owner@brackenford.example', 'brackenford-owner-demo');
		await page.getByTestId('overview-figures').waitFor();
		expect(await page.getByTestId('user-name').textContent()).toMatch(/./);
		await shot(page, 'auth-01-overview');
		await page.getByRole('button', { name: 'Sign out' }).click();
		await page.waitForURL(/\/signin/);
		await page.goto(`${baseURL}/`);
		await page.waitForURL(/\/signin\?redirectTo=/);
		await page.close();
	});

	it('says so, without telling whether the address exists, on a wrong password', async () => {
		const page = await shared.browser.newPage();
		for (const email of ['viewer@brackenford.example', 'nobody-here@brackenford.example']) {
			await page.goto(`${baseURL}/signin`);
			await page.getByLabel('E-mail address').fill(email);
			await page.getByLabel('Password').fill('not the password');
			await page.getByRole('button', { name: 'Sign in' }).click();
			await expect(page.getByRole('alert').textContent()).resolves.toBe('That e-mail address and password do not match an account.');
		}
		await page.close();
	});

	it('by a link from the e-mail, once', async () => {
		const page = await shared.browser.newPage();
		const since = Date.now() - 1000;
		await page.goto(`${baseURL}/signin`);
		await page.getByRole('tab', { name: 'E-mail me a link' }).click();
		await page.getByLabel('E-mail address').fill('machinist@brackenford.example');
		await page.getByRole('button', { name: 'Send the link' }).click();
		await page.waitForURL(/\/signin\/check-email/);
		const mail = await waitForMail('machinist@brackenford.example', /sign-in link/, since);
		const link = firstLink(mail);
		await page.goto(link);
		await page.getByTestId('overview-figures').waitFor();
		await shot(page, 'auth-02-signed-in-by-link');
		// The same link a second time is refused with a clear message.
		const other = await shared.browser.newPage();
		await other.goto(link);
		await other.waitForURL(/\/signin/);
		await expect(other.getByRole('alert').textContent()).resolves.toMatch(/expired or was already used/);
		await other.close();
		await page.close();
	});

	it('an owner invites a new machinist, who accepts and signs out', async () => {
		const owner = await shared.browser.newPage();
		await signInWithPassword(owner, baseURL, 'owner@brackenford.example', 'brackenford-owner-demo');
		await owner.goto(`${baseURL}/settings/members`);
		const email = uniqueEmail('new-machinist');
		const since = Date.now() - 1000;
		await owner.locator('#invite-email').fill(email);
		await owner.getByLabel('Role', { exact: true }).selectOption('machinist');
		await owner.getByRole('button', { name: 'Send invitation' }).click();
		await owner.getByText(`Invitation sent to ${email}.`).waitFor();
		await shot(owner, 'auth-03-invitation-sent');
		// A second invitation while the first is open is refused, saying why (in any case of the address).
		await owner.locator('#invite-email').fill(email.toUpperCase());
		await owner.getByRole('button', { name: 'Send invitation' }).click();
		await owner.getByText(`${email} was already invited (machinist) and has not answered yet. Withdraw that invitation below to send a new one.`).waitFor();
		const link = firstLink(await waitForMail(email, /invited/, since));

		const ctx = await shared.browser.newContext();
		const guest = await ctx.newPage();
		await guest.goto(link);
		await guest.getByLabel('Your name').fill('Rowan Test');
		await guest.getByLabel('Choose a password').fill('short');
		await guest.getByRole('button', { name: 'Accept the invitation' }).click();
		await guest.getByText('Choose a password of at least 10 characters.').waitFor();
		await guest.getByLabel('Choose a password').fill('a long enough password');
		await guest.getByRole('button', { name: 'Accept the invitation' }).click();
		await guest.getByTestId('overview-figures').waitFor();
		expect(await guest.getByTestId('user-name').textContent()).toBe('Rowan Test');
		await shot(guest, 'auth-04-invited-machinist');
		await guest.getByRole('button', { name: 'Sign out' }).click();
		await guest.waitForURL(/\/signin/);
		// The invitation works once.
		await guest.goto(link);
		await guest.getByText('This invitation was already used. Sign in instead.').waitFor();
		await ctx.close();

		await owner.goto(`${baseURL}/settings/members`);
		await owner.getByRole('cell', { name: email, exact: true }).waitFor();
		// Now a member: inviting them again says so and sends nothing.
		const invitesTo = async () => (await listFakeMail(process.env.LAPMARK_MAIL_DIR!)).filter((m) => m.to.includes(email) && /invited/.test(m.subject)).length;
		const before = await invitesTo();
		await owner.locator('#invite-email').fill(email);
		await owner.getByRole('button', { name: 'Send invitation' }).click();
		await owner.getByText(`${email} is already a member of this shop (machinist). Change their role in the list below instead.`).waitFor();
		expect(await owner.locator('#invite-email').inputValue()).toBe(email);
		expect(await invitesTo()).toBe(before);
		await owner.close();
	});
});
