// The words of Lapmark's e-mails. Plain text first; a small HTML part for clickable links.
import { sendNow } from './index';

function escapeHtml(s: string): string {
	return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

function linkMail(intro: string, url: string, outro: string) {
	return {
		text: `${intro}\n\n${url}\n\n${outro}\n\n— Lapmark`,
		html: `<p>${escapeHtml(intro)}</p><p><a href="${escapeHtml(url)}">${escapeHtml(url)}</a></p><p>${escapeHtml(outro)}</p><p>— Lapmark</p>`
	};
}

/** Called by Auth.js after it stored the link's token. Throws when the message could not go out
 * now, so the sign-in page says so; the outbox keeps retrying it. */
export async function sendSignInLink(to: string, url: string) {
	const result = await sendNow({ to, ...signInLinkMail(url) });
	if (result.failed) throw new Error(`The sign-in e-mail could not be sent yet (${result.errors[0]}); it will be retried.`);
}

export function signInLinkMail(url: string) {
	return {
		subject: 'Your Lapmark sign-in link',
		kind: 'sign_in_link',
		...linkMail('Use this link to sign in to Lapmark. It works once and expires in one hour.', url, 'If you did not ask to sign in, ignore this message.')
	};
}

export function passwordResetMail(url: string) {
	return {
		subject: 'Reset your Lapmark password',
		kind: 'password_reset',
		...linkMail('Use this link to choose a new Lapmark password. It works once and expires in one hour.', url, 'If you did not ask for this, ignore this message; your password stays as it is.')
	};
}

export function invitationMail(shopName: string, role: string, url: string) {
	return {
		subject: `You are invited to ${shopName} on Lapmark`,
		kind: 'invitation',
		...linkMail(`You have been invited to join ${shopName} on Lapmark as ${role}. Open this link to accept; it expires in 7 days.`, url, 'If you did not expect this invitation, ignore this message.')
	};
}
