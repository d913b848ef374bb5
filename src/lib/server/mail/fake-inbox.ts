// Reads what the local fake mail server kept (scripts/mail-fake.ts), newest first.
import { readdir, readFile } from 'node:fs/promises';
import { join } from 'node:path';

export interface FakeMessage {
	id: string;
	receivedAt: string;
	from: string;
	to: string[];
	subject: string;
	text: string;
	html: string;
	/** The outbox's kind of message (sign_in_link, password_reset, invitation, head_report …), from
	 * its X-Lapmark-Kind header; missing on mail that did not come from Lapmark's outbox. */
	kind?: string;
	/** The shop the message was sent for (X-Lapmark-Shop), when it was sent for one. */
	shopId?: string;
}

/** Who is reading the local inbox: their own address, their current shop, and every address
 * that belongs to that shop (its members, the customers on its heads, its open invitations). */
export interface InboxViewer {
	email: string;
	shopId: string;
	shopAddresses: ReadonlySet<string>;
}

/** Mail a shop sends in its own name, readable by that shop's owner. Any other kind (sign-in
 * links, password resets, whatever is added later), or mail without one, is an account's own. */
const SHOP_KINDS = new Set(['invitation', 'head_report']);

/**
 * Whether the viewer may read a message in the local inbox. A sign-in link, a password reset, or
 * any message of another or unknown kind: only when it went to the viewer alone. A shop's own
 * mail (invitations, head reports): only the viewer's current shop's, and only when every
 * recipient belongs to that shop.
 */
export function mayRead(m: FakeMessage, viewer: InboxViewer): boolean {
	const to = m.to.map((a) => a.toLowerCase());
	if (to.length === 0) return false;
	const own = viewer.email.toLowerCase();
	if (!m.kind || !SHOP_KINDS.has(m.kind)) return to.every((a) => a === own);
	return m.shopId === viewer.shopId && to.every((a) => viewer.shopAddresses.has(a));
}

export async function listFakeMail(dir: string): Promise<FakeMessage[]> {
	let names: string[];
	try {
		names = await readdir(dir);
	} catch {
		return [];
	}
	const files = names.filter((n) => n.endsWith('.json')).sort().reverse();
	const all = await Promise.all(files.map(async (f) => JSON.parse(await readFile(join(dir, f), 'utf8')) as FakeMessage));
	return all;
}

export async function readFakeMail(dir: string, id: string): Promise<FakeMessage | null> {
	if (!/^[\w-]+$/.test(id)) return null;
	try {
		return JSON.parse(await readFile(join(dir, `${id}.json`), 'utf8')) as FakeMessage;
	} catch {
		return null;
	}
}

/** Links in a message's text, for following a sign-in or invitation link. */
export function linksIn(text: string): string[] {
	return [...text.matchAll(/https?:\/\/[^\s<>"]+/g)].map((m) => m[0]);
}
