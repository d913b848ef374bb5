// Reads what the local fake mail server kept (the folder `npm test` gives it).
import { listFakeMail, linksIn, type FakeMessage } from '../../src/lib/server/mail/fake-inbox';

export async function waitForMail(to: string, subject: RegExp, after = 0, timeoutMs = 10_000): Promise<FakeMessage> {
	const dir = process.env.LAPMARK_MAIL_DIR;
	if (!dir) throw new Error('LAPMARK_MAIL_DIR is not set: run through `npm test`.');
	const deadline = Date.now() + timeoutMs;
	for (;;) {
		const found = (await listFakeMail(dir)).find((m) => m.to.includes(to) && subject.test(m.subject) && Date.parse(m.receivedAt) >= after);
		if (found) return found;
		if (Date.now() > deadline) throw new Error(`no mail to ${to} matching ${subject}`);
		await new Promise((r) => setTimeout(r, 200));
	}
}

export function firstLink(message: FakeMessage): string {
	const link = linksIn(message.text)[0];
	if (!link) throw new Error(`no link in "${message.subject}"`);
	return link;
}
