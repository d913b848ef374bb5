// A local fake mail server for development and tests: accepts every message on a loopback
// port and keeps it as JSON (plus the raw .eml) in a folder that /dev/mail and tests read.
//   LAPMARK_SMTP_PORT (default 2525)   LAPMARK_MAIL_DIR (required)
import { mkdirSync, renameSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';

const port = Number(process.env.LAPMARK_SMTP_PORT ?? 2525);
const dir = process.env.LAPMARK_MAIL_DIR;
if (!dir) {
	console.error('[mail] LAPMARK_MAIL_DIR is not set');
	process.exit(2);
}
mkdirSync(dir, { recursive: true });

let counter = 0;
const server = new SMTPServer({
	authOptional: true,
	disabledCommands: ['STARTTLS'],
	banner: 'Lapmark local fake mail server',
	size: 25 * 1024 * 1024,
	onData(stream, session, callback) {
		const chunks: Buffer[] = [];
		stream.on('data', (c: Buffer) => chunks.push(c));
		stream.on('end', async () => {
			try {
				const raw = Buffer.concat(chunks);
				const parsed = await simpleParser(raw);
				const receivedAt = new Date().toISOString();
				const id = `${receivedAt.replace(/[:.]/g, '-')}-${process.pid}-${++counter}`;
				const to = session.envelope.rcptTo.map((r) => r.address);
				// Lapmark's outbox names the kind of message and its shop, for the reader's rules.
				const header = (name: string) => {
					const v = parsed.headers.get(name);
					return typeof v === 'string' && /^[\w-]{1,64}$/.test(v) ? v : undefined;
				};
				const message = {
					id,
					receivedAt,
					from: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
					to,
					subject: parsed.subject ?? '',
					text: parsed.text ?? '',
					html: typeof parsed.html === 'string' ? parsed.html : '',
					kind: header('x-lapmark-kind'),
					shopId: header('x-lapmark-shop')
				};
				writeFileSync(join(dir, `${id}.eml`), raw);
				// Written last and whole: a reader never sees half a message.
				writeFileSync(join(dir, `${id}.json.tmp`), JSON.stringify(message));
				renameSync(join(dir, `${id}.json.tmp`), join(dir, `${id}.json`));
				callback();
			} catch (e) {
				callback(e as Error);
			}
		});
	}
});

server.on('error', (e: NodeJS.ErrnoException) => {
	if (e.code === 'EADDRINUSE') console.error(`[mail] port ${port} on 127.0.0.1 is taken; set LAPMARK_SMTP_PORT to a free port`);
	else console.error('[mail]', e.message);
	process.exit(1);
});

server.listen(port, '127.0.0.1', () => {
	console.error(`[mail] fake mail server on 127.0.0.1:${port}, keeping messages in ${dir}`);
});

for (const sig of ['SIGINT', 'SIGTERM'] as const) process.on(sig, () => server.close(() => process.exit(0)));
