// Everything after the file is read, in the import's transaction: the checks across rows (the
// same reading twice in the file, a stored head given another family), then a dry run's answer,
// an abort, or the writes and the batch's record. The SQL is in queries/import-finish.ts.
import type { ScopedSql } from '../db/scope';
import {
	analyzeStage,
	auditImport,
	commitBatch,
	deleteBatchReadings,
	deleteEmptyNewHeads,
	dropLines,
	duplicatesWithinStage,
	failBatch,
	insertNewHeads,
	insertStagedReadings,
	readingRanks,
	rejectDuplicates,
	rejectFamilyMismatches,
	saveRejects,
	stagedAlreadyStored,
	stagedMatchingStored,
	stagedRejects,
	verifyKeys
} from '../queries/import-finish';
import type { Layout } from './header';
import type { DirectLines, Tally } from './tally';
import { newResult, type ImportOptions, type ImportOutcome, type ImportPath, type Timer } from './types';

export interface FinishInfo {
	batchId: string | null;
	hash: string;
	layout: Layout;
	bytes: number;
	delimiter: string;
	t0: number;
	tm: Timer;
	tally: Tally;
	/** Lines of the readings COPYed straight into readings. */
	lines: DirectLines;
	path: ImportPath;
}

/** A dry run's answer, thrown so that the transaction rolls back. */
export class DryRunOutcome extends Error {
	constructor(public outcome: ImportOutcome) {
		super('dry run');
	}
}

/** Lines rejected as the same reading as an earlier line of the file. */
async function duplicateLines(t: ScopedSql, info: FinishInfo): Promise<number[]> {
	// The same reading twice in the file: the later row is rejected whole. Only keys the
	// sieve flagged are compared; first, staged readings with each other.
	const firstLine = new Map((await duplicatesWithinStage(t)).map((r) => [r.line, r.first]));
	if (info.lines.readings > 0) {
		// Then with the readings that went straight in. Such a reading is always its key's first
		// occurrence: a row goes straight in only when none of its keys was seen before. (A new
		// head has no readings but this batch's.)
		const hits = await stagedMatchingStored(t);
		if (hits.length) {
			// The batch's readings went in in the order of the file, so a reading's rank among
			// them (by id, which grows) gives its line.
			const ranks = await readingRanks(t, info.batchId, hits.map((h) => h.id));
			const rank = new Map(ranks.map((r) => [r.id, r.n]));
			for (const h of hits) {
				const line = info.lines.lineOf(rank.get(h.id)!);
				firstLine.set(h.line, Math.min(firstLine.get(h.line) ?? line, line));
			}
		}
	}
	return firstLine.size ? rejectDuplicates(t, firstLine) : [];
}

export async function finish(t: ScopedSql, opts: ImportOptions, info: FinishInfo): Promise<ImportOutcome> {
	const { shopId } = opts;
	const { tally } = info;
	await analyzeStage(t);
	info.tm.mark('sql_analyze');

	// Lines rejected by checks across rows.
	const sqlRejected = new Set<number>();
	if (tally.dupCandidates > 0) for (const line of await duplicateLines(t, info)) sqlRejected.add(line);
	info.tm.mark('sql_duplicates_in_file');
	// A head that exists already keeps its family.
	if (tally.goodRows > 0) for (const line of await rejectFamilyMismatches(t, shopId)) sqlRejected.add(line);
	info.tm.mark('sql_family_check');

	// A row is rejected whole: every reading of a line rejected above is left out, and the
	// rejected line gets a plain rendering of what was read.
	const droppedReadings = sqlRejected.size ? await dropLines(t, [...sqlRejected], info.delimiter) : 0;
	info.tm.mark('sql_mark_rejected');

	const accepted = tally.goodRows - sqlRejected.size;
	const rejected = tally.badRows + sqlRejected.size;
	const candidates = tally.goodReadings - droppedReadings;
	const rejects = await stagedRejects(t);
	info.tm.mark('sql_rejects');

	const base = newResult({ batchId: info.batchId, dryRun: opts.dryRun, layout: info.layout, accepted, rejected, rejects, bytes: info.bytes, seconds: 0 });
	const aborting = rejected > 0 && opts.onReject === 'abort';

	if (opts.dryRun) {
		// What would be stored: every good reading of a new head, and those of known heads
		// that are not stored yet.
		const existing = await stagedAlreadyStored(t);
		base.readings = candidates - existing;
		base.duplicates = existing;
		base.createdHeads = tally.newHeads.size;
		base.seconds = (performance.now() - info.t0) / 1000;
		throw new DryRunOutcome({ status: 200, result: base });
	}

	const batchId = info.batchId!;
	if (rejected > 0) await saveRejects(t, shopId, batchId);

	if (aborting) {
		// Readings that went straight in before the first reject was known go again.
		if (info.lines.readings > 0) await deleteBatchReadings(t, shopId, batchId);
		const message = `${rejected} row${rejected === 1 ? '' : 's'} rejected; nothing was imported (rejected rows abort this import).`;
		await failBatch(t, batchId, message, { hash: info.hash, accepted, rejected, bytes: info.bytes });
		base.seconds = (performance.now() - info.t0) / 1000;
		return { status: 422, result: base, message };
	}

	// Heads that do not exist yet, from the identity columns of their first row.
	let createdHeads = tally.newHeads.size ? await insertNewHeads(t, shopId, batchId, tally.newHeads) : 0;
	info.tm.mark('sql_insert_heads');

	const staged = await insertStagedReadings(t, shopId, batchId);
	info.tm.mark('sql_insert_readings');
	// A new head whose every row was rejected above was created for nothing.
	if (sqlRejected.size && createdHeads) createdHeads -= await deleteEmptyNewHeads(t, batchId);

	if (info.path === 'direct-replica' && info.lines.readings > 0) {
		await verifyKeys(t, shopId, batchId);
		info.tm.mark('sql_verify_keys');
	}

	base.readings = info.lines.readings + staged;
	base.duplicates = candidates - base.readings;
	base.createdHeads = createdHeads;
	const counts = { accepted, rejected, readings: base.readings, duplicates: base.duplicates, createdHeads: base.createdHeads };
	await commitBatch(t, batchId, { ...counts, hash: info.hash, layout: info.layout, bytes: info.bytes });
	await auditImport(t, shopId, opts.actor, batchId, { fileName: opts.fileName, ...counts });
	info.tm.mark('sql_batch_audit');
	base.timings = info.tm.timings;
	base.path = info.path;
	base.seconds = (performance.now() - info.t0) / 1000;
	return { status: 201, result: base };
}
