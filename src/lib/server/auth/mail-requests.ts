// Mail asked for on a public form whose answer must not tell whether the address has an
// account (forgot password, sign-in link). The form stores one request row — the same work for
// every address — and answers; the work that depends on the address (look it up, make the link,
// queue the mail in the outbox) runs right after the answer, and again from a timer for
// requests a stopped server left behind. Rows are claimed with FOR UPDATE SKIP LOCKED, so
// several servers never make two links for one request.
import { createHash, randomBytes } from 'node:crypto';
import { inArray, sql } from 'drizzle-orm';
import { building } from '$app/environment';
import { db } from '../db';
import type { Tx } from '../db/scope';
import { authMailRequests, verificationTokens } from '../db/schema';
import { env, publicOrigin } from '../env';
import { deliverQueued, queueMail } from '../mail';
import { signInLinkMail } from '../mail/messages';
import { recentAuthMails, userExists } from '../queries/sign-in';
import { queueReset } from '../services/password-reset';
import { MAILS_PER_ADDRESS_HOUR } from './rate-limit';

/** How long a sign-in link works. */
export const LINK_MINUTES = 60;

/** Stores a forgot-password request for `email` (known or not). */
export async function requestPasswordResetMail(email: string): Promise<void> {
	await db.insert(authMailRequests).values({ kind: 'password_reset', email });
	kick();
}

/** Stores a sign-in link request for `email` (known or not); `redirectTo` is a same-origin path. */
export async function requestSignInLinkMail(email: string, redirectTo: string): Promise<void> {
	await db.insert(authMailRequests).values({ kind: 'sign_in_link', email, redirectTo });
	kick();
}

/**
 * A sign-in link for an existing account, made as Auth.js's e-mail provider makes its own (a
 * random token stored hashed with the secret, checked by `/auth/callback/nodemailer`), and
 * queued in the outbox. Null when the address has no account.
 */
async function queueSignInLink(tx: Tx, email: string, redirectTo: string): Promise<string | null> {
	if (!(await userExists(tx, email))) return null;
	const token = randomBytes(32).toString('hex');
	await tx.insert(verificationTokens).values({
		identifier: email,
		token: createHash('sha256').update(`${token}${env.AUTH_SECRET}`).digest('hex'),
		expires: new Date(Date.now() + LINK_MINUTES * 60_000)
	});
	const url = `${publicOrigin}/auth/callback/nodemailer?${new URLSearchParams({ callbackUrl: `${publicOrigin}${redirectTo}`, token, email })}`;
	return queueMail(tx, { to: email, ...signInLinkMail(url) });
}

/** Turns pending requests into queued mail; returns how many requests were handled. */
export async function processAuthMailRequests(limit = 20): Promise<number> {
	const { handled, mailIds } = await db.transaction(async (tx) => {
		const rows = await tx.execute<{ id: string; kind: string; email: string; redirect_to: string | null; stale: boolean }>(sql`
			select id, kind, email, redirect_to, created_at < now() - make_interval(mins => ${LINK_MINUTES}) as stale
			from auth_mail_requests
			where done_at is null order by created_at limit ${limit}
			for update skip locked`);
		const mailIds: string[] = [];
		for (const r of rows) {
			// Requests older than a link's own lifetime are dropped, not mailed late; so are those
			// beyond the address's hourly mail limit (rate-limit.ts).
			if (r.stale || (await recentAuthMails(tx, r.email)) >= MAILS_PER_ADDRESS_HOUR) continue;
			const id = r.kind === 'sign_in_link' ? await queueSignInLink(tx, r.email, r.redirect_to ?? '/') : await queueReset(tx, r.email, publicOrigin);
			if (id) mailIds.push(id);
		}
		if (rows.length) {
			await tx.update(authMailRequests).set({ doneAt: sql`now()` }).where(inArray(authMailRequests.id, rows.map((r) => r.id)));
		}
		return { handled: rows.length, mailIds };
	});
	if (mailIds.length) await deliverQueued(mailIds);
	return handled;
}

let running: Promise<void> | null = null;
let again = false;

/** Runs the requests soon, after the current answer has gone out; never two runs at once. */
function kick() {
	if (running) {
		again = true;
		return;
	}
	running = new Promise<void>((resolve) => setImmediate(resolve))
		.then(async () => {
			do {
				again = false;
				while ((await processAuthMailRequests()) > 0);
			} while (again);
		})
		.catch((e) => console.error('[auth mail] requests failed; retried by the timer', e))
		.finally(() => {
			running = null;
		});
}

let timer: ReturnType<typeof setInterval> | null = null;

/** Started once by src/auth.ts: picks up requests a stopped server left, and every hour clears
 * sessions and sign-in attempts long past any use. */
export function startAuthMailWork(everyMs = 10_000) {
	if (timer || building) return;
	let ticks = 0;
	timer = setInterval(() => {
		kick();
		if (ticks++ % 360 === 0) void sweep().catch((e) => console.error('[auth] sweep failed', e));
	}, everyMs);
	timer.unref();
}

async function sweep() {
	await db.execute(sql`delete from user_sessions where expires_at < now() - interval '1 day'`);
	await db.execute(sql`delete from sign_in_attempts where at < now() - interval '1 day'`);
	await db.execute(sql`delete from auth_mail_requests where done_at < now() - interval '1 day'`);
}
