// The outbox on several servers at once: two processes run the retry loop against one database
// and one SMTP server (the fake the tests run), and every due message arrives exactly once.
import { spawn } from 'node:child_process';
import { randomUUID } from 'node:crypto';
import { afterAll, describe, expect, it } from 'vitest';
import { listFakeMail } from '../../src/lib/server/mail/fake-inbox';
import { testDb } from '../helpers/db';

const { sql } = testDb();
afterAll(() => sql.end());

/** A retry loop in a process of its own; resolves `ready` once it is connected. */
function worker() {
	const child = spawn('node', ['--import', 'tsx', 'tests/helpers/outbox-worker.ts'], { stdio: ['pipe', 'pipe', 'inherit'] });
	let out = '';
	let onReady: () => void;
	const ready = new Promise<void>((r) => (onReady = r));
	child.stdout.on('data', (c) => {
		out += c;
		if (out.startsWith('ready\n')) onReady();
	});
	const done = new Promise<{ sent: number; failed: number }>((resolve, reject) => {
		child.on('error', reject);
		child.on('exit', (code) => (code === 0 ? resolve(JSON.parse(out.trim().split('\n').pop()!)) : reject(new Error(`worker exited with ${code}`))));
	});
	return { ready, done, go: () => child.stdin.end('go\n') };
}

describe('mail outbox on two servers', () => {
	it('sends each of 200 messages whose first send failed exactly once', async () => {
		const run = randomUUID().slice(0, 8);
		const n = 200;
		// As the outbox holds them after a first send the SMTP server refused: tried once, due now.
		await sql`
			insert into mail_outbox ("to", subject, text, kind, attempts, last_error, next_attempt_at)
			select 'twice-' || ${run} || '-' || i || '@test.example', 'Outbox ' || ${run} || ' #' || i, 'message ' || i, 'test', 1,
				'connect ECONNREFUSED 127.0.0.1:9', now() - interval '1 second'
			from generate_series(1, ${n}) as i`;
		const workers = [worker(), worker()];
		await Promise.all(workers.map((w) => w.ready));
		for (const w of workers) w.go();
		const [a, b] = await Promise.all(workers.map((w) => w.done));

		// Another server on this database (the browser tests' app, whose retry loop runs too) may
		// have claimed a few and still be sending them when both workers are done: wait, bounded,
		// until every row is marked sent and the fake server has written what it received.
		const ours = async () => (await listFakeMail(process.env.LAPMARK_MAIL_DIR!)).filter((m) => m.subject.startsWith(`Outbox ${run} #`));
		for (let deadline = Date.now() + 30_000; Date.now() < deadline; ) {
			const [{ unsent }] = await sql<{ unsent: number }[]>`select count(*)::int as unsent from mail_outbox where subject like ${`Outbox ${run} #%`} and sent_at is null`;
			if (unsent === 0 && (await ours()).length >= n) break;
			await new Promise((r) => setTimeout(r, 200));
		}
		const received = await ours();
		const perSubject = new Map<string, number>();
		for (const m of received) perSubject.set(m.subject, (perSubject.get(m.subject) ?? 0) + 1);
		expect(received.length).toBe(n);
		expect(perSubject.size).toBe(n);
		expect(Math.max(...perSubject.values())).toBe(1);

		const [row] = await sql<{ sent: number; attempts: number }[]>`
			select count(*) filter (where sent_at is not null)::int as sent, max(attempts)::int as attempts
			from mail_outbox where subject like ${`Outbox ${run} #%`}`;
		expect(row).toEqual({ sent: n, attempts: 2 });
		// Both processes took part (the test would prove little if one did all the work), and
		// what they sent adds up: other servers on this database may have sent a few as well.
		expect(a.failed + b.failed).toBe(0);
		expect(a.sent).toBeGreaterThan(0);
		expect(b.sent).toBeGreaterThan(0);
		expect(a.sent + b.sent).toBeLessThanOrEqual(n);
	});
});
