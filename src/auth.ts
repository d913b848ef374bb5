// Auth.js: e-mail + password (Credentials) and sign-in links by e-mail (Nodemailer provider),
// users and link tokens stored through the Drizzle adapter. Sessions are signed JWT cookies
// (which Credentials requires) carrying the id of a server-side session row that every request
// checks (auth/sessions.ts), so a session can be ended on the server.
//
// The rules hold inside Auth.js itself, not only in Lapmark's forms, because its endpoints
// (`POST /auth/signin/nodemailer` …) can be called directly:
// - a request for a link is answered in the signIn callback (`email.verificationRequest`), the
//   same for every address: counted against the sign-in rate limit and stored; the link is made
//   and mailed after the answer, only to an existing account (auth/mail-requests.ts);
// - the adapter never creates an account (accounts come from an invitation or the shop sign-up,
//   auth/accounts.ts);
// - a password is checked once, by `passwordOwner` (services/sign-in.ts) in the sign-in page's
//   action; `authorize` checks nothing itself and only accepts the person that action (or an
//   accepted invitation, a confirmed sign-up) verified in this same request;
// - every URL Auth.js builds starts with ORIGIN (pinPublicOrigin).
import { DrizzleAdapter } from '@auth/drizzle-adapter';
import { SvelteKitAuth, type SvelteKitAuthConfig } from '@auth/sveltekit';
import Credentials from '@auth/sveltekit/providers/credentials';
import Nodemailer from '@auth/sveltekit/providers/nodemailer';
import { redirect, type Handle, type RequestEvent } from '@sveltejs/kit';
import type { Adapter } from '@auth/core/adapters';
import { db } from '$lib/server/db';
import { accounts, sessions, users, verificationTokens } from '$lib/server/db/schema';
import { env, publicOrigin } from '$lib/server/env';
import { NO_ACCOUNT_CREATION } from '$lib/server/auth/accounts';
import { LINK_MINUTES, requestSignInLinkMail, startAuthMailWork } from '$lib/server/auth/mail-requests';
import { claimAttempt, noteAttempt } from '$lib/server/auth/rate-limit';
import { SESSION_MAX_DAYS, endSession, startSession } from '$lib/server/auth/sessions';
import { userExists } from '$lib/server/queries/sign-in';
import type { VerifiedUser } from '$lib/server/services/sign-in';

const origin = new URL(publicOrigin);

/**
 * Auth.js builds its absolute URLs (the mailed sign-in link, redirects) from X-Forwarded-Host /
 * X-Forwarded-Proto, else Host. Lapmark never trusts those for URLs: they are set to ORIGIN's
 * before Auth.js or any other code sees the request. (Behind a proxy, ORIGIN is the public URL
 * and adapter-node's ADDRESS_HEADER/XFF_DEPTH give the client's address; see the README.)
 */
function pinPublicOrigin(headers: Headers) {
	headers.set('host', origin.host);
	headers.set('x-forwarded-host', origin.host);
	headers.set('x-forwarded-proto', origin.protocol.replace(/:$/, ''));
}

/** The people the sign-in page's action (or an invitation) verified, per request event. */
const verified = new WeakMap<object, VerifiedUser>();

const baseAdapter = DrizzleAdapter(db, {
	usersTable: users,
	accountsTable: accounts,
	sessionsTable: sessions,
	verificationTokensTable: verificationTokens
});
const adapter: Adapter = {
	...baseAdapter,
	createUser() {
		throw new Error(NO_ACCOUNT_CREATION);
	}
};

/** Where Auth.js sends a link request; the same for every address, sent or not. */
const VERIFY_REQUEST = `${publicOrigin}/auth/verify-request?provider=nodemailer&type=email`;

function config(event: RequestEvent): SvelteKitAuthConfig {
	return {
		adapter,
		secret: env.AUTH_SECRET,
		// Safe: the request's host headers were pinned to ORIGIN before Auth.js reads them.
		trustHost: true,
		useSecureCookies: origin.protocol === 'https:',
		basePath: '/auth',
		// The cookie's own lifetime; the server-side session (idle and absolute end) decides.
		session: { strategy: 'jwt', maxAge: SESSION_MAX_DAYS * 24 * 60 * 60 },
		pages: { signIn: '/signin', error: '/signin', verifyRequest: '/signin/check-email' },
		providers: [
			Credentials({
				credentials: {},
				// Reached only through signInVerified() below: the direct endpoint is closed
				// (hooks.server.ts), and nothing is checked twice.
				authorize: () => verified.get(event) ?? null
			}),
			Nodemailer({
				server: env.SMTP_URL,
				from: env.MAIL_FROM,
				maxAge: LINK_MINUTES * 60,
				// Never reached: the signIn callback answers every link request itself, and the link
				// is made and mailed after the answer (auth/mail-requests.ts).
				sendVerificationRequest() {
					throw new Error('Sign-in links are made by auth/mail-requests.ts.');
				}
			})
		],
		callbacks: {
			async signIn({ user, account, email }) {
				if (account?.provider !== 'nodemailer') return true;
				const address = String(user.email ?? '').toLowerCase();
				if (email?.verificationRequest) {
					// Answered here, the same for every address: the request is counted and stored,
					// and the link is made (for an existing account, within the limits) after the
					// answer. Auth.js itself never makes or sends one.
					await askForSignInLink(address, event.getClientAddress(), '/');
					return VERIFY_REQUEST;
				}
				// Following a link: only to an account that exists (the adapter creates none).
				return userExists(db, address);
			},
			async jwt({ token, user, account }) {
				if (user?.id) {
					token.sub = user.id;
					token.sid = await startSession(db, user.id);
					// A link that worked is a success for the rate limit, as a right password is.
					if (account?.provider === 'nodemailer' && user.email) await noteAttempt(user.email.toLowerCase(), event.getClientAddress(), true);
				}
				return token;
			},
			session({ session, token }) {
				if (token.sub) session.user.id = token.sub;
				if (typeof token.sid === 'string') session.sessionId = token.sid;
				return session;
			}
		},
		events: {
			async signOut(message) {
				const sid = 'token' in message ? message.token?.sid : null;
				if (typeof sid === 'string') await endSession(db, sid);
			}
		}
	};
}

const auth = SvelteKitAuth(async (event) => config(event));

export const signOut = auth.signOut;
/** Auth.js's own helper, kept for links (provider `nodemailer`). For a password sign-in use
 * signInVerified(): `authorize` accepts only a person checked in the same request. */
export const signIn = auth.signIn;

/** Auth.js's handle, after pinning the request's host headers to ORIGIN. */
export const handle: Handle = ({ event, resolve }) => {
	pinPublicOrigin(event.request.headers);
	return auth.handle({ event, resolve });
};

/** An event like `event` whose request is a form POST of `fields` (for Auth.js's helpers). */
function formEvent(event: RequestEvent, fields: Record<string, string>): RequestEvent {
	const headers = new Headers(event.request.headers);
	headers.set('content-type', 'application/x-www-form-urlencoded');
	headers.delete('content-length');
	const request = new Request(event.request.url, { method: 'POST', headers, body: new URLSearchParams(fields) });
	return { ...event, request };
}

/**
 * Signs in a person whose password the caller has just checked (the sign-in page, through
 * passwordOwner; a confirmed sign-up) or who has just made an account (an invitation): sets the session cookie and redirects to `redirectTo`
 * (a same-origin path; Auth.js refuses others).
 */
export async function signInVerified(event: RequestEvent, user: VerifiedUser, redirectTo: string): Promise<never> {
	const e = formEvent(event, { providerId: 'credentials', redirectTo });
	verified.set(e, user);
	await auth.signIn(e);
	throw new Error('Auth.js did not redirect after signing in');
}

/**
 * Asks for a sign-in link to `email` and answers as for every address: 303 to the
 * check-your-mail page.
 */
export async function requestSignInLink(event: RequestEvent, email: string, redirectTo: string): Promise<never> {
	await askForSignInLink(email, event.getClientAddress(), redirectTo);
	redirect(303, '/signin/check-email');
}

/**
 * The one path to a sign-in link, for the form and for Auth.js's endpoint alike: counted against
 * the rate limit (every request, known address or not), then stored; mail-requests.ts makes and
 * mails the link after the answer, only to an existing account and within the hourly limit.
 */
async function askForSignInLink(email: string, client: string, redirectTo: string): Promise<void> {
	if (email.length > 254) return; // no account has such an address (the form says so itself)
	const claim = await claimAttempt(email, client);
	if (claim.blocked === null) await requestSignInLinkMail(email, redirectTo);
}

startAuthMailWork();

declare module '@auth/core/types' {
	interface Session {
		/** The server-side session (user_sessions.id) behind the cookie. */
		sessionId?: string;
	}
}
declare module '@auth/core/jwt' {
	interface JWT {
		sid?: string;
	}
}
