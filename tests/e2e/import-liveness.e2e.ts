// An import whose server died shows as failed by itself: every server watches for running
// batches whose heartbeat stopped (LAPMARK_IMPORT_WATCH_MS, here 500 ms) and marks them failed,
// with no page opened and no request made.
import { spawn } from 'node:child_process';
import { once } from 'node:events';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { testDb } from '../helpers/db';
import { shopWithPeople } from '../helpers/people';

const { db, sql } = testDb();
let shopId: string;
beforeAll(async () => {
	shopId = (await shopWithPeople(db, 'liveness')).shop.id;
});
afterAll(() => sql.end());

async function inShop<T>(work: (t: Parameters<Parameters<typeof sql.begin>[0]>[0]) => Promise<T>) {
	return sql.begin(async (t) => {
		await t`select set_config('lapmark.shop_id', ${shopId}, true)`;
		return work(t);
	}) as Promise<T>;
}

describe('the watch for dead imports', () => {
	it('marks a running batch with a heartbeat older than 30 s failed within a minute, and leaves a live one', async () => {
		const port = Number(process.env.LAPMARK_TEST_PORT ?? 3100) + 61;
		const base = `http://127.0.0.1:${port}`;
		const child = spawn('node', ['build'], {
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
		} finally {
			child.kill('SIGTERM');
			await exited;
		}
	});
});
