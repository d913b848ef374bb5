// The row of a running import (import_batches), on the postgres.js client of a scoped
// transaction: created when the upload starts, its heartbeat renewed, locked for the import's
// transaction, marked failed when the import stops or dies. import/batch.ts runs them.
import type { ScopedSql } from '../db/scope';
import type { Layout } from '../import/header';
import type { OnReject } from '../import/types';

/** The lock a running import holds for its whole transaction; a batch marked running whose lock
 * is free belongs to an import that died. */
const LOCK_CLASS = 7_120_426;

export async function insertRunningBatch(
	t: ScopedSql,
	shopId: string,
	b: { fileName: string; layout: Layout; onReject: OnReject; createdBy: string | null; clientRef: string | null }
): Promise<string> {
	const [row] = await t<{ id: string }[]>`
		insert into import_batches (shop_id, file_name, content_hash, layout, on_reject, status, created_by, client_ref)
		values (${shopId}, ${b.fileName.slice(0, 255)}, '', ${b.layout}, ${b.onReject}, 'running', ${b.createdBy}, ${b.clientRef})
		returning id`;
	return row.id;
}

/** Renews the heartbeat, and the rows read so far when given. */
export async function touchRunningBatch(t: ScopedSql, batchId: string, progressRows?: number): Promise<void> {
	if (progressRows === undefined) await t`update import_batches set heartbeat_at = now() where id = ${batchId} and status = 'running'`;
	else await t`update import_batches set heartbeat_at = now(), progress_rows = ${progressRows} where id = ${batchId} and status = 'running'`;
}

/** Takes the batch's lock until the transaction ends (waits while another holds it). */
export async function lockBatch(t: ScopedSql, batchId: string): Promise<void> {
	await t`select pg_advisory_xact_lock(${LOCK_CLASS}, hashtext(${batchId}))`;
}

/** Takes the batch's lock until the transaction ends if it is free; false when it is held. */
export async function tryLockBatch(t: ScopedSql, batchId: string): Promise<boolean> {
	const [{ free }] = await t<{ free: boolean }[]>`select pg_try_advisory_xact_lock(${LOCK_CLASS}, hashtext(${batchId})) as free`;
	return free;
}

export async function failRunningBatch(t: ScopedSql, batchId: string, message: string): Promise<void> {
	await t`
		update import_batches set status = 'failed', error = ${message}, finished_at = now()
		where id = ${batchId} and status = 'running'`;
}

/** Running batches, of every shop (a system-scoped transaction), without a heartbeat for `staleSeconds`. */
export async function staleRunningBatches(t: ScopedSql, staleSeconds: number) {
	return t<{ id: string; shop_id: string }[]>`
		select id, shop_id from import_batches where status = 'running' and heartbeat_at < now() - make_interval(secs => ${staleSeconds})`;
}

/** Marks a batch whose import died as failed, if it is still running and stale; 1 when it did. */
export async function failStaleBatch(t: ScopedSql, batchId: string, staleSeconds: number): Promise<number> {
	const r = await t`
		update import_batches set status = 'failed', finished_at = now(),
			error = 'The import stopped before it finished (the server or the database restarted). Nothing from it was stored.'
		where id = ${batchId} and status = 'running' and heartbeat_at < now() - make_interval(secs => ${staleSeconds})`;
	return r.count;
}

/** A committed batch of the shop with the same content, if any. */
export async function committedBatchWithHash(t: ScopedSql, shopId: string, hash: string): Promise<string | null> {
	const [dup] = await t<{ id: string }[]>`
		select id from import_batches where shop_id = ${shopId} and content_hash = ${hash} and status = 'committed' limit 1`;
	return dup?.id ?? null;
}
