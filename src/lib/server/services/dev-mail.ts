// The local mail reader (/dev/mail): what the fake mail server received, for a demo or a
// developer's machine only, and of that only what the signed-in owner may read (see mayRead).
import { dev } from '$app/environment';
import type { ShopActor } from '../auth/guards';
import { inShop } from '../db';
import { demoMode, mailFakeDir } from '../env';
import { notFound } from '../errors';
import { listFakeMail, mayRead, readFakeMail, type FakeMessage, type InboxViewer } from '../mail/fake-inbox';
import { shopPeopleAddresses } from '../queries/members';

/** The reader exists while the local fake mail server takes the mail (LAPMARK_MAIL_DIR, set by
 * `npm start`/`npm run dev` only when SMTP_URL is not given) and only in demo or development
 * mode: a production start has no such route. */
export const mailReaderOn = mailFakeDir !== null && (demoMode || dev);

type Reader = Pick<ShopActor, 'shopId' | 'email'>;

async function viewerOf(actor: Reader): Promise<InboxViewer> {
	const addresses = await inShop(actor.shopId, (tx) => shopPeopleAddresses(tx, actor.shopId));
	return { email: actor.email, shopId: actor.shopId, shopAddresses: new Set(addresses) };
}

/** The mail folder, or 404 where there is no reader. */
function inbox(): string {
	if (!mailReaderOn || !mailFakeDir) throw notFound('Not found');
	return mailFakeDir;
}

export async function readableMail(actor: Reader): Promise<FakeMessage[]> {
	const dir = inbox();
	const viewer = await viewerOf(actor);
	return (await listFakeMail(dir)).filter((m) => mayRead(m, viewer));
}

/** One message, or 404 when it does not exist or is not the viewer's to read (the same answer). */
export async function readableMessage(actor: Reader, id: string): Promise<FakeMessage> {
	const message = await readFakeMail(inbox(), id);
	if (!message || !mayRead(message, await viewerOf(actor))) throw notFound('No such message.');
	return message;
}
