// Mail leaves through the outbox: queued in the caller's transaction, sent after it commits,
// retried with back-off when the SMTP server does not take it. Nothing is dropped silently:
// a message that has not gone out stays visible as pending with its last error.
import { and, asc, eq, inArray, isNull, lte, sql } from 'drizzle-orm';
import nodemailer, { type Transporter } from 'nodemailer';
import type { Db } from '../db/client';
import type { Conn } from '../db/scope';
import { mailOutbox, type MailMessage } from '../db/schema';

export interface OutgoingMail {
	to: string;
	subject: string;
	text: string;
	html?: string;
	kind: string;
	shopId?: string | null;
}

export function createTransport(smtpUrl: string): Transporter {
	return nodemailer.createTransport(smtpUrl);
}

/** Queues a message. The caller sends it with `deliver` after its transaction commits; the retry
 * loops leave it to that caller for a minute (so the caller learns whether it went out) and take
 * it only if it was never tried (the server died before sending). */
export async function queueMail(conn: Conn, mail: OutgoingMail): Promise<string> {
	const [row] = await conn
		.insert(mailOutbox)
		.values({ ...mail, html: mail.html ?? null, shopId: mail.shopId ?? null, nextAttemptAt: sql`now() + interval '1 minute'` })
		.returning({ id: mailOutbox.id });
	return row.id;
}

export interface DeliveryResult {
	id: string;
	sent: boolean;
	error?: string;
}

/** How long a claimed message stays with its sender: longer than any send takes (nodemailer gives
 * up on a silent server well before), short enough that a message whose sender died goes out
 * again soon after. */
const CLAIM_SECONDS = 10 * 60;

/**
 * Try to send one queued message now (right after the transaction that queued it committed).
 * The message is claimed first, in one statement: only a message nobody has tried yet can be
 * claimed here, so when a retry loop on another server took it first this call leaves it to
 * that one (and says so) rather than sending it a second time.
 */
export async function deliver(db: Db, transport: Transporter, from: string, id: string): Promise<DeliveryResult> {
	const [msg] = await db
		.update(mailOutbox)
		.set({ attempts: sql`${mailOutbox.attempts} + 1`, nextAttemptAt: sql`now() + make_interval(secs => ${CLAIM_SECONDS})` })
		.where(and(eq(mailOutbox.id, id), isNull(mailOutbox.sentAt), eq(mailOutbox.attempts, 0)))
		.returning();
	if (msg) return send(db, transport, from, msg);
	const [row] = await db.select({ sentAt: mailOutbox.sentAt }).from(mailOutbox).where(eq(mailOutbox.id, id)).limit(1);
	if (!row) return { id, sent: false, error: 'no such message' };
	if (row.sentAt) return { id, sent: true };
	return { id, sent: false, error: 'another sender has it; it goes out from there' };
}

/** Sends a message this process has claimed (its `attempts` already counts this try). */
async function send(db: Db, transport: Transporter, from: string, msg: MailMessage): Promise<DeliveryResult> {
	try {
		await transport.sendMail({ from, to: msg.to, subject: msg.subject, text: msg.text, html: msg.html ?? undefined, headers: lapmarkHeaders(msg) });
		await db.update(mailOutbox).set({ sentAt: new Date(), lastError: null }).where(eq(mailOutbox.id, msg.id));
		return { id: msg.id, sent: true };
	} catch (e) {
		const error = e instanceof Error ? e.message : String(e);
		// Back off: 30 s, 1 min, 2 min … capped at 30 min.
		const delay = Math.min(30 * 60, 30 * 2 ** Math.max(0, msg.attempts - 1));
		await db
			.update(mailOutbox)
			.set({ lastError: error.slice(0, 500), nextAttemptAt: sql`now() + make_interval(secs => ${delay})` })
			.where(eq(mailOutbox.id, msg.id));
		return { id: msg.id, sent: false, error };
	}
}

/** What kind of message it is and for which shop, for the local mail reader (/dev/mail). */
function lapmarkHeaders(msg: MailMessage): Record<string, string> {
	return { 'X-Lapmark-Kind': msg.kind, ...(msg.shopId ? { 'X-Lapmark-Shop': msg.shopId } : {}) };
}

/**
 * Send what is due. Called on a timer by every server; several at once never send a message
 * twice: due rows are claimed in one statement (`FOR UPDATE SKIP LOCKED`: a row another server is
 * claiming at that moment is passed over, not waited for), which moves their next attempt past
 * the claim's end, so no other server sees them as due while this one sends.
 */
export async function retryPending(db: Db, transport: Transporter, from: string, limit = 20): Promise<DeliveryResult[]> {
	const due = await db
		.update(mailOutbox)
		.set({ attempts: sql`${mailOutbox.attempts} + 1`, nextAttemptAt: sql`now() + make_interval(secs => ${CLAIM_SECONDS})` })
		.where(
			inArray(
				mailOutbox.id,
				db
					.select({ id: mailOutbox.id })
					.from(mailOutbox)
					.where(and(isNull(mailOutbox.sentAt), lte(mailOutbox.nextAttemptAt, sql`now()`)))
					.orderBy(asc(mailOutbox.nextAttemptAt))
					.limit(limit)
					.for('update', { skipLocked: true })
			)
		)
		.returning();
	const results: DeliveryResult[] = [];
	for (const msg of due) results.push(await send(db, transport, from, msg));
	return results;
}
