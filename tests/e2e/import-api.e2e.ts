// The import API over HTTP: tokens and roles, content types and size, a request aborted half
// way, and a server process killed in the middle of an import (kill -9): the database keeps
// nothing of either, and the killed import's batch is marked failed.
import { spawn } from 'node:child_process';
import { once } from 'node:events';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { newApiToken, sha256Hex } from '../../src/lib/server/auth/tokens';
import { withShop, withSystem } from '../../src/lib/server/db/scope';
import { apiTokens, families } from '../../src/lib/server/db/schema';
import { reapDeadImports } from '../../src/lib/server/import/run';
import { testDb } from '../helpers/db';
import { shopWithPeople } from '../helpers/people';

const baseURL = inject('baseURL');
const { db, sql } = testDb();
let shopId: string;
const tokens: Record<string, string> = {};

const HEADER = 'head_serial,family,stage,cylinder,side,valve,measured_at,measured_by,clearance_mm';
const row = (serial: string, i: number) => `${serial},ASH-4,as_received,${(i % 4) + 1},intake,1,2026-02-01T08:${String(i % 60).padStart(2, '0')}:${String(Math.floor(i / 60) % 60).padStart(2, '0')}Z,Kim,0.05`;

beforeAll(async () => {
	const { shop, people } = await shopWithPeople(db, 'importapi');
	shopId = shop.id;
	await withShop(db, shopId, (tx) => tx.insert(families).values({ shopId, code: 'ASH-4', cylinders: 4, intakeValves: 1, exhaustValves: 1 }));
	await withSystem(db, async (tx) => {
		for (const role of ['machinist', 'engineer', 'viewer'] as const) {
			const token = newApiToken();
			await tx.insert(apiTokens).values({ shopId, userId: people[role].userId, name: `${role} test`, prefix: token.slice(0, 10), tokenHash: sha256Hex(token), role });
			tokens[role] = token;
		}
	});
});
afterAll(() => sql.end());

async function readingsOf(serialLike: string) {
	const [r] = await sql.begin(async (t) => {
		await t`select set_config('lapmark.shop_id', ${shopId}, true)`;
		return t<{ n: number }[]>`select count(*)::int as n from readings r join heads h on h.id = r.head_id where h.serial like ${serialLike}`;
	});
	return r.n;
}

function post(path: string, body: BodyInit, role = 'machinist', headers: Record<string, string> = {}, base = baseURL) {
	return fetch(`${base}${path}`, {
		method: 'POST',
		headers: { authorization: `Bearer ${tokens[role]}`, 'content-type': 'text/csv', ...headers },
		body,
		duplex: 'half'
	} as RequestInit);
}

describe('POST /api/v1/imports', () => {
	it('imports with a machinist token and answers 201 with the counts', async () => {
		const res = await post('/api/v1/imports?onReject=abort&fileName=ok.csv', `${HEADER}\n${row('API-1', 1)}\n${row('API-1', 2)}\n`);
		expect(res.status).toBe(201);
		const body = await res.json();
		expect(body).toMatchObject({ accepted: 2, rejected: 0, readings: 2, createdHeads: 1, duplicateOf: null });
		const list = await (await fetch(`${baseURL}/api/v1/imports`, { headers: { authorization: `Bearer ${tokens.machinist}` } })).json();
		expect(list.batches[0].id).toBe(body.batchId);
		const again = await post('/api/v1/imports?fileName=ok.csv', `${HEADER}\n${row('API-1', 1)}\n${row('API-1', 2)}\n`);
		expect(again.status).toBe(409);
		expect((await again.json()).duplicateOf).toBe(body.batchId);
		// Only owners and engineers undo.
		const refuse = await fetch(`${baseURL}/api/v1/imports/${body.batchId}`, { method: 'DELETE', headers: { authorization: `Bearer ${tokens.machinist}` } });
		expect(refuse.status).toBe(403);
		const undo = await fetch(`${baseURL}/api/v1/imports/${body.batchId}`, { method: 'DELETE', headers: { authorization: `Bearer ${tokens.engineer}` } });
		expect(undo.status).toBe(200);
		expect(await readingsOf('API-1')).toBe(0);
	});

	it('answers 422 with the first rejects when rejected rows abort', async () => {
		const res = await post('/api/v1/imports?onReject=abort', `${HEADER}\n${row('API-2', 1)}\nAPI-2,ASH-4,as_received,7,intake,1,2026-02-01,Kim,0.05\n`);
		expect(res.status).toBe(422);
		const body = await res.json();
		expect(body.rejects).toEqual([{ line: 3, reason: 'cylinder 7 is outside ASH-4 (cylinders 1–4)', raw: 'API-2,ASH-4,as_received,7,intake,1,2026-02-01,Kim,0.05' }]);
		const csv = await (await fetch(`${baseURL}/api/v1/imports/${body.batchId}/rejects.csv`, { headers: { authorization: `Bearer ${tokens.machinist}` } })).text();
		expect(csv.split('\r\n')[1]).toBe('3,cylinder 7 is outside ASH-4 (cylinders 1–4),"API-2,ASH-4,as_received,7,intake,1,2026-02-01,Kim,0.05"');
		expect(await readingsOf('API-2')).toBe(0);
	});

	it('a dry run answers 200 and stores nothing', async () => {
		const res = await post('/api/v1/imports?dryRun=1', `${HEADER}\n${row('API-3', 1)}\n`);
		expect(res.status).toBe(200);
		expect(await res.json()).toMatchObject({ dryRun: true, batchId: null, readings: 1 });
		expect(await readingsOf('API-3')).toBe(0);
	});

	it.each([
		['viewer token', 'viewer', {}, 403],
		['JSON body', 'machinist', { 'content-type': 'application/json' }, 415],
		['declared size over the limit', 'machinist', { 'content-length': String(300 * 1024 * 1024) }, 413]
	])('refuses a %s', async (_n, role, headers, status) => {
		const res = await post('/api/v1/imports', `${HEADER}\n${row('API-4', 1)}\n`, role, headers as Record<string, string>).catch(() => null);
		if (status === 413 && res === null) return; // the client may refuse to send a body shorter than its declared length
		expect(res!.status).toBe(status);
		expect(await readingsOf('API-4')).toBe(0);
	});

	it('refuses bad query parameters with a clear message', async () => {
		const res = await post('/api/v1/imports?layout=diagonal', `${HEADER}\n`);
		expect(res.status).toBe(400);
		expect((await res.json()).message).toMatch(/layout must be wide or long/);
	});

	it('keeps nothing of an upload aborted half way', async () => {
		const controller = new AbortController();
		let sent = 0;
		const stream = new ReadableStream<Uint8Array>({
			async pull(c) {
				if (sent === 0) c.enqueue(new TextEncoder().encode(`${HEADER}\n`));
				const lines = Array.from({ length: 200 }, (_, i) => row(`ABORT-${sent}`, i)).join('\n') + '\n';
				c.enqueue(new TextEncoder().encode(lines));
				sent++;
				if (sent === 20) controller.abort();
				await new Promise((r) => setTimeout(r, 20));
			}
		});
		const res = await fetch(`${baseURL}/api/v1/imports?fileName=aborted.csv`, {
			method: 'POST',
			headers: { authorization: `Bearer ${tokens.machinist}`, 'content-type': 'text/csv' },
			body: stream,
			duplex: 'half',
			signal: controller.signal
		} as RequestInit).catch((e) => e);
		expect(res).toBeInstanceOf(Error);
		// The server notices the broken request, rolls back and marks the batch failed.
		let status = 'running';
		for (let i = 0; i < 50 && status === 'running'; i++) {
			await new Promise((r) => setTimeout(r, 200));
			const [b] = await sql.begin(async (t) => {
				await t`select set_config('lapmark.shop_id', ${shopId}, true)`;
				return t<{ status: string }[]>`select status from import_batches where shop_id = ${shopId} and file_name = 'aborted.csv'`;
			});
			status = b?.status ?? 'running';
		}
		expect(status).toBe('failed');
		expect(await readingsOf('ABORT-%')).toBe(0);
	});

	it('keeps nothing when the server process is killed mid-import (kill -9)', async () => {
		const port = Number(process.env.LAPMARK_TEST_KILL_PORT ?? 3190);
		const base = `http://127.0.0.1:${port}`;
		const child = spawn('node', ['server.js'], {
			env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', ORIGIN: base, BODY_SIZE_LIMIT: 'Infinity' },
			stdio: 'ignore'
		});
		// Listen for the exit now: a process ended by a signal keeps exitCode null, so checking it
		// later cannot tell whether the exit already happened.
		const exited = once(child, 'exit');
		try {
			for (let i = 0; i < 100; i++) {
				if (await fetch(`${base}/api/health`).then((r) => r.ok).catch(() => false)) break;
				await new Promise((r) => setTimeout(r, 200));
			}
			let sent = 0;
			const stream = new ReadableStream<Uint8Array>({
				async pull(c) {
					if (sent === 0) c.enqueue(new TextEncoder().encode(`${HEADER}\n`));
					c.enqueue(new TextEncoder().encode(Array.from({ length: 500 }, (_, i) => row(`KILL-${sent}`, i)).join('\n') + '\n'));
					sent++;
					await new Promise((r) => setTimeout(r, 30));
				}
			});
			// Kill the server once its import is under way (its batch is recorded and rows are being
			// read), however slow the machine is to get there; not after a fixed number of chunks.
			const killer = (async () => {
				for (let i = 0; i < 300; i++) {
					const [b] = await sql.begin(async (t) => {
						await t`select set_config('lapmark.shop_id', ${shopId}, true)`;
						return t`select 1 from import_batches where shop_id = ${shopId} and file_name = 'killed.csv'`;
					});
					if (b) break;
					await new Promise((r) => setTimeout(r, 100));
				}
				await new Promise((r) => setTimeout(r, 500));
				child.kill('SIGKILL');
			})();
			const res = await post('/api/v1/imports?fileName=killed.csv', stream, 'machinist', {}, base).catch((e) => e);
			await killer;
			expect(res).toBeInstanceOf(Error);
			await exited;
			// PostgreSQL ends the dead server's session and rolls its transaction back.
			let readings = -1;
			for (let i = 0; i < 50; i++) {
				readings = await readingsOf('KILL-%');
				const [b] = await sql.begin(async (t) => {
					await t`select set_config('lapmark.shop_id', ${shopId}, true)`;
					return t<{ status: string }[]>`select status from import_batches where shop_id = ${shopId} and file_name = 'killed.csv'`;
				});
				if (i === 0) expect(b.status).toBe('running'); // the dead server could not mark it
				if (b.status !== 'running') break;
				// Counts other shops' dead batches too: this one's status above says when it is done.
				await reapDeadImports(sql, 0);
				await new Promise((r) => setTimeout(r, 200));
			}
			expect(readings).toBe(0);
			const [after] = await sql.begin(async (t) => {
				await t`select set_config('lapmark.shop_id', ${shopId}, true)`;
				return t<{ status: string; error: string }[]>`select status, error from import_batches where shop_id = ${shopId} and file_name = 'killed.csv'`;
			});
			expect(after.status).toBe('failed');
			expect(after.error).toMatch(/stopped before it finished/);
		} finally {
			child.kill('SIGKILL');
		}
	});
});
