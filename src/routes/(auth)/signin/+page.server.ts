import { error, fail, redirect } from '@sveltejs/kit';
import { requestSignInLink, signInVerified } from '../../../auth';
import { fieldErrors, linkSignIn, passwordSignIn, safeRedirect } from '$lib/schemas/auth';
import { signInBlocked } from '$lib/server/auth/rate-limit';
import { publicSignup } from '$lib/server/env';
import { signInWithPassword } from '$lib/server/services/sign-in';
import { noShopsYet } from '$lib/server/services/signup';
import { sitePath } from '$lib/schemas/text';
import type { Actions, PageServerLoad } from './$types';

/** `redirectTo` (or Auth.js's `callbackUrl`, possibly a full address on this site) as a path
 * here; anything else is a 400 that names it, never a redirect off the site. */
function redirectParam(url: URL): string {
	const name = url.searchParams.has('redirectTo') ? 'redirectTo' : 'callbackUrl';
	let value = url.searchParams.get(name);
	if (value === null || value === '') return '/';
	if (value.startsWith(url.origin + '/')) value = value.slice(url.origin.length);
	if (sitePath(value) === null) error(400, `${name} must be a path on this site, such as /heads`);
	return safeRedirect(value);
}

/** Messages for the errors Auth.js reports back in the URL; none says whether an address exists. */
const AUTH_ERRORS: Record<string, string> = {
	CredentialsSignin: 'That e-mail address and password do not match an account.',
	Verification: 'That sign-in link has expired or was already used. Ask for a new one.',
	EmailSignin: 'The sign-in e-mail could not be sent just now. It will be retried; you can also ask again.',
	AccessDenied: 'You may not sign in with that account.',
	Configuration: 'Sign-in is not set up correctly on this server.'
};

export const load: PageServerLoad = async (event) => {
	const redirectTo = redirectParam(event.url);
	if (event.locals.actor) redirect(303, redirectTo);
	const code = event.url.searchParams.get('error');
	return {
		// A fresh install (no shop at all) offers to create the first one.
		firstShop: await noShopsYet(),
		signupOpen: publicSignup,
		redirectTo,
		authError: code ? (AUTH_ERRORS[code] ?? 'Sign-in did not work. Try again.') : null,
		notice: event.url.searchParams.has('reset')
			? 'Your password was changed. Sign in with the new one.'
			: event.url.searchParams.has('joined')
				? 'You joined the shop. Sign in to continue.'
				: null
	};
};

export const actions: Actions = {
	password: async (event) => {
		const form = await event.request.formData();
		const typedEmail = String(form.get('email') ?? '').slice(0, 254);
		const parsed = passwordSignIn.safeParse({ email: form.get('email'), password: form.get('password') });
		if (!parsed.success) return fail(400, { mode: 'password', email: typedEmail, errors: fieldErrors(parsed.error) });
		const { email, password } = parsed.data;
		// Counted against the limit, then the one lookup and the one hash check of a password
		// sign-in (services/sign-in.ts); Auth.js signs in the person it returned, unchecked.
		const attempt = await signInWithPassword(email, password, event.getClientAddress());
		if (attempt.state === 'blocked') return fail(429, { mode: 'password', email, errors: { form: attempt.message } });
		if (attempt.state === 'wrong') return fail(400, { mode: 'password', email, errors: { form: AUTH_ERRORS.CredentialsSignin } });
		await signInVerified(event, attempt.user, safeRedirect(form.get('redirectTo')));
	},
	link: async (event) => {
		const form = await event.request.formData();
		const typedEmail = String(form.get('email') ?? '').slice(0, 254);
		const parsed = linkSignIn.safeParse({ email: form.get('email') });
		if (!parsed.success) return fail(400, { mode: 'link', email: typedEmail, errors: fieldErrors(parsed.error) });
		const { email } = parsed.data;
		// Only a look: the provider itself counts the request and enforces the limit (src/auth.ts),
		// so a direct call to Auth.js's endpoint is held to the same rules.
		const blocked = await signInBlocked(email, event.getClientAddress());
		if (blocked) return fail(429, { mode: 'link', email, errors: { form: blocked } });
		// Links go only to existing accounts (new people join by invitation or sign-up); the
		// answer is the same 303 to the same page either way.
		await requestSignInLink(event, email, safeRedirect(form.get('redirectTo')));
	}
};
