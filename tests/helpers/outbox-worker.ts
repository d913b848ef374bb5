// One mail server's retry loop in a process of its own, for the outbox test with several servers:
// runs retryPending against DATABASE_URL and SMTP_URL until nothing is due, then prints how many
// messages it sent as one line of JSON.
// It says "ready" once connected and starts when it reads a line on stdin, so that several
// workers start together however slowly each process came up.
import { createDb } from '../../src/lib/server/db/client';
import { createTransport, retryPending } from '../../src/lib/server/mail/outbox';

const { db, sql } = createDb(process.env.DATABASE_URL!, { max: 2 });
const transport = createTransport(process.env.SMTP_URL!);
await sql`select 1`;
console.log('ready');
await new Promise((r) => process.stdin.once('data', r));
process.stdin.pause();

let sent = 0;
let failed = 0;
for (;;) {
	const results = await retryPending(db, transport, 'Lapmark test <test@lapmark.example>', 10);
	if (results.length === 0) break;
	for (const r of results) r.sent ? sent++ : failed++;
}
console.log(JSON.stringify({ pid: process.pid, sent, failed }));
transport.close();
await sql.end();
