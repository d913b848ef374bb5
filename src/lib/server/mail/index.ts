// The app's mail service: the outbox bound to the configured SMTP server.
import { db } from '../db';
import type { Conn } from '../db/scope';
import { env } from '../env';
import { createTransport, deliver, queueMail, retryPending, type OutgoingMail } from './outbox';

const transport = createTransport(env.SMTP_URL);

export { queueMail };
export type { OutgoingMail };

/** Send messages queued by a committed transaction; returns how many did not go out yet. */
export async function deliverQueued(ids: string[]): Promise<{ failed: number; errors: string[] }> {
	const results = await Promise.all(ids.map((id) => deliver(db, transport, env.MAIL_FROM, id)));
	const failed = results.filter((r) => !r.sent);
	return { failed: failed.length, errors: failed.map((r) => r.error ?? 'unknown error') };
}

/** Queue and send one message outside any other transaction. */
export async function sendNow(mail: OutgoingMail, conn: Conn = db) {
	const id = await queueMail(conn, mail);
	return deliverQueued([id]);
}

/** Sends due messages that failed before (the jobs module runs this every 15 s). */
export function retryMail() {
	return retryPending(db, transport, env.MAIL_FROM);
}
