// The import, for routes: the one way in for the Imports page and /api/v1/imports. Import a CSV
// (or try it: `dryRun`), list the shop's batches, read one with its first rejects or download all
// its rejected rows, advise on a header row, undo a batch. The work is in import/ (run.ts: the
// stream, COPY and checks in one transaction) and queries/; this opens the scopes.
import { Readable } from 'node:stream';
import { csvLine } from '../csv';
import { inShop, sql } from '../db';
import { streamFromShop } from '../db/stream';
import { uploadLimitBytes } from '../env';
import { conflict, notFound } from '../errors';
import type { Layout } from '../import/header';
import { runImport } from '../import/run';
import { adviseHeaders } from '../import/suggest';
import type { ImportOptions, OnReject } from '../import/types';
import { audit, type AuditWho } from '../queries/audit';
import { listFamilies } from '../queries/families';
import { rememberedMapping } from '../queries/import-mappings';
import { firstRejects, getBatch, listBatches, rejectsCursor, shopOnReject, undoBatch } from '../queries/imports';

export { ImportInputError } from '../import/text';
export type { ImportOutcome, ImportResult, OnReject } from '../import/types';

/** Content types an upload may be sent as. */
export const CSV_TYPES = ['text/csv', 'text/plain', 'application/csv', 'text/tab-separated-values', 'application/vnd.ms-excel'];

const NO_SUCH_IMPORT = 'No such import.';

/**
 * Imports a CSV (with `dryRun`, checks it and answers what would be stored, storing nothing).
 * Rejected rows are handled as the request says or, when it does not, as the shop's setting says
 * (shopOnReject). The outcome says which applied and where it came from. Throws ImportInputError
 * (a DomainError) for a file refused as a whole.
 */
export async function importCsv(body: ReadableStream<Uint8Array>, opts: Omit<ImportOptions, 'limitBytes' | 'onReject'> & { onReject?: OnReject }) {
	const onReject = opts.onReject ?? (await inShop(opts.shopId, (tx) => shopOnReject(tx, opts.shopId)));
	const outcome = await runImport(sql, Readable.fromWeb(body as never), { ...opts, onReject, limitBytes: uploadLimitBytes });
	return Object.assign(outcome, { onReject, onRejectFrom: opts.onReject ? ('request' as const) : ('shop setting' as const) });
}

/** The shop's batches, newest first (`clientRef` finds one that is still running). */
export function listImports(shopId: string, opts: { limit?: number; clientRef?: string } = {}) {
	return inShop(shopId, (tx) => listBatches(tx, shopId, opts));
}

/** What the Imports page shows: the latest batches, the families (for the file guide) and the
 * shop's default for rejected rows. */
export function importsPage(shopId: string) {
	return inShop(shopId, async (tx) => ({
		batches: await listBatches(tx, shopId, { limit: 200 }),
		families: (await listFamilies(tx, shopId)).map((f) => ({ code: f.code, cylinders: f.cylinders, intakeValves: f.intakeValves, exhaustValves: f.exhaustValves })),
		onRejectDefault: await shopOnReject(tx, shopId)
	}));
}

/** One batch with its first rejected rows; notFound when the shop has none of that id. */
export async function importBatch(shopId: string, batchId: string) {
	const found = await inShop(shopId, async (tx) => {
		const batch = await getBatch(tx, shopId, batchId);
		return batch ? { ...batch, rejects: await firstRejects(tx, shopId, batchId) } : null;
	});
	if (!found) throw notFound(NO_SUCH_IMPORT);
	return found;
}

/** Every rejected row of a batch as CSV (line, reason, the row as read), streamed from a cursor as
 * the client reads; with the batch's file name. notFound when the shop has no such batch. */
export async function rejectedRowsCsv(shopId: string, batchId: string): Promise<{ fileName: string; body: ReadableStream<Uint8Array> }> {
	const batch = await inShop(shopId, (tx) => getBatch(tx, shopId, batchId));
	if (!batch) throw notFound(NO_SUCH_IMPORT);
	const body = streamFromShop(sql, shopId, async function* (t) {
		yield csvLine(['line', 'reason', 'row']);
		for await (const rows of rejectsCursor(t, shopId, batchId)) yield rows.map((r) => csvLine([r.line, r.reason, r.raw])).join('');
	});
	return { fileName: batch.fileName, body };
}

/** The mapping step: for a file's header row, what Lapmark understands, what it suggests for the
 * rest, and whether (and which) mapping is remembered for these headers. */
export async function headerAdvice(shopId: string, headers: string[], layout?: Layout) {
	const remembered = await inShop(shopId, (_tx, t) => rememberedMapping(t, shopId, headers));
	return { ...adviseHeaders(headers, layout, remembered), remembered: Boolean(remembered) };
}

/**
 * Undoes a committed batch: its readings are removed, and the heads it created that nothing else
 * uses; audited. notFound for no such batch, conflict for one that is not committed (nothing is
 * changed then).
 */
export function undoImport(shopId: string, who: AuditWho, batchId: string) {
	return inShop(shopId, async (tx) => {
		const r = await undoBatch(tx, shopId, batchId);
		if (!r.ok) throw r.status === 404 ? notFound(r.message) : conflict(r.message);
		await audit(tx, shopId, who, { entity: 'import', entityId: batchId, action: 'undo', before: { status: 'committed' }, after: { status: 'undone', readingsRemoved: r.readingsRemoved, headsRemoved: r.headsRemoved } });
		return { readingsRemoved: r.readingsRemoved, headsRemoved: r.headsRemoved };
	});
}
