// A batch's life outside the import's own transaction: created before the file is read (so its
// progress can be followed), its heartbeat renewed while the import runs, marked failed when the
// import stops, and reaped when its import died (server killed, database restarted). The import's
// transaction holds the batch's lock (lockBatch) for as long as it is open.
import type postgres from 'postgres';
import { withShopSql, withSystemSql } from '../db/scope';
import { failRunningBatch, failStaleBatch, insertRunningBatch, staleRunningBatches, touchRunningBatch, tryLockBatch } from '../queries/import-batches';
import type { Layout } from './header';
import type { ImportOptions } from './types';

export { lockBatch } from '../queries/import-batches';

/** How often a running import renews its batch's heartbeat, and after how long without one the
 * watch (reapDeadImports) counts the import as dead. */
export const HEARTBEAT_SECONDS = 5;
export const STALE_SECONDS = 30;

/** The batch of an import about to read its file, status running, committed at once. */
export async function createBatch(sql: postgres.Sql, opts: ImportOptions, layout: Layout): Promise<string> {
	return withShopSql(sql, opts.shopId, (t) =>
		insertRunningBatch(t, opts.shopId, { fileName: opts.fileName, layout, onReject: opts.onReject, createdBy: opts.actor.userId, clientRef: opts.clientRef ?? null })
	);
}

/** Renews the batch's heartbeat (and its rows read so far) from outside the import's transaction,
 * whose writes nobody sees before it commits; in the shop's scope, or row-level security hides the
 * row. A renewal that fails is only late: the next one may succeed. */
export function touchBatch(sql: postgres.Sql, shopId: string, batchId: string, progressRows?: number) {
	withShopSql(sql, shopId, (t) => touchRunningBatch(t, batchId, progressRows)).catch(() => {});
}

export function startHeartbeat(sql: postgres.Sql, shopId: string, batchId: string) {
	const timer = setInterval(() => touchBatch(sql, shopId, batchId), HEARTBEAT_SECONDS * 1000);
	timer.unref();
	return timer;
}

/** Marks the batch failed with `message` (if it is still running). */
export async function markFailed(sql: postgres.Sql, shopId: string, batchId: string | null, message: string) {
	if (!batchId) return;
	await withShopSql(sql, shopId, (t) => failRunningBatch(t, batchId, message));
}

/**
 * Marks batches whose import died (server killed, database restarted) as failed: running, no
 * heartbeat for `staleSeconds`, and the import's lock free (an import whose transaction is still
 * open in the database holds it, however late its heartbeat). Every server runs this on a timer
 * (startImportWatch); it looks across shops.
 */
export async function reapDeadImports(sql: postgres.Sql, staleSeconds = STALE_SECONDS): Promise<number> {
	const stale = await withSystemSql(sql, (t) => staleRunningBatches(t, staleSeconds));
	let reaped = 0;
	for (const b of stale) {
		reaped += await withShopSql(sql, b.shop_id, async (t) => ((await tryLockBatch(t, b.id)) ? failStaleBatch(t, b.id, staleSeconds) : 0));
	}
	return reaped;
}
