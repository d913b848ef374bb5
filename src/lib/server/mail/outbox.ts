// Mail leaves through the outbox: queued in the caller's transaction, sent after it commits,
// retried with back-off when the SMTP server does not take it. Nothing is dropped silently:
// a message that has not gone out stays visible as pending with its last error.
import { and, asc, eq, isNull, lte, sql } from 'drizzle-orm';
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

export async function queueMail(conn: Conn, mail: OutgoingMail): Promise<string> {
	const [row] = await conn
		.insert(mailOutbox)
		.values({ ...mail, html: mail.html ?? null, shopId: mail.shopId ?? null })
		.returning({ id: mailOutbox.id });
	return row.id;
}

export interface DeliveryResult {
	id: string;
	sent: boolean;
	error?: string;
}

/** Try to send one queued message now; records the outcome on the row. */
export async function deliver(db: Db, transport: Transporter, from: string, id: string): Promise<DeliveryResult> {
	const [msg] = await db.select().from(mailOutbox).where(eq(mailOutbox.id, id)).limit(1);
	if (!msg) return { id, sent: false, error: 'no such message' };
	if (msg.sentAt) return { id, sent: true };
	return send(db, transport, from, msg);
}

async function send(db: Db, transport: Transporter, from: string, msg: MailMessage): Promise<DeliveryResult> {
	try {
		await transport.sendMail({ from, to: msg.to, subject: msg.subject, text: msg.text, html: msg.html ?? undefined });
		await db.update(mailOutbox).set({ sentAt: new Date(), attempts: msg.attempts + 1, lastError: null }).where(eq(mailOutbox.id, msg.id));
		return { id: msg.id, sent: true };
	} catch (e) {
		const error = e instanceof Error ? e.message : String(e);
		// Back off: 30 s, 1 min, 2 min … capped at 30 min.
		const delay = Math.min(30 * 60, 30 * 2 ** msg.attempts);
		await db
			.update(mailOutbox)
			.set({
				attempts: msg.attempts + 1,
				lastError: error.slice(0, 500),
				nextAttemptAt: sql`now() + make_interval(secs => ${delay})`
			})
			.where(eq(mailOutbox.id, msg.id));
		return { id: msg.id, sent: false, error };
	}
}

/** Send what is due. Called on a timer by the server; safe to run on several servers at once. */
export async function retryPending(db: Db, transport: Transporter, from: string, limit = 20): Promise<DeliveryResult[]> {
	const due = await db
		.select()
		.from(mailOutbox)
		.where(and(isNull(mailOutbox.sentAt), lte(mailOutbox.nextAttemptAt, sql`now()`)))
		.orderBy(asc(mailOutbox.nextAttemptAt))
		.limit(limit);
	const results: DeliveryResult[] = [];
	for (const msg of due) results.push(await send(db, transport, from, msg));
	return results;
}
