import { and, asc, desc, eq, sql } from 'drizzle-orm';
import type { Conn, ScopedSql } from '../db/scope';
import { importBatches, importRejects, shops, users } from '../db/schema';
import type { OnReject } from '../import/types';

export type { OnReject };

const batchColumns = {
	id: importBatches.id,
	fileName: importBatches.fileName,
	layout: importBatches.layout,
	onReject: importBatches.onReject,
	status: importBatches.status,
	accepted: importBatches.rowsAccepted,
	rejected: importBatches.rowsRejected,
	readings: importBatches.readings,
	duplicates: importBatches.duplicates,
	createdHeads: importBatches.createdHeads,
	bytes: importBatches.bytes,
	progressRows: importBatches.progressRows,
	clientRef: importBatches.clientRef,
	error: importBatches.error,
	createdBy: users.email,
	createdAt: importBatches.createdAt,
	finishedAt: importBatches.finishedAt
};

export async function listBatches(conn: Conn, shopId: string, opts: { limit?: number; clientRef?: string } = {}) {
	return conn
		.select(batchColumns)
		.from(importBatches)
		.leftJoin(users, eq(users.id, importBatches.createdBy))
		.where(and(eq(importBatches.shopId, shopId), opts.clientRef ? eq(importBatches.clientRef, opts.clientRef) : undefined))
		.orderBy(desc(importBatches.createdAt))
		.limit(opts.limit ?? 100);
}

export async function getBatch(conn: Conn, shopId: string, id: string) {
	const [row] = await conn
		.select(batchColumns)
		.from(importBatches)
		.leftJoin(users, eq(users.id, importBatches.createdBy))
		.where(and(eq(importBatches.shopId, shopId), eq(importBatches.id, id)))
		.limit(1);
	return row ?? null;
}

export async function firstRejects(conn: Conn, shopId: string, batchId: string, limit = 20) {
	return conn
		.select({ line: importRejects.line, reason: importRejects.reason, raw: importRejects.raw })
		.from(importRejects)
		.where(and(eq(importRejects.shopId, shopId), eq(importRejects.batchId, batchId)))
		.orderBy(asc(importRejects.line))
		.limit(limit);
}

/** Every rejected row of a batch, by line, a cursor's pages of `rows` (on the postgres.js client
 * of a scoped transaction, for a streamed download). */
export function rejectsCursor(t: ScopedSql, shopId: string, batchId: string, rows = 2000) {
	return t<{ line: number; reason: string; raw: string }[]>`
		select line, reason, raw from import_rejects where shop_id = ${shopId} and batch_id = ${batchId} order by line`.cursor(rows);
}

/** Undo a committed batch: its readings go, and the heads it created unless something else
 * refers to them. Returns null when the batch cannot be undone (with the reason). */
export async function undoBatch(conn: Conn, shopId: string, batchId: string) {
	const [batch] = await conn.execute<{ status: string }>(sql`
		select status from import_batches where shop_id = ${shopId} and id = ${batchId} for update`);
	if (!batch) return { ok: false as const, status: 404, message: 'No such import.' };
	if (batch.status !== 'committed') {
		return { ok: false as const, status: 409, message: `Only a committed import can be undone; this one is ${batch.status}.` };
	}
	const removed = await conn.execute(sql`delete from readings where shop_id = ${shopId} and batch_id = ${batchId}`);
	const heads = await conn.execute(sql`
		delete from heads h
		where h.shop_id = ${shopId} and h.created_by_batch = ${batchId}
			and not exists (select 1 from readings r where r.head_id = h.id)
			and not exists (select 1 from decisions d where d.head_id = h.id)
			and not exists (select 1 from cylinder_leakage c where c.head_id = h.id)
			and not exists (select 1 from heads c where c.comeback_of = h.id)`);
	await conn.execute(sql`update import_batches set status = 'undone', finished_at = now() where id = ${batchId}`);
	return { ok: true as const, readingsRemoved: removed.count, headsRemoved: heads.count };
}

/** What an import does with rejected rows when the upload does not say: the shop's setting
 * `onReject` (shops.settings), `abort` for a shop without one. */
export async function shopOnReject(conn: Conn, shopId: string): Promise<OnReject> {
	const [row] = await conn.select({ settings: shops.settings }).from(shops).where(eq(shops.id, shopId)).limit(1);
	return row?.settings?.onReject === 'skip' ? 'skip' : 'abort';
}
