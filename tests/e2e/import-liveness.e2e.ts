// An import whose server died shows as failed by itself: every server watches for running
// batches whose heartbeat stopped (LAPMARK_IMPORT_WATCH_MS, here 500 ms) and marks them failed,
// with no page opened and no request made.
import { spawn } from 'node:child_process';
import { once } from 'node:events';
import type postgres from 'postgres';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { newApiToken, sha256Hex } from '../../src/lib/server/auth/tokens';
import { withSystem } from '../../src/lib/server/db/scope';
import { apiTokens } from '../../src/lib/server/db/schema';
import { testDb } from '../helpers/db';
import { shopWithPeople } from '../helpers/people';

const { db, sql } = testDb();
const baseURL = inject('baseURL');
let shopId: string;
const token = newApiToken();
beforeAll(async () => {
	const { shop, people } = await shopWithPeople(db, 'liveness');
	shopId = shop.id;
	await withSystem(db, (tx) =>
		tx.insert(apiTokens).values({ shopId, userId: people.machinist.userId, name: 'liveness', prefix: token.slice(0, 10), tokenHash: sha256Hex(token), role: 'machinist' })
	);
});
afterAll(() => sql.end());

async function inShop<T>(work: (t: postgres.TransactionSql) => Promise<T>) {
	return sql.begin(async (t) => {
		await t`select set_config('lapmark.shop_id', ${shopId}, true)`;
		return work(t);
	}) as Promise<T>;
}

describe('the watch for dead imports', () => {
	it('marks a running batch with a heartbeat older than 30 s failed within a minute, and leaves a live one', async () => {
		const port = Number(process.env.LAPMARK_TEST_PORT ?? 3100) + 61;
		const base = `http://127.0.0.1:${port}`;
		const child = spawn('node', ['server.js'], {
			env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', ORIGIN: base, LAPMARK_IMPORT_WATCH_MS: '500' },
			stdio: 'ignore'
		});
		const exited = once(child, 'exit');
		try {
			for (let i = 0; i < 150; i++) {
				if (await fetch(`${base}/api/health`).then((r) => r.ok).catch(() => false)) break;
				await new Promise((r) => setTimeout(r, 200));
			}
			const [dead, live] = await inShop(async (t) => [
				...(await t<{ id: string }[]>`
					insert into import_batches (shop_id, file_name, content_hash, layout, on_reject, status, heartbeat_at)
					values (${shopId}, 'dead.csv', '', 'wide', 'abort', 'running', now() - interval '40 seconds') returning id`),
				...(await t<{ id: string }[]>`
					insert into import_batches (shop_id, file_name, content_hash, layout, on_reject, status)
					values (${shopId}, 'live.csv', '', 'wide', 'abort', 'running') returning id`)
			]);
			let status = 'running';
			for (let i = 0; i < 120 && status === 'running'; i++) {
				await new Promise((r) => setTimeout(r, 500));
				status = (await inShop((t) => t<{ status: string }[]>`select status from import_batches where id = ${dead.id}`))[0].status;
			}
			const rows = await inShop((t) => t<{ id: string; status: string; error: string | null }[]>`
				select id, status, error from import_batches where id in (${dead.id}, ${live.id})`);
			const byId = new Map(rows.map((r) => [r.id, r]));
			expect(byId.get(dead.id)).toEqual({
				id: dead.id,
				status: 'failed',
				error: 'The import stopped before it finished (the server or the database restarted). Nothing from it was stored.'
			});
			expect(byId.get(live.id)).toEqual({ id: live.id, status: 'running', error: null });
			// It has no import behind it: gone, so that no other test's reaping finds it.
			await inShop((t) => t`delete from import_batches where id = ${live.id}`);
		} finally {
			child.kill('SIGTERM');
			await exited;
		}
	});

	it('a running import renews its heartbeat and its rows read, and finishes normally', async () => {
		let stop = false;
		let n = 0;
		const enc = new TextEncoder();
		const body = new ReadableStream<Uint8Array>({
			async pull(c) {
				if (n === 0) {
					c.enqueue(enc.encode('head_serial,family,stage,cylinder,side,valve,measured_at,measured_by,clearance_mm\n'));
					// Enough rows at once for a progress report (every 25,000 rows).
					const t0 = Date.parse('2026-01-01T00:00:00Z');
					const rows = Array.from({ length: 25_000 }, (_, i) => `BULK-1,TEST-4,as_received,1,intake,1,${new Date(t0 + i * 1000).toISOString()},Kim,0.05`);
					c.enqueue(enc.encode(rows.join('\n') + '\n'));
				}
				if (stop) return c.close();
				n++;
				c.enqueue(enc.encode(`BEAT-${n},TEST-4,as_received,1,intake,1,2026-02-01T08:00:00Z,Kim,0.05\n`));
				await new Promise((r) => setTimeout(r, 200));
			}
		});
		const answer = fetch(`${baseURL}/api/v1/imports?fileName=heartbeat.csv`, {
			method: 'POST',
			headers: { authorization: `Bearer ${token}`, 'content-type': 'text/csv' },
			body,
			duplex: 'half'
		} as RequestInit);
		let seen: { status: string; beat: number; progress: number } | undefined;
		for (let i = 0; i < 150; i++) {
			await new Promise((r) => setTimeout(r, 200));
			[seen] = await inShop((t) => t<{ status: string; beat: number; progress: number }[]>`
				select status, extract(epoch from heartbeat_at - created_at)::float8 as beat, progress_rows as progress
				from import_batches where file_name = 'heartbeat.csv'`);
			if (seen && seen.beat >= 4) break;
		}
		expect(seen?.status).toBe('running');
		expect(seen!.beat).toBeGreaterThanOrEqual(4);
		expect(seen!.progress).toBe(25_000);
		stop = true;
		const res = await answer;
		expect(res.status).toBe(201);
		expect((await res.json()).readings).toBe(25_000 + n);
	});
});
