// The words of the mails that bring a new shop in: the sign-up link, the note to an address
// that already has an account, the operator-made owner's first password link. Free of the
// app's client (scripts/shop-create.ts uses it too).
function escapeHtml(s: string): string {
	return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

function body(paragraphs: string[], url: string | null, outro: string) {
	const text = [...paragraphs, ...(url ? [url] : []), outro, '— Lapmark'].join('\n\n');
	const html = [...paragraphs.map((p) => `<p>${escapeHtml(p)}</p>`), url ? `<p><a href="${escapeHtml(url)}">${escapeHtml(url)}</a></p>` : '', `<p>${escapeHtml(outro)}</p><p>— Lapmark</p>`].join('');
	return { text, html };
}

export function signupConfirmMail(shopName: string, url: string, hours: number) {
	return {
		subject: 'Confirm your address to create your shop on Lapmark',
		kind: 'signup_confirm',
		...body([`Someone (we hope you) asked to create the shop "${shopName}" on Lapmark with this address. Open this link to confirm it and finish; it works once and expires in ${hours} hours. Until then nothing is created.`], url, 'If you did not ask for this, ignore this message; nothing happens.')
	};
}

export function signupExistingMail(signInUrl: string, forgotUrl: string) {
	return {
		subject: 'Someone tried to create a Lapmark shop with your address',
		kind: 'signup_existing',
		...body(
			['Someone asked to create a new Lapmark shop with this e-mail address, but it already has a Lapmark account, so nothing was created. To use your account, sign in here:', signInUrl, `Forgot your password? Choose a new one at ${forgotUrl}`],
			null,
			'If it was not you, ignore this message; your account is unchanged.'
		)
	};
}

export function ownerWelcomeMail(shopName: string, url: string, hours: number) {
	return {
		subject: `Your Lapmark shop ${shopName} is ready`,
		kind: 'owner_welcome',
		...body([`The shop "${shopName}" was created on Lapmark with you as its owner. Open this link to choose your password; it works once and expires in ${hours} hours.`], url, 'When it has expired, ask for a new one with "Forgot your password?" on the sign-in page.')
	};
}

export function ownerAddedMail(shopName: string, signInUrl: string) {
	return {
		subject: `You are the owner of ${shopName} on Lapmark`,
		kind: 'owner_added',
		...body([`The shop "${shopName}" was created on Lapmark with you as its owner. Sign in with your existing account and choose it in the side bar:`, signInUrl], null, 'If you did not expect this, tell the person who runs your Lapmark server.')
	};
}
