import { error, fail, redirect } from '@sveltejs/kit';
import { signIn } from '../../../auth';
import { fieldErrors, linkSignIn, passwordSignIn, safeRedirect } from '$lib/schemas/auth';
import { verifyPassword } from '$lib/server/auth/passwords';
import { noteAttempt, signInBlocked } from '$lib/server/auth/rate-limit';
import { db } from '$lib/server/db';
import { userExists } from '$lib/server/queries/sign-in';
import { users } from '$lib/server/db/schema';
import { eq } from 'drizzle-orm';
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
		const form = await event.request.clone().formData();
		const typedEmail = String(form.get('email') ?? '').slice(0, 254);
		const parsed = passwordSignIn.safeParse({ email: form.get('email'), password: form.get('password') });
		if (!parsed.success) return fail(400, { mode: 'password', email: typedEmail, errors: fieldErrors(parsed.error) });
		const { email, password } = parsed.data;
		const client = event.getClientAddress();
		const blocked = await signInBlocked(email, client);
		if (blocked) return fail(429, { mode: 'password', email, errors: { form: blocked } });
		const [user] = await db.select({ hash: users.passwordHash }).from(users).where(eq(users.email, email)).limit(1);
		const ok = await verifyPassword(password, user?.hash);
		await noteAttempt(email, client, ok && Boolean(user));
		if (!ok || !user) return fail(400, { mode: 'password', email, errors: { form: AUTH_ERRORS.CredentialsSignin } });
		await signIn(event); // sets the session cookie and redirects to redirectTo
	},
	link: async (event) => {
		const form = await event.request.clone().formData();
		const typedEmail = String(form.get('email') ?? '').slice(0, 254);
		const parsed = linkSignIn.safeParse({ email: form.get('email') });
		if (!parsed.success) return fail(400, { mode: 'link', email: typedEmail, errors: fieldErrors(parsed.error) });
		const { email } = parsed.data;
		const client = event.getClientAddress();
		const blocked = await signInBlocked(email, client);
		if (blocked) return fail(429, { mode: 'link', email, errors: { form: blocked } });
		// Every link request counts against the limit, so the form cannot be used to flood a mailbox.
		await noteAttempt(email, client, false);
		// Links go only to existing accounts (new people join by invitation); the answer is
		// the same either way so the form does not tell who has an account.
		if (await userExists(db, email)) await signIn(event);
		redirect(303, '/signin/check-email');
	}
};
