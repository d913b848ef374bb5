// The local mail reader (/dev/mail): what the fake mail server received, for a demo or a
// developer's machine only, and of that only what the signed-in owner may read (see mayRead).
import { error } from '@sveltejs/kit';
import { dev } from '$app/environment';
import { sql as drizzleSql } from 'drizzle-orm';
import type { ShopActor } from '../auth/guards';
import { db } from '../db';
import { withShop } from '../db/scope';
import { demoMode, mailFakeDir } from '../env';
import { listFakeMail, mayRead, readFakeMail, type FakeMessage, type InboxViewer } from './fake-inbox';

/** The reader exists while the local fake mail server takes the mail (LAPMARK_MAIL_DIR, set by
 * `npm start`/`npm run dev` only when SMTP_URL is not given) and only in demo or development
 * mode: a production start has no such route. */
export const mailReaderOn = mailFakeDir !== null && (demoMode || dev);

async function viewerOf(actor: ShopActor): Promise<InboxViewer> {
	const rows = await withShop(db, actor.shopId, (tx) =>
		tx.execute<{ address: string }>(drizzleSql`
			select lower(u.email) as address from memberships m join "user" u on u.id = m.user_id where m.shop_id = ${actor.shopId}
			union select lower(customer_email) from heads where shop_id = ${actor.shopId} and customer_email is not null
			union select lower(email) from invitations
				where shop_id = ${actor.shopId} and accepted_at is null and revoked_at is null and expires_at > now()`)
	);
	return { email: actor.email, shopId: actor.shopId, shopAddresses: new Set(rows.map((r) => r.address)) };
}

export async function readableMail(actor: ShopActor): Promise<FakeMessage[]> {
	if (!mailReaderOn || !mailFakeDir) error(404, 'Not found');
	const viewer = await viewerOf(actor);
	return (await listFakeMail(mailFakeDir)).filter((m) => mayRead(m, viewer));
}

/** One message, or 404 when it does not exist or is not the viewer's to read (the same answer). */
export async function readableMessage(actor: ShopActor, id: string): Promise<FakeMessage> {
	if (!mailReaderOn || !mailFakeDir) error(404, 'Not found');
	const message = await readFakeMail(mailFakeDir, id);
	if (!message || !mayRead(message, await viewerOf(actor))) error(404, 'No such message.');
	return message;
}
