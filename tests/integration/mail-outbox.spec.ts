// Mail leaves through the outbox: a message queued in a transaction that rolls back never goes;
// one the SMTP server refuses stays queued with its error and goes out on a later retry.
import { eq, sql as raw } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { mailOutbox } from '../../src/lib/server/db/schema';
import { createTransport, deliver, queueMail, retryPending } from '../../src/lib/server/mail/outbox';
import { uniqueEmail } from '../helpers/people';
import { testDb } from '../helpers/db';
import { waitForMail } from '../helpers/mail';

const { db, sql } = testDb();
afterAll(() => sql.end());
const FROM = 'Lapmark test <test@lapmark.example>';

describe('mail outbox', () => {
	it('a message queued in a rolled-back transaction is never sent', async () => {
		const to = uniqueEmail('rollback');
		await db
			.transaction(async (tx) => {
				await queueMail(tx, { to, subject: 'never', text: 'never', kind: 'test' });
				throw new Error('roll back');
			})
			.catch(() => {});
		const rows = await db.select().from(mailOutbox).where(eq(mailOutbox.to, to));
		expect(rows).toHaveLength(0);
	});

	it('a refused send stays queued with its error, and a retry delivers it', async () => {
		const to = uniqueEmail('retry');
		const id = await queueMail(db, { to, subject: 'Retry me', text: 'hello', kind: 'test' });
		// Nothing listens on port 9 of loopback: the send fails.
		const down = createTransport('smtp://127.0.0.1:9');
		const first = await deliver(db, down, FROM, id);
		expect(first.sent).toBe(false);
		const [row] = await db.select().from(mailOutbox).where(eq(mailOutbox.id, id));
		expect(row).toMatchObject({ sentAt: null, attempts: 1 });
		expect(row.lastError).toMatch(/ECONNREFUSED|connect/i);
		// Due now, through the fake mail server the tests run.
		await db.update(mailOutbox).set({ nextAttemptAt: raw`now()` }).where(eq(mailOutbox.id, id));
		const since = Date.now() - 1000;
		const up = createTransport(process.env.SMTP_URL!);
		const results = await retryPending(db, up, FROM, 500);
		expect(results.find((r) => r.id === id)?.sent).toBe(true);
		await waitForMail(to, /Retry me/, since);
		const [after] = await db.select().from(mailOutbox).where(eq(mailOutbox.id, id));
		expect(after.sentAt).not.toBeNull();
		expect(after.attempts).toBe(2);
	});
});
